/**
 * The entry named by :entryId, and whether the caller may see its private parts: shared by the
 * entry routes and the moderation routes (commitments).
 */
import type { Request } from 'express';
import { eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { entries } from '../db/schema';
import { notFound } from '../errors';
import { teamRole } from '../middleware/actor';
import type { EntryRow } from './entries';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export function entryAccess(db: Db) {
  /** the entry of req.params.entryId, or 404 (a malformed id never reaches the database) */
  const loadEntry = async (req: Request): Promise<EntryRow> => {
    const id = String(req.params.entryId);
    if (!UUID.test(id)) throw notFound('The entry');
    const [e] = await db.select().from(entries).where(eq(entries.id, id)).limit(1);
    if (!e) throw notFound('The entry');
    return e;
  };
  /** the entry's team, for the route table's team check */
  const entryTeam = async (req: Request) => (await loadEntry(req)).teamId;
  /** whether the caller is of the team (a member or its API key) or a moderator */
  const privileged = async (req: Request, teamId: string): Promise<boolean> => {
    const a = req.actor;
    if (a.kind === 'api-key') return a.teamId === teamId;
    if (a.kind !== 'user') return false;
    if (a.user.role === 'moderator' || a.user.role === 'admin') return true;
    return (await teamRole(db, a.user.id, teamId)) !== null;
  };
  return { loadEntry, entryTeam, privileged };
}
