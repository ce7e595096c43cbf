import { recomputeStandings } from '../services/recompute-standings';
import { registerJobHandler } from './worker';
import { standingsCache } from '../services/standings-cache';

registerJobHandler('standings', async (job, w) => {
  const versionId = String((job.payload as { versionId: string }).versionId);
  const t0 = performance.now();
  const row = await recomputeStandings(w.db, versionId);
  standingsCache.invalidate(versionId);
  return { standingsId: row.id, ms: Math.round(performance.now() - t0) };
});
