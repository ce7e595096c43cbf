import { recomputeStandings } from '../services/recompute-standings';
import { standingsCache } from '../services/standings-cache';
import type { JobHandler } from './types';

/** Recomputes the standings of a version (at the injected clock's time) and drops the cached responses. */
export const standingsJob: JobHandler = async (job, w) => {
  const versionId = String((job.payload as { versionId: string }).versionId);
  const t0 = performance.now();
  const row = await recomputeStandings(w.db, versionId, w.now());
  standingsCache.invalidate(versionId);
  return { standingsId: row.id, ms: Math.round(performance.now() - t0) };
};
