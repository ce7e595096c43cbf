/**
 * Publishing an entry (called by moderation inside its own transaction): in-review -> published;
 * the previous published revision of the same lineage becomes superseded (both stay visible; the
 * standings use the newest published one); a standings recomputation is queued for every version
 * whose set of published entries changed. The caller returns the worker kick as an effect (decideEntry).
 */
import { and, eq, ne } from 'drizzle-orm';
import type { Tx } from '../db/client';
import { entries } from '../db/schema';
import { conflict, notFound } from '../errors';
import { enqueueJob } from '../jobs/queue';
import { recordAudit, type AuditActor } from './record-audit';

export async function publishEntry(tx: Tx, entryId: string, actor: AuditActor, now: Date) {
  const [e] = await tx.select().from(entries).where(eq(entries.id, entryId)).for('update');
  if (!e) throw notFound('The entry');
  if (e.state !== 'in-review') throw conflict(`This entry is ${e.state}; only an entry in review can be published.`);
  await tx.update(entries).set({ state: 'published', publishedAt: now, updatedAt: now }).where(eq(entries.id, e.id));
  const versions = new Set([e.versionId]);
  const superseded: string[] = [];
  if (e.lineageId) {
    const prev = await tx.update(entries).set({ state: 'superseded', updatedAt: now })
      .where(and(eq(entries.lineageId, e.lineageId), eq(entries.state, 'published'), ne(entries.id, e.id)))
      .returning({ id: entries.id, versionId: entries.versionId });
    for (const p of prev) { superseded.push(p.id); versions.add(p.versionId); }
  }
  const jobIds: string[] = [];
  for (const v of versions) jobIds.push(await enqueueJob(tx, 'standings', { versionId: v }, `standings:${v}`));
  await recordAudit(tx, { actor, action: 'entry.publish', subjectType: 'entry', subjectId: e.id, at: now, details: { versionId: e.versionId, supersedes: superseded, revision: e.revision } });
  return { id: e.id, state: 'published' as const, superseded, jobIds };
}
