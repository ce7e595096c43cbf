/** The types shared by the worker and the job handlers (server/jobs/handlers.ts). */
import type { Db } from '../db/client';
import type { Logger } from '../log';
import type { JobRow } from './queue';
import type { Effect } from '../effects';

/**
 * A handler's result is stored on the job row; its effects (worker kicks, cache drops, mail) are not
 * stored but applied by the worker after the job is recorded done, through the app's applier
 * (server/effects.ts), never by the handler itself.
 */
export type JobResult = Record<string, unknown> & { effects?: Effect[] };
export type JobHandler = (job: JobRow, w: WorkerContext) => Promise<JobResult>;
export interface PlannerBudget { secondsBudget: number; coneQubitLimit: number; tnMemoryBytes?: number }
/** How sliced tensor-network contractions are spread (server/config.ts referenceThreads, tnSliceJobs). */
export interface SliceSettings {
  /** worker threads that share one plan's slice blocks */
  threads: number;
  /** a target with a term of at least this many slices becomes slice jobs (null: never) */
  jobsAbove: number | null;
  /** slice jobs per such term at most */
  jobsPerTerm: number;
}
export interface WorkerContext {
  db: Db;
  log: Logger;
  planner?: PlannerBudget;
  slices?: SliceSettings;
  /** the injected clock (the app's ctx.now in a server process) */
  now(): Date;
  progress(p: number, note: string): Promise<void>;
}
