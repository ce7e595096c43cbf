/**
 * Every job kind and its handler, in one place. The worker (server/jobs/worker.ts) runs these; a
 * new kind is added to JobKind (server/jobs/queue.ts) and here, and nowhere else.
 */
import type { JobKind } from './queue';
import type { JobHandler } from './types';
import { referencesJob } from './references-job';
import { baselineJob } from './baseline-job';
import { standingsJob } from './standings-job';
import { revealJob } from './reveal-job';
import { tnSlicesJob } from './tn-slices-job';
import { demoEntriesJob } from '../db/demo-entries';

export const JOB_HANDLERS: Record<JobKind, JobHandler> = {
  references: referencesJob,
  baseline: baselineJob,
  standings: standingsJob,
  reveal: revealJob,
  'demo-entries': demoEntriesJob,
  'tn-slices': tnSlicesJob,
};
