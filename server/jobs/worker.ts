/**
 * The background worker: claims jobs from the queue and runs them off the request path (the heavy
 * computation in a worker thread). One per server process by default; more processes may run
 * against PostgreSQL (claims use SKIP LOCKED). The handlers are the ones of server/jobs/handlers.ts.
 */
import { sql } from 'drizzle-orm';
import type { Db } from '../db/client';
import type { Logger } from '../log';
import { claimJob, failJob, finishJob, newWorkerId, reportProgress, requeueStale, type JobKind } from './queue';
import { JOB_HANDLERS } from './handlers';
import type { JobHandler, PlannerBudget, SliceSettings } from './types';
import { applierFor } from '../effects';

export type { JobHandler, PlannerBudget, SliceSettings, WorkerContext } from './types';

export interface Worker { stop(): Promise<void>; kick(): void; idle(): Promise<void> }

export interface WorkerOptions {
  pollMs?: number;
  kinds?: JobKind[];
  recover?: 'all' | number;
  planner?: PlannerBudget;
  /** threads and slice jobs for sliced tensor-network contractions (default: REFERENCE_THREADS' default, no slice jobs) */
  slices?: SliceSettings;
  /** the injected clock handed to the handlers (server/boot.ts passes the app's ctx.now); the process clock by default */
  now?: () => Date;
  /** extra handlers for kinds of the tests' own (tests/server/jobs.test.ts, workers.test.ts); the real ones are JOB_HANDLERS */
  extraHandlers?: Record<string, JobHandler>;
}

export async function startWorker(db: Db, log: Logger, opts: WorkerOptions = {}): Promise<Worker> {
  const now = opts.now ?? (() => new Date());
  const handlers: Record<string, JobHandler> = { ...JOB_HANDLERS, ...opts.extraHandlers };
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
    const h = handlers[job.kind];
    const t0 = performance.now();
    try {
      if (!h) throw new Error(`no handler for job kind ${job.kind}`);
      const { effects, ...result } = await h(job, { db, log, planner: opts.planner, slices: opts.slices, now, progress: (p, note) => reportProgress(db, job.id, p, note) });
      await finishJob(db, job.id, result, now());
      log.info('job.done', { id: job.id, kind: job.kind, ms: Math.round(performance.now() - t0) });
      // the job's writes are committed: its effects, once, through the app's applier (server/effects.ts)
      if (effects?.length) await applierFor(db, log)(effects);
    } catch (e) {
      await failJob(db, job.id, job.kind, e, now()).catch(() => {});
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

