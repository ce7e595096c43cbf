/**
 * Deleting a draft: only a draft (never submitted, so nobody outside the team has seen it) is
 * deleted, with its estimates; an audit line 'entry.delete' keeps its label and team. Anything
 * submitted is a recorded state and is withdrawn instead (withdraw-entry.ts).
 */
import { eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { entries } from '../db/schema';
import { conflict, notFound } from '../errors';
import { recordAudit, type AuditActor } from './record-audit';

export async function deleteDraft(db: Db, p: { entryId: string; actor: AuditActor; now: Date }) {
  return db.transaction(async (tx) => {
    const [e] = await tx.select().from(entries).where(eq(entries.id, p.entryId)).for('update');
    if (!e) throw notFound('The entry');
    if (e.state !== 'draft') {
      throw conflict(`This entry is ${e.state}: only a draft can be deleted${e.state === 'published' || e.state === 'in-review' ? ` (withdraw it instead: POST /api/entries/${e.id}/withdraw with a reason)` : ''}.`);
    }
    await tx.delete(entries).where(eq(entries.id, e.id));
    await recordAudit(tx, { actor: p.actor, action: 'entry.delete', subjectType: 'entry', subjectId: e.id, at: p.now, details: { teamId: e.teamId, challenge: e.challengeSlug, label: e.label, revision: e.revision } });
    return { id: e.id, deleted: true as const };
  });
}
