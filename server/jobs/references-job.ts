/**
 * The reference job of a challenge version: computes the exact reference of every target that has
 * none, and recomputes every computed reference made by an older engine (ENGINE_VERSION; see
 * server/jobs/engine-upgrade.ts), in a compute thread; then queues the house baseline and the
 * standings.
 */
import { and, eq } from 'drizzle-orm';
import { ENGINE_VERSION } from '@shared/physics/reference';
import type { Db } from '../db/client';
import { challengeVersions, challenges, references, targets, tnSliceRuns } from '../db/schema';
import { combineRun, distributeTarget } from './tn-slices-job';
import { storeReference } from './store-reference';
import { enqueueJob, PublicJobError } from './queue';
import { challengeLink } from '../services/notify-followers';
import type { Effect } from '../effects';
import { runCompute } from './run-compute';
import type { JobHandler, PlannerBudget, WorkerContext } from './types';

export async function versionSpec(db: Db, versionId: string) {
  const [v] = await db.select().from(challengeVersions).where(eq(challengeVersions.id, versionId));
  if (!v) throw new PublicJobError(`The challenge version ${versionId.slice(0, 40)} does not exist (any more).`);
  return v;
}

/**
 * The planner budget for a challenge: the server's, lowered by the challenge's own cap
 * (settings.referenceSecondsBudget, seconds per target) when it has one.
 */
async function plannerFor(w: WorkerContext, slug: string): Promise<PlannerBudget | undefined> {
  const [c] = await w.db.select({ settings: challenges.settings }).from(challenges).where(eq(challenges.slug, slug));
  const cap = (c?.settings as { referenceSecondsBudget?: unknown } | undefined)?.referenceSecondsBudget;
  if (typeof cap !== 'number' || !(cap > 0)) return w.planner;
  return { ...w.planner, secondsBudget: Math.min(cap, w.planner?.secondsBudget ?? Infinity), coneQubitLimit: w.planner?.coneQubitLimit ?? 27 };
}

/** a computed reference (not one a moderator supplied) made by another engine than this one */
export const isStale = (r: { method: string | null; engineVersion: string | null }) => r.method !== 'supplied' && r.engineVersion !== ENGINE_VERSION;

export const referencesJob: JobHandler = async (job, w) => {
  const versionId = String(job.payload && (job.payload as { versionId: string }).versionId);
  const v = await versionSpec(w.db, versionId);
  const all = await w.db.select({ id: targets.id, key: targets.key, refId: references.id, method: references.method, engineVersion: references.engineVersion }).from(targets)
    .leftJoin(references, eq(references.targetId, targets.id)).where(eq(targets.versionId, versionId));
  const idOf = new Map(all.map((t) => [t.key, t.id]));
  // targets this job already handed out as slice jobs (a resumed job): combined when all their parts are in
  const runs = await w.db.select({ id: tnSliceRuns.id, targetKey: tnSliceRuns.targetKey }).from(tnSliceRuns).where(and(eq(tnSliceRuns.parentJobId, job.id), eq(tnSliceRuns.state, 'pending')));
  for (const r of runs) await combineRun(w.db, r.id, w.now());
  const handedOut = new Set(runs.map((r) => r.targetKey));
  const todo = all.filter((t) => (!t.refId || isStale(t)) && !handedOut.has(t.key)).map((t) => t.key);
  const recomputed = all.filter((t) => t.refId && isStale(t)).length;
  const already = all.length - todo.length;
  let stored = 0;
  let exact = 0;
  let sliceJobs = 0;
  let handed = 0;
  await w.progress(already / Math.max(1, all.length), `${already} of ${all.length} targets done`);
  const planner = await plannerFor(w, v.challengeSlug);
  const slices = w.slices;
  await runCompute({ mode: 'references', spec: v.spec, targetIds: todo, planner, sliceThreads: slices?.threads ?? 1, distributeAbove: slices?.jobsAbove ?? undefined }, async (m) => {
    if (m.type === 'progress') await w.progress((already + m.done) / Math.max(1, all.length), m.note);
    if (m.type === 'distribute') {
      handed++;
      sliceJobs += await distributeTarget(w.db, { parentJobId: job.id, versionId, message: m, jobsPerTerm: slices?.jobsPerTerm ?? 8 });
      return;
    }
    if (m.type !== 'reference') return;
    const r = m.result;
    await storeReference(w.db, idOf.get(m.targetId)!, r, w.now());
    stored++;
    if (r.value !== null) exact++;
  });
  await enqueueJob(w.db, 'baseline', { versionId }, `baseline:${versionId}`);
  await enqueueJob(w.db, 'standings', { versionId }, `standings:${versionId}`);
  const effects: Effect[] = exact ? [{ kind: 'notify-followers', slug: v.challengeSlug, event: 'references.computed', subject: `Parallax: exact references computed for ${v.challengeSlug}`,
    lines: [`${exact} exact reference value(s) of ${v.challengeSlug} version ${v.version} were computed (engine ${ENGINE_VERSION}); ${todo.length - exact - handed} target(s) have none and are scored against the consensus.`, '', ['The challenge: ', challengeLink(v.challengeSlug)]] }] : [];
  return { targets: all.length, computed: stored, recomputed, exact, engine: ENGINE_VERSION, ...(sliceJobs ? { sliceJobs, bySliceJobs: handed } : {}), effects };
};
