/**
 * The background worker: claims jobs from the queue and runs them off the request path (the heavy
 * computation in a worker thread). One per server process by default; more processes may run
 * against PostgreSQL (claims use SKIP LOCKED).
 */
import { randomUUID } from 'node:crypto';
import { and, eq, isNull, sql } from 'drizzle-orm';
import { ENGINE_VERSION } from '@shared/physics/reference';
import type { Db } from '../db/client';
import { challengeVersions, challenges, entries, estimates, references, targets } from '../db/schema';
import type { Logger } from '../log';
import { claimJob, enqueueJob, failJob, PublicJobError, finishJob, newWorkerId, reportProgress, requeueStale, type JobKind, type JobRow } from './queue';
import { runCompute } from './run-compute';
import { recordAudit } from '../services/record-audit';
import { challengeLink, notifyFollowers } from '../services/notify-followers';

/**
 * The house team. Its row is created by the schema (migration 0005 inserts it), never by a job, so no
 * user can take its slug before the first baseline runs; team-rules.ts reserves its name and slug.
 */
export const HOUSE_TEAM = { id: 'parallax-house', name: 'Parallax house baseline', slug: 'parallax-house' };
export const BASELINE_SETTINGS = { delta: 5e-3, maxTerms: 20_000 };

export type JobHandler = (job: JobRow, w: WorkerContext) => Promise<Record<string, unknown>>;
export interface PlannerBudget { secondsBudget: number; coneQubitLimit: number }
export interface WorkerContext { db: Db; log: Logger; planner?: PlannerBudget; progress(p: number, note: string): Promise<void> }

export const handlers: Partial<Record<JobKind, JobHandler>> = {
  references: referencesJob,
  baseline: baselineJob,
};

/** Other modules (standings) register their job handlers here. */
export function registerJobHandler(kind: JobKind, h: JobHandler): void {
  handlers[kind] = h;
}

async function versionSpec(db: Db, versionId: string) {
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
  return { secondsBudget: Math.min(cap, w.planner?.secondsBudget ?? Infinity), coneQubitLimit: w.planner?.coneQubitLimit ?? 26 };
}

async function referencesJob(job: JobRow, w: WorkerContext) {
  const versionId = String(job.payload && (job.payload as { versionId: string }).versionId);
  const v = await versionSpec(w.db, versionId);
  const all = await w.db.select({ id: targets.id, key: targets.key, refId: references.id }).from(targets)
    .leftJoin(references, eq(references.targetId, targets.id)).where(eq(targets.versionId, versionId));
  const idOf = new Map(all.map((t) => [t.key, t.id]));
  const todo = all.filter((t) => !t.refId).map((t) => t.key);
  const already = all.length - todo.length;
  let stored = 0;
  let exact = 0;
  await w.progress(already / Math.max(1, all.length), `${already} of ${all.length} targets done`);
  const planner = await plannerFor(w, v.challengeSlug);
  await runCompute({ mode: 'references', spec: v.spec, targetIds: todo, planner }, async (m) => {
    if (m.type === 'progress') await w.progress((already + m.done) / Math.max(1, all.length), m.note);
    if (m.type !== 'reference') return;
    const r = m.result;
    const targetId = idOf.get(m.targetId)!;
    await w.db.insert(references).values(r.value === null
      ? { targetId, value: null, method: 'none', reason: r.reason, engineVersion: r.engineVersion }
      // size: the method's own measure, plus the tensor network's width, flops and slices and the
      // cross-check by a second exact method where one ran (shown with the reference)
      : { targetId, value: r.value, method: r.method, size: { [r.unit]: r.size, detail: r.detail, ...(r.width !== undefined ? { width: r.width, flops: r.flops, slices: r.slices } : {}), ...(r.crossCheck ? { crossCheck: r.crossCheck } : {}) }, wallMs: r.wallMs, engineVersion: r.engineVersion },
    ).onConflictDoNothing();
    stored++;
    if (r.value !== null) exact++;
  });
  await enqueueJob(w.db, 'baseline', { versionId }, `baseline:${versionId}`);
  await enqueueJob(w.db, 'standings', { versionId }, `standings:${versionId}`);
  if (exact) {
    await notifyFollowers(w.db, { slug: v.challengeSlug, event: 'references.computed', subject: `Parallax: exact references computed for ${v.challengeSlug}`,
      lines: [`${exact} exact reference value(s) of ${v.challengeSlug} version ${v.version} were computed (engine ${ENGINE_VERSION}); ${all.length - already - exact} target(s) have none and are scored against the consensus.`, '', `The challenge: ${challengeLink(w.db, v.challengeSlug)}`] });
  }
  return { targets: all.length, computed: stored, exact, engine: ENGINE_VERSION };
}

async function baselineJob(job: JobRow, w: WorkerContext) {
  const versionId = String((job.payload as { versionId: string }).versionId);
  const v = await versionSpec(w.db, versionId);
  const [have] = await w.db.select({ id: entries.id }).from(entries).where(and(eq(entries.versionId, versionId), eq(entries.isBaseline, true), isNull(entries.supersedesId)));
  if (have) return { skipped: 'baseline exists' };
  const keys = (await w.db.select({ key: targets.key }).from(targets).where(eq(targets.versionId, versionId))).map((t) => t.key);
  const rows: { targetKey: string; value: number; uncertainty: number; kind: string; raw: Record<string, unknown> }[] = [];
  let wallMs = 0;
  await runCompute({ mode: 'baseline', spec: v.spec, targetIds: keys, baseline: BASELINE_SETTINGS }, async (m) => {
    if (m.type === 'progress') await w.progress(m.done / Math.max(1, m.total), m.note);
    if (m.type !== 'baseline') return;
    wallMs += m.wallMs;
    rows.push({ targetKey: m.targetId, value: m.value, uncertainty: m.bound, kind: m.exact ? 'none' : 'bound', raw: { peakTerms: m.terms, truncatedWeight: m.bound } });
  });
  await w.db.transaction(async (tx) => {
    const id = randomUUID();
    await tx.insert(entries).values({
      id, lineageId: id, challengeSlug: v.challengeSlug, versionId, teamId: HOUSE_TEAM.id, state: 'published', track: 'classical',
      methodFamily: 'pauli-propagation', isBaseline: true,
      label: `House baseline: truncated Pauli propagation (|c| < ${BASELINE_SETTINGS.delta} dropped after every gate, at most ${BASELINE_SETTINGS.maxTerms} terms)`,
      document: {
        method: { family: 'pauli-propagation', settings: { coefficientThreshold: BASELINE_SETTINGS.delta, maxTerms: BASELINE_SETTINGS.maxTerms, truncation: 'after every gate' } },
        resources: { wallTimeSeconds: wallMs / 1000, cpuCoreHours: wallMs / 3.6e6, hardware: 'one CPU core of the Parallax server', software: [{ name: ENGINE_VERSION }] },
        uncertaintyNote: 'Each uncertainty is the triangle-inequality bound: the sum of |c| over every dropped term.',
      },
      submittedAt: new Date(), publishedAt: new Date(),
    });
    for (let i = 0; i < rows.length; i += 1000) await tx.insert(estimates).values(rows.slice(i, i + 1000).map((r) => ({ ...r, entryId: id })));
    await recordAudit(tx, { actor: { kind: 'system', label: 'house baseline' }, action: 'entry.publish', subjectType: 'entry', subjectId: id, details: { baseline: true, versionId } });
  });
  await enqueueJob(w.db, 'standings', { versionId }, `standings:${versionId}`);
  return { estimates: rows.length, wallMs };
}

export interface Worker { stop(): Promise<void>; kick(): void; idle(): Promise<void> }

export async function startWorker(db: Db, log: Logger, opts: { pollMs?: number; kinds?: JobKind[]; recover?: 'all' | number; planner?: PlannerBudget } = {}): Promise<Worker> {
  const id = newWorkerId();
  const requeued = await requeueStale(db, opts.recover === 'all' || opts.recover === undefined ? null : opts.recover);
  if (requeued) log.info('jobs.requeued', { count: requeued });
  let stopped = false;
  let running: Promise<void> | null = null;
  let timer: NodeJS.Timeout | null = null;
  const idleWaiters: (() => void)[] = [];

  const runOne = async (): Promise<boolean> => {
    const job = await claimJob(db, id, opts.kinds);
    if (!job) return false;
    const h = handlers[job.kind as JobKind];
    const t0 = performance.now();
    try {
      if (!h) throw new Error(`no handler for job kind ${job.kind}`);
      const result = await h(job, { db, log, planner: opts.planner, progress: (p, note) => reportProgress(db, job.id, p, note) });
      await finishJob(db, job.id, result);
      log.info('job.done', { id: job.id, kind: job.kind, ms: Math.round(performance.now() - t0) });
    } catch (e) {
      await failJob(db, job.id, job.kind, e).catch(() => {});
      log.error('job.failed', { id: job.id, kind: job.kind, error: String((e as Error)?.message ?? e).slice(0, 2000) });
    }
    return true;
  };
  const loop = async () => {
    try {
      while (!stopped && (await runOne()));
    } catch (e) {
      log.error('worker.loop', { error: (e as Error).message });
    }
    running = null;
    while (idleWaiters.length) idleWaiters.shift()!();
  };
  const kick = () => {
    if (stopped || running) return;
    running = loop();
  };
  timer = setInterval(kick, opts.pollMs ?? 1000);
  timer.unref();
  kick();
  return {
    kick,
    idle: () => new Promise<void>((resolve) => {
      if (!running) {
        // there may be queued work that the next tick would take: run it now and wait
        kick();
        if (!running) return resolve();
      }
      idleWaiters.push(resolve);
    }),
    stop: async () => {
      stopped = true;
      if (timer) clearInterval(timer);
      // a long computation is not waited for: its job stays 'running' and is taken up again at the
      // next start (the reference job resumes where it stopped)
      await Promise.race([running, new Promise((r) => setTimeout(r, 2000).unref())]);
    },
  };
}

/** True when every job for the version is done (no queued or running left). */
export async function versionJobsSettled(db: Db, versionId: string): Promise<boolean> {
  const r = (await db.execute(sql`select count(*)::int as n from jobs where state in ('queued','running') and payload->>'versionId' = ${versionId}`)) as unknown as { rows: { n: number }[] };
  return r.rows[0].n === 0;
}

