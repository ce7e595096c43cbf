/**
 * Standings order and the accuracy-against-cost front.
 *
 * Ranking: entries are ordered by a list of keys, each a metric name and a direction. Default:
 * RMSE on verifiable targets (ascending), then agreement on the rest (median |d|/U, ascending).
 * A missing/NaN metric sorts after every present value of that key. Ties after all keys are
 * broken deterministically by earlier submission time, then by id (string order). Ranks are
 * 1..n in that order; `tiedWithPrevious` marks entries equal to the previous on every key.
 */

export interface RankingEntry {
  id: string;
  /** ISO date string, epoch ms or Date. */
  submittedAt: string | number | Date;
  metrics: Readonly<Record<string, number | undefined | null>>;
}

export interface RankingKey {
  metric: string;
  direction?: 'asc' | 'desc';
}

export const DEFAULT_RANKING_KEYS: readonly RankingKey[] = [
  { metric: 'rmseVerifiable', direction: 'asc' },
  { metric: 'agreementMedianRatio', direction: 'asc' },
];

export interface RankedEntry<E extends RankingEntry = RankingEntry> {
  rank: number;
  entry: E;
  tiedWithPrevious: boolean;
}

function timeOf(t: string | number | Date): number {
  if (typeof t === 'number') return t;
  if (t instanceof Date) return t.getTime();
  const v = Date.parse(t);
  return Number.isNaN(v) ? Infinity : v;
}

function metricCompare(a: number | undefined | null, b: number | undefined | null, dir: 'asc' | 'desc'): number {
  const am = a === undefined || a === null || Number.isNaN(a);
  const bm = b === undefined || b === null || Number.isNaN(b);
  if (am && bm) return 0;
  if (am) return 1;
  if (bm) return -1;
  if (a === b) return 0;
  return dir === 'asc' ? ((a as number) < (b as number) ? -1 : 1) : (a as number) > (b as number) ? -1 : 1;
}

export function rankEntries<E extends RankingEntry>(entries: readonly E[], keys: readonly RankingKey[] = DEFAULT_RANKING_KEYS): RankedEntry<E>[] {
  const cmpKeys = (a: E, b: E) => {
    for (const k of keys) {
      const c = metricCompare(a.metrics[k.metric], b.metrics[k.metric], k.direction ?? 'asc');
      if (c !== 0) return c;
    }
    return 0;
  };
  const sorted = entries.slice().sort((a, b) => {
    const c = cmpKeys(a, b);
    if (c !== 0) return c;
    const ta = timeOf(a.submittedAt);
    const tb = timeOf(b.submittedAt);
    if (ta !== tb) return ta < tb ? -1 : 1;
    return a.id < b.id ? -1 : a.id > b.id ? 1 : 0;
  });
  return sorted.map((entry, i) => ({ rank: i + 1, entry, tiedWithPrevious: i > 0 && cmpKeys(sorted[i - 1], entry) === 0 }));
}

export interface FrontPoint {
  id: string;
  /** Error metric, lower is better (e.g. RMSE on verifiable targets). */
  error: number | undefined | null;
  /** Declared cost (e.g. QPU or CPU seconds), lower is better; missing allowed. */
  cost: number | undefined | null;
}

export interface CostFront<P extends FrontPoint = FrontPoint> {
  /** Non-dominated points with known error and cost, sorted by cost then error then id. */
  front: P[];
  /** Dominated points with known error and cost. */
  dominated: P[];
  /** Points without a declared cost (or without an error): they cannot be placed on the
   * front and are listed apart rather than silently dropped or treated as free. */
  unplaced: P[];
}

const known = (v: number | undefined | null): v is number => v !== undefined && v !== null && Number.isFinite(v);

/** Entries not dominated in (error, cost): q dominates p when q.error <= p.error and
 * q.cost <= p.cost with at least one strict. Equal points are both on the front. */
export function accuracyCostFront<P extends FrontPoint>(points: readonly P[]): CostFront<P> {
  const placed = points.filter((p) => known(p.error) && known(p.cost));
  const unplaced = points.filter((p) => !(known(p.error) && known(p.cost)));
  placed.sort((a, b) => (a.cost as number) - (b.cost as number) || (a.error as number) - (b.error as number) || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
  const front: P[] = [];
  const dominated: P[] = [];
  let bestError = Infinity;
  let bestCost = NaN;
  for (const p of placed) {
    const e = p.error as number;
    const c = p.cost as number;
    // In cost order, p is dominated iff an earlier point has error < e, or error == e at lower cost.
    if (e < bestError || (e === bestError && c === bestCost)) {
      front.push(p);
      if (e < bestError) {
        bestError = e;
        bestCost = c;
      }
    } else dominated.push(p);
  }
  return { front, dominated, unplaced };
}
