import { and, desc, eq, lt } from 'drizzle-orm';
import { recomputeStandings, type StandingsPayload } from '../services/recompute-standings';
import type { JobHandler } from './types';
import { challengeVersions, standings } from '../db/schema';
import type { Db } from '../db/client';
import { challengeLink } from '../services/notify-followers';

/**
 * Whether a recomputation rescored the standings: the public order of the entries ranked both
 * before and after changed (a new entry slotting in, or one leaving, is not a rescoring by itself;
 * its publication or withdrawal has its own message).
 */
export function reordered(before: StandingsPayload | null, after: StandingsPayload): boolean {
  if (!before) return false;
  // the house baseline (rank null) is a reference row, never ranked
  const rank = (p: StandingsPayload) => new Map(p.public.entries.filter((e) => e.rank !== null && e.rank !== undefined).map((e) => [e.id, e.rank as number]));
  const a = rank(before), b = rank(after);
  const common = [...a.keys()].filter((id) => b.has(id));
  const order = (m: Map<string, number>) => [...common].sort((x, y) => m.get(x)! - m.get(y)! || x.localeCompare(y)).join();
  return order(a) !== order(b);
}

async function previousPayload(db: Db, versionId: string, at: Date): Promise<StandingsPayload | null> {
  const [row] = await db.select({ payload: standings.payload }).from(standings)
    .where(and(eq(standings.versionId, versionId), lt(standings.computedAt, at))).orderBy(desc(standings.computedAt)).limit(1);
  return row ? (row.payload as StandingsPayload) : null;
}

/** Recomputes the standings of a version (at the injected clock's time); effects: the cached responses dropped, followers told of a reordering. */
export const standingsJob: JobHandler = async (job, w) => {
  const versionId = String((job.payload as { versionId: string }).versionId);
  const t0 = performance.now();
  const { result: row, effects } = await recomputeStandings(w.db, versionId, w.now());
  const [cur] = await w.db.select({ payload: standings.payload }).from(standings).where(eq(standings.id, row.id));
  const prev = await previousPayload(w.db, versionId, row.computedAt);
  if (cur && reordered(prev, cur.payload as StandingsPayload)) {
    const [v] = await w.db.select({ slug: challengeVersions.challengeSlug, version: challengeVersions.version }).from(challengeVersions).where(eq(challengeVersions.id, versionId));
    if (v) {
      effects.push({ kind: 'notify-followers', slug: v.slug, event: 'standings.rescored', subject: `Parallax: standings of ${v.slug} rescored`,
        lines: [`The standings of ${v.slug} version ${v.version} were recomputed at ${row.computedAt.toISOString()} and the order of the ranked entries changed.`, '', ['The standings: ', challengeLink(v.slug)]] });
    }
  }
  return { standingsId: row.id, ms: Math.round(performance.now() - t0), effects };
};
