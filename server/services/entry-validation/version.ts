/** The challenge version an entry document names, looked up in the database (published versions only). */
import { asc, eq } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { challengeVersions, challenges, observables, targets } from '../../db/schema';
import type { FieldProblem } from '../../errors';
import type { ChallengeRef } from './checks';
import type { ChallengeGate } from './gate';
import type { VersionTargets } from './types';

/** Published versions never change, so their targets are cached by version id. */
const targetCache = new Map<string, VersionTargets>();

export async function loadVersionTargets(db: DbOrTx, v: { id: string; challengeSlug: string; version: number; checksum: string }): Promise<VersionTargets> {
  const hit = targetCache.get(v.id);
  if (hit) return hit;
  const rows = await db.select({ key: targets.key, bound: observables.bound, observable: observables.key })
    .from(targets).innerJoin(observables, eq(observables.id, targets.observableId)).where(eq(targets.versionId, v.id)).orderBy(asc(targets.key));
  const out: VersionTargets = { versionId: v.id, slug: v.challengeSlug, version: v.version, checksum: v.checksum, targets: new Map(rows.map((r) => [r.key, { bound: r.bound, observable: r.observable }])) };
  if (targetCache.size > 20) targetCache.delete(targetCache.keys().next().value as string);
  targetCache.set(v.id, out);
  return out;
}

export interface Resolved { problems: FieldProblem[]; challenge?: ChallengeGate; version?: VersionTargets }

/** The challenge and published version of a reference, or the problems naming what does not match. */
export async function resolveVersion(db: DbOrTx, ref: ChallengeRef, urlSlug: string | undefined): Promise<Resolved> {
  const slug = ref.id;
  if (urlSlug !== undefined && urlSlug !== slug) {
    return { problems: [{ path: '/challenge/id', message: `this entry answers "${slug}" but was posted to /api/challenges/${urlSlug}/entries: post it to /api/challenges/${slug}/entries, or fix the id` }] };
  }
  const [c] = await db.select().from(challenges).where(eq(challenges.slug, slug)).limit(1);
  if (!c || c.state === 'draft') return { problems: [{ path: '/challenge/id', message: `there is no published challenge "${slug}" (GET /api/challenges lists them)` }] };
  const challenge: ChallengeGate = { slug: c.slug, state: c.state, settings: c.settings };
  if (ref.checksum === undefined) return { problems: [], challenge }; // the schema names the checksum; no version to check the targets against
  const versions = await db.select().from(challengeVersions).where(eq(challengeVersions.challengeSlug, slug));
  const current = versions.find((x) => x.id === c.currentVersionId);
  const currentHint = current ? `the current version ${current.version} has checksum "sha256:${current.checksum}" (GET /api/challenges/${slug})` : '';
  const given = ref.checksum.replace(/^sha256:/, '');
  const v = versions.find((x) => x.checksum === given && x.state !== 'draft');
  if (!v) return { challenge, problems: [{ path: '/challenge/checksum', message: `"${ref.checksum}" is not the checksum of a published version of ${slug}; ${currentHint}` }] };
  if (v.state === 'superseded') {
    return { challenge, problems: [{ path: '/challenge/checksum', message: `version ${v.version} of ${slug} was superseded${current ? ` by version ${current.version}` : ''}${v.supersededReason ? ` (${v.supersededReason})` : ''} and takes no new entries; answer the current version: ${currentHint}` }] };
  }
  if (ref.version !== undefined && v.version !== ref.version) {
    return { challenge, problems: [{ path: '/challenge/version', message: `the checksum is that of version ${v.version} of ${slug}, not version ${ref.version}: fix one of the two` }] };
  }
  return { problems: [], challenge, version: await loadVersionTargets(db, v) };
}
