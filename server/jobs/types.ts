/** The types shared by the worker and the job handlers (server/jobs/handlers.ts). */
import type { Db } from '../db/client';
import type { Logger } from '../log';
import type { JobRow } from './queue';

export type JobHandler = (job: JobRow, w: WorkerContext) => Promise<Record<string, unknown>>;
export interface PlannerBudget { secondsBudget: number; coneQubitLimit: number }
export interface WorkerContext {
  db: Db;
  log: Logger;
  planner?: PlannerBudget;
  /** the injected clock (the app's ctx.now in a server process) */
  now(): Date;
  progress(p: number, note: string): Promise<void>;
}
