/**
 * Marking a target disputed (with a public note) or clearing the mark. The standings show the note
 * and flag the target; audit 'target.dispute' / 'target.undispute' on the challenge (the public
 * history reads them; the note is prefixed with the target key so the history says which one).
 */
import { and, eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { targets } from '../db/schema';
import { notFound } from '../errors';
import { enqueueJob } from '../jobs/queue';
import { recordAudit, type AuditActor } from './record-audit';
import { kickJobs, type WithEffects } from '../effects';

export async function disputeTarget(db: Db, p: { slug: string; versionId: string; version: number; targetKey: string; disputed: boolean; note: string | null; actor: AuditActor; now: Date }) {
  const result = await db.transaction(async (tx) => {
    const [t] = await tx.select().from(targets).where(and(eq(targets.versionId, p.versionId), eq(targets.key, p.targetKey))).for('update');
    if (!t) throw notFound(`The target "${p.targetKey}" of version ${p.version}`);
    const note = p.disputed ? p.note : null;
    await tx.update(targets).set({ disputed: p.disputed, disputeNote: note }).where(eq(targets.id, t.id));
    await recordAudit(tx, {
      actor: p.actor, action: p.disputed ? 'target.dispute' : 'target.undispute', subjectType: 'challenge', subjectId: p.slug, at: p.now,
      details: { target: p.targetKey, version: p.version, text: p.note, previous: t.disputed ? t.disputeNote : null, note: `${p.targetKey}${p.note ? `: ${p.note}` : ''}` },
    });
    const jobId = await enqueueJob(tx, 'standings', { versionId: p.versionId }, `standings:${p.versionId}`);
    return { target: p.targetKey, version: p.version, disputed: p.disputed, note, jobId };
  });
  return { result, effects: [kickJobs()] } satisfies WithEffects<typeof result>;
}
