/**
 * Publishing freezes a draft version (its spec and checksum never change again), makes it the
 * challenge's current version, marks the previous published version superseded with the reason,
 * and queues the reference job. One transaction; the computation runs later, off the request path.
 * Effects after the commit: every cached standings response dropped (the current version changed)
 * and the worker kicked.
 */
import { and, eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { challengeVersions, challenges } from '../db/schema';
import { conflict, invalid, notFound } from '../errors';
import { enqueueJob } from '../jobs/queue';
import { recordAudit, type AuditActor } from './record-audit';
import { invalidateStandings, kickJobs, type WithEffects } from '../effects';

export async function publishChallengeVersion(db: Db, p: { slug: string; version?: number; reason?: string; actor: AuditActor; now: Date }) {
  const result = await db.transaction(async (tx) => {
    const [c] = await tx.select().from(challenges).where(eq(challenges.slug, p.slug)).for('update');
    if (!c) throw notFound(`The challenge "${p.slug}"`);
    const drafts = await tx.select().from(challengeVersions).where(and(eq(challengeVersions.challengeSlug, p.slug), eq(challengeVersions.state, 'draft')));
    const v = p.version === undefined ? drafts.sort((a, b) => b.version - a.version)[0] : drafts.find((d) => d.version === p.version);
    if (!v) throw conflict(p.version === undefined ? `"${p.slug}" has no draft version to publish.` : `Version ${p.version} of "${p.slug}" is not a draft (published versions never change).`);
    const previous = c.currentVersionId;
    if (previous && !p.reason?.trim()) throw invalid([{ path: '/reason', message: 'publishing a correction supersedes the current version: say why (e.g. "observable z17 had the wrong qubit")' }]);
    await tx.update(challengeVersions).set({ state: 'published', publishedAt: p.now }).where(eq(challengeVersions.id, v.id));
    if (previous) await tx.update(challengeVersions).set({ state: 'superseded', supersededReason: p.reason!.trim() }).where(eq(challengeVersions.id, previous));
    await tx.update(challenges).set({ currentVersionId: v.id, state: c.state === 'draft' ? 'open' : c.state, title: (v.spec as { title: string }).title, updatedAt: p.now }).where(eq(challenges.slug, p.slug));
    const jobId = await enqueueJob(tx, 'references', { versionId: v.id }, `references:${v.id}`);
    await recordAudit(tx, { actor: p.actor, action: 'challenge.publish', subjectType: 'challenge', subjectId: p.slug, at: p.now, details: { version: v.version, checksum: v.checksum, supersedes: previous, reason: p.reason ?? null } });
    return { slug: p.slug, versionId: v.id, version: v.version, checksum: v.checksum, jobId };
  });
  return { result, effects: [invalidateStandings(null), kickJobs()] } satisfies WithEffects<typeof result>;
}
