/**
 * Curation of a published entry: feature / unfeature it, hide it with a public reason (it leaves
 * the standings: recomputeStandings skips hidden entries) or show it again. One transaction with
 * the audit lines ('entry.feature', 'entry.hide': the public history reads them) and the standings
 * job; the worker kick is an effect, applied after the commit (server/effects.ts).
 */
import { eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { entries } from '../db/schema';
import { conflict, notFound } from '../errors';
import { enqueueJob } from '../jobs/queue';
import { recordAudit, type AuditActor } from './record-audit';
import { refuseOwnTeamEntry } from './own-team-guard';
import { kickJobs, type WithEffects } from '../effects';

export async function curateEntry(db: Db, p: { entryId: string; featured?: boolean; hidden?: { reason: string } | null; actor: AuditActor; now: Date }) {
  const result = await db.transaction(async (tx) => {
    const [e] = await tx.select().from(entries).where(eq(entries.id, p.entryId)).for('update');
    if (!e) throw notFound('The entry');
    await refuseOwnTeamEntry(tx, p.actor, e.teamId, 'feature or hide');
    if (e.state !== 'published' && e.state !== 'superseded') throw conflict(`This entry is ${e.state}; only published entries (and superseded revisions) are curated.`);
    const set: Partial<typeof entries.$inferInsert> = {};
    const changes: string[] = [];
    if (p.featured !== undefined && p.featured !== e.featured) {
      set.featured = p.featured;
      changes.push(p.featured ? 'featured' : 'unfeatured');
      await recordAudit(tx, { actor: p.actor, action: 'entry.feature', subjectType: 'entry', subjectId: e.id, at: p.now, details: { featured: p.featured, reason: p.featured ? 'featured by a moderator' : 'no longer featured', versionId: e.versionId } });
    }
    if (p.hidden !== undefined) {
      const reason = p.hidden ? p.hidden.reason : null;
      if (reason !== e.hiddenReason) {
        set.hiddenReason = reason;
        changes.push(reason ? 'hidden' : 'shown');
        await recordAudit(tx, { actor: p.actor, action: 'entry.hide', subjectType: 'entry', subjectId: e.id, at: p.now, details: { hidden: reason !== null, reason: reason ?? `shown again (was hidden: ${e.hiddenReason})`, versionId: e.versionId } });
      }
    }
    let jobId: string | null = null;
    if (changes.length) {
      await tx.update(entries).set({ ...set, updatedAt: p.now }).where(eq(entries.id, e.id));
      jobId = await enqueueJob(tx, 'standings', { versionId: e.versionId }, `standings:${e.versionId}`);
    }
    return { id: e.id, featured: set.featured ?? e.featured, hiddenReason: set.hiddenReason === undefined ? e.hiddenReason : set.hiddenReason, changes, jobId };
  });
  return { result, effects: result.jobId ? [kickJobs()] : [] } satisfies WithEffects<typeof result>;
}
