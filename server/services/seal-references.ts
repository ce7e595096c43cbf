/**
 * Sealing reference values until a date (a blind round). Design:
 * - a reference_seals row records the seal (version, targets or all, date);
 * - reference rows that exist get references.sealed_until at once;
 * - rows the reference job writes later take the date from the trigger references_apply_seal
 *   (drizzle/0003_reference_seal_trigger.sql), in the same INSERT, so a value is never stored
 *   unsealed even when the seal comes before the computation (seal a draft version with
 *   ?version=N before publishing it: nothing is public in between);
 * - every read withholds a sealed value through isVisibleNow (server/queries/visibility.ts: the public
 *   standings view); the reveal job (server/jobs/reveal-job.ts) runs once the date has passed.
 * Sealing again replaces the date for the targets named. Audit 'references.seal'.
 */
import { eq, inArray } from 'drizzle-orm';
import type { Db } from '../db/client';
import { referenceSeals, references, targets } from '../db/schema';
import { invalid } from '../errors';
import { enqueueJob } from '../jobs/queue';
import { recordAudit, type AuditActor } from './record-audit';
import { kickJobs, type WithEffects } from '../effects';

export async function sealReferences(db: Db, p: { slug: string; versionId: string; version: number; targets: string[] | 'all'; until: Date; actor: AuditActor; now: Date }) {
  if (!(p.until > p.now)) throw invalid([{ path: '/until', message: `the date must be in the future (now is ${p.now.toISOString()})` }]);
  const result = await db.transaction(async (tx) => {
    const all = await tx.select({ id: targets.id, key: targets.key }).from(targets).where(eq(targets.versionId, p.versionId));
    let chosen = all;
    if (p.targets !== 'all') {
      const keys = new Set(all.map((t) => t.key));
      const unknown = p.targets.filter((k) => !keys.has(k));
      if (unknown.length) throw invalid(unknown.slice(0, 20).map((k) => ({ path: `/targets/${p.targets.indexOf(k)}`, message: `"${k}" is not a target of version ${p.version}` })));
      const want = new Set(p.targets);
      chosen = all.filter((t) => want.has(t.key));
    }
    const createdBy = p.actor.kind === 'user' ? p.actor.user.id : null;
    const [seal] = await tx.insert(referenceSeals).values({
      versionId: p.versionId, challengeSlug: p.slug, allTargets: p.targets === 'all', targetKeys: p.targets === 'all' ? [] : [...new Set(p.targets)], sealedUntil: p.until, createdBy, createdAt: p.now,
    }).returning({ id: referenceSeals.id });
    let existing = 0;
    for (let i = 0; i < chosen.length; i += 1000) {
      const ids = chosen.slice(i, i + 1000).map((t) => t.id);
      const r = await tx.update(references).set({ sealedUntil: p.until }).where(inArray(references.targetId, ids)).returning({ id: references.id });
      existing += r.length;
    }
    await recordAudit(tx, {
      actor: p.actor, action: 'references.seal', subjectType: 'challenge', subjectId: p.slug, at: p.now,
      details: { sealId: seal.id, version: p.version, targets: p.targets === 'all' ? 'all' : chosen.map((t) => t.key).slice(0, 200), count: chosen.length, until: p.until.toISOString(), reason: `${chosen.length} reference value(s) of version ${p.version} sealed until ${p.until.toISOString()}` },
    });
    const jobId = await enqueueJob(tx, 'standings', { versionId: p.versionId }, `standings:${p.versionId}`);
    return { sealId: seal.id, version: p.version, targets: chosen.length, referencesSealedNow: existing, pendingReferences: chosen.length - existing, sealedUntil: p.until, jobId };
  });
  return { result, effects: [kickJobs()] } satisfies WithEffects<typeof result>;
}

