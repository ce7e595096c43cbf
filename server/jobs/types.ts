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
export interface PlannerBudget { secondsBudget: number; coneQubitLimit: number }
export interface WorkerContext {
  db: Db;
  log: Logger;
  planner?: PlannerBudget;
  /** the injected clock (the app's ctx.now in a server process) */
  now(): Date;
  progress(p: number, note: string): Promise<void>;
}
