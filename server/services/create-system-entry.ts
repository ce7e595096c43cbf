/**
 * An entry the server writes itself, not a team through the entry API: the house baseline
 * (server/jobs/baseline-job.ts) and the invented demo entries (server/db/demo-entries.ts). It is
 * stored in its final state (published, or in review for the demo's queue) with its estimates and
 * an audit line by a system actor, in one transaction; a published one queues the standings
 * recomputation of its version in the same transaction, and the worker kick is returned as an
 * effect (server/effects.ts).
 */
import { randomUUID } from 'node:crypto';
import { and, eq, ne } from 'drizzle-orm';
import type { Db } from '../db/client';
import { entries, estimates } from '../db/schema';
import { enqueueJob } from '../jobs/queue';
import { kickJobs, type WithEffects } from '../effects';
import { recordAudit } from './record-audit';

export interface SystemEntry {
  slug: string;
  versionId: string;
  teamId: string;
  state: 'published' | 'in-review';
  track: 'hardware' | 'classical';
  methodFamily: string;
  label: string;
  document: Record<string, unknown>;
  isBaseline?: boolean;
  estimates: { targetKey: string; value: number; uncertainty: number; kind: string; raw: Record<string, unknown> | null }[];
  /** who writes it, as the audit log names it ('house baseline', 'seed') */
  actorLabel: string;
  auditDetails: Record<string, unknown>;
  /** the injected clock's time (the demo dates its entries after the challenge's opening) */
  at: Date;
  /** a new revision of this entry (same lineage, revision + 1; the standings use the newest) */
  supersedes?: { id: string; lineageId: string; revision: number };
}

export async function createSystemEntry(db: Db, e: SystemEntry): Promise<WithEffects<{ id: string; jobId: string | null }>> {
  const result = await db.transaction(async (tx) => {
    const id = randomUUID();
    await tx.insert(entries).values({
      id, lineageId: e.supersedes?.lineageId ?? id, supersedesId: e.supersedes?.id ?? null, revision: e.supersedes ? e.supersedes.revision + 1 : 1, challengeSlug: e.slug, versionId: e.versionId, teamId: e.teamId, state: e.state, track: e.track, methodFamily: e.methodFamily,
      isBaseline: e.isBaseline ?? false, label: e.label, document: e.document,
      submittedAt: e.at, publishedAt: e.state === 'published' ? e.at : null, createdAt: e.at, updatedAt: e.at,
    });
    // a published revision supersedes the published one before it (as publishEntry does for teams)
    if (e.supersedes && e.state === 'published') {
      await tx.update(entries).set({ state: 'superseded', updatedAt: e.at }).where(and(eq(entries.lineageId, e.supersedes.lineageId), eq(entries.state, 'published'), ne(entries.id, id)));
    }
    for (let i = 0; i < e.estimates.length; i += 1000) await tx.insert(estimates).values(e.estimates.slice(i, i + 1000).map((x) => ({ ...x, entryId: id })));
    await recordAudit(tx, { actor: { kind: 'system', label: e.actorLabel }, action: e.state === 'published' ? 'entry.publish' : 'entry.submit', subjectType: 'entry', subjectId: id, at: e.at, details: e.auditDetails });
    const jobId = e.state === 'published' ? await enqueueJob(tx, 'standings', { versionId: e.versionId }, `standings:${e.versionId}`) : null;
    return { id, jobId };
  });
  return { result, effects: result.jobId ? [kickJobs()] : [] };
}
