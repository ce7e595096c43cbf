/**
 * Withdrawal is a recorded state, never a deletion: the entry and its estimates stay, with the
 * reason in the audit log. Withdrawing a published entry changes the standings of its version (a
 * standings job, and the worker kicked after the commit: an effect, server/effects.ts).
 */
import { eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { entries } from '../db/schema';
import { conflict, notFound } from '../errors';
import { enqueueJob } from '../jobs/queue';
import { recordAudit, type AuditActor } from './record-audit';
import { kickJobs, type WithEffects } from '../effects';

export const WITHDRAWABLE = ['draft', 'in-review', 'returned', 'published'];

export async function withdrawEntry(db: Db, p: { entryId: string; reason: string; actor: AuditActor; now: Date }) {
  const result = await db.transaction(async (tx) => {
    const [e] = await tx.select().from(entries).where(eq(entries.id, p.entryId)).for('update');
    if (!e) throw notFound('The entry');
    if (!WITHDRAWABLE.includes(e.state)) throw conflict(`This entry is ${e.state}; only a draft, in-review, returned or published entry can be withdrawn.`);
    await tx.update(entries).set({ state: 'withdrawn', updatedAt: p.now }).where(eq(entries.id, e.id));
    if (e.state === 'published') await enqueueJob(tx, 'standings', { versionId: e.versionId }, `standings:${e.versionId}`);
    await recordAudit(tx, { actor: p.actor, action: 'entry.withdraw', subjectType: 'entry', subjectId: e.id, at: p.now, details: { from: e.state, reason: p.reason } });
    return { id: e.id, state: 'withdrawn' as const, from: e.state, standingsChanged: e.state === 'published' };
  });
  return { result, effects: result.standingsChanged ? [kickJobs()] : [] } satisfies WithEffects<typeof result>;
}
