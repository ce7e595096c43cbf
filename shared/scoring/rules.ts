/**
 * The scoring rules of the standings, in one place (the "How scoring works" page states them and
 * reads its numbers from here). Changing any rule below changes SCORING_RULES_VERSION; the server
 * then recomputes every challenge's standings and its history records "scoring rules X -> Y".
 *
 * 1. Exactness: an estimate with u = 0 is exact and covered when |x - r| <= EXACT_TOLERANCE *
 *    B, B the observable's bound (sum of |coefficients|); two u = 0 estimates agree when they
 *    differ by no more than that.
 * 2. Scores (lower is better; both are proper, proper.ts):
 *    - target with an exact reference r: CRPS of N(x, u^2) censored to [-B, B] (u = 0: |x - r|);
 *    - target without one but with a consensus N(c, uc^2): the CRPS averaged over the consensus
 *      distribution, capped at 2B;
 *    - a ranked target the entry did not answer scores 2B, the worst any answer can score.
 * 3. Ranked targets: every target with an exact reference, and every target without one that has
 *    a consensus (at least MIN_INDEPENDENT_TEAMS teams answered it); targets a moderator marked
 *    disputed are not ranked. Coverage = answered ranked targets / ranked targets.
 * 4. Consensus: one estimate per team per target (the team's most recently submitted entry that
 *    answers the target; equal times: the smaller entry id); the house baseline never counts.
 * 5. The house baseline is a reference row: scored for display (its truncation bound, capped at
 *    B, is a bound, not a standard uncertainty: it is scored as u = 0), never ranked.
 * 6. Rank uncertainty: a bootstrap over the ranked targets (BOOTSTRAP_SEED, up to
 *    BOOTSTRAP_REPLICATES resamples) gives each entry the central 95% interval of its rank.
 */
import { createRng } from './prng';

export const SCORING_RULES_VERSION = '2026-12.1';
/** The previous rules: RMSE / median |d|/U ranking, every entry in the consensus. */
export const PREVIOUS_SCORING_RULES_VERSION = '2026-11.0';

/** Relative tolerance for exact answers: |x - r| <= EXACT_TOLERANCE * B. */
export const EXACT_TOLERANCE = 1e-10;
export const MIN_INDEPENDENT_TEAMS = 2;
export const BOOTSTRAP_REPLICATES = 200;
export const BOOTSTRAP_SEED = 20261205;
/** Fewest resamples, whatever the size of the challenge. */
export const BOOTSTRAP_MIN_REPLICATES = 20;
/** Work limit of the bootstrap (entries x targets x replicates), so that big challenges stay fast. */
export const BOOTSTRAP_WORK_LIMIT = 2_000_000;
/** Near-copies: values equal to NEAR_COPY_RELATIVE (relative) on more than NEAR_COPY_FRACTION of
 * at least NEAR_COPY_MIN_SHARED shared targets. */
export const NEAR_COPY_RELATIVE = 1e-6;
export const NEAR_COPY_FRACTION = 0.5;
export const NEAR_COPY_MIN_SHARED = 3;

/** B of a target: the observable's bound, 1 when unknown or not positive. */
export const boundOf = (b: number | null | undefined): number => (typeof b === 'number' && Number.isFinite(b) && b > 0 ? b : 1);
export const exactTolerance = (bound: number | null | undefined): number => EXACT_TOLERANCE * boundOf(bound);

/** Whether |a - b| is within the exact tolerance. */
export const withinTolerance = (a: number, b: number, bound: number | null | undefined): boolean => Math.abs(a - b) <= exactTolerance(bound);

export interface CandidateEstimate { entryId: string; teamId: string; submittedAt: string; value: number; uncertainty: number }

/** Rule 4: one estimate per team (its most recent entry; equal times, the smaller id), in a
 * canonical order (by team id) so that nothing downstream depends on the order of entries. */
export function onePerTeam<C extends CandidateEstimate>(cands: readonly C[]): C[] {
  const best = new Map<string, C>();
  for (const c of cands) {
    const b = best.get(c.teamId);
    if (!b || c.submittedAt > b.submittedAt || (c.submittedAt === b.submittedAt && c.entryId < b.entryId)) best.set(c.teamId, c);
  }
  return [...best.values()].sort((a, b) => (a.teamId < b.teamId ? -1 : a.teamId > b.teamId ? 1 : 0));
}

export interface NearCopyInput { id: string; teamId: string; estimates: ReadonlyMap<string, { value: number }> }
export interface NearCopy { a: string; b: string; teamA: string; teamB: string; shared: number; equal: number }

/**
 * Pairs of entries from different teams whose values are equal to NEAR_COPY_RELATIVE on most
 * shared targets: candidates for review (two honest exact methods match too, so this flags, it
 * does not exclude). Pairs are ordered (a < b by id) and sorted; O(entries^2 x targets).
 */
export function findNearCopies(list: readonly NearCopyInput[], options: { relative?: number; fraction?: number; minShared?: number } = {}): NearCopy[] {
  const rel = options.relative ?? NEAR_COPY_RELATIVE;
  const frac = options.fraction ?? NEAR_COPY_FRACTION;
  const minShared = options.minShared ?? NEAR_COPY_MIN_SHARED;
  const sorted = [...list].sort((x, y) => (x.id < y.id ? -1 : x.id > y.id ? 1 : 0));
  // values by target index (NaN: not answered), so that the pair loop reads arrays, not maps
  const keyIdx = new Map<string, number>();
  for (const e of sorted) for (const k of e.estimates.keys()) if (!keyIdx.has(k)) keyIdx.set(k, keyIdx.size);
  const nK = keyIdx.size;
  const vals = sorted.map((e) => {
    const a = new Float64Array(nK).fill(NaN);
    for (const [k, v] of e.estimates) a[keyIdx.get(k)!] = v.value;
    return a;
  });
  const out: NearCopy[] = [];
  for (let i = 0; i < sorted.length; i++) {
    for (let j = i + 1; j < sorted.length; j++) {
      if (sorted[i].teamId === sorted[j].teamId) continue;
      const A = vals[i];
      const B = vals[j];
      let shared = 0;
      let equal = 0;
      for (let k = 0; k < nK; k++) {
        const a = A[k];
        const b = B[k];
        if (!Number.isFinite(a) || !Number.isFinite(b)) continue;
        shared++;
        const scale = Math.max(Math.abs(a), Math.abs(b));
        if (Math.abs(a - b) <= rel * scale) equal++;
      }
      if (shared >= minShared && equal > frac * shared) out.push({ a: sorted[i].id, b: sorted[j].id, teamA: sorted[i].teamId, teamB: sorted[j].teamId, shared, equal });
    }
  }
  return out;
}

/**
 * Rule 6: rank intervals from a bootstrap over targets. scores[e][t] is entry e's score on ranked
 * target t (missing already filled with the worst case); order(a, b) breaks equal means (the
 * standings' own tie-break). Returns, per entry, the 2.5% and 97.5% quantiles of its rank over the
 * resamples. Deterministic (fixed seed); the resample count shrinks on very large challenges
 * (BOOTSTRAP_WORK_LIMIT) and is returned.
 */
export function bootstrapRankIntervals(scores: readonly Float64Array[], order: (a: number, b: number) => number): { intervals: [number, number][]; replicates: number } {
  const nE = scores.length;
  const nT = nE ? scores[0].length : 0;
  if (nE === 0) return { intervals: [], replicates: 0 };
  if (nT === 0) return { intervals: scores.map(() => [1, nE] as [number, number]), replicates: 0 };
  const reps = Math.max(BOOTSTRAP_MIN_REPLICATES, Math.min(BOOTSTRAP_REPLICATES, Math.floor(BOOTSTRAP_WORK_LIMIT / (nE * nT))));
  const rng = createRng(BOOTSTRAP_SEED);
  const counts = new Int32Array(nT);
  const means = new Float64Array(nE);
  const idx = Array.from({ length: nE }, (_, i) => i);
  const ranks = scores.map(() => new Int32Array(reps));
  // the drawn targets of a replicate, in ascending order with their counts (each entry's sum runs
  // over them in the same order as over all targets, so the means are the same numbers)
  const drawn = new Int32Array(nT);
  const times = new Float64Array(nT);
  for (let r = 0; r < reps; r++) {
    counts.fill(0);
    for (let k = 0; k < nT; k++) counts[Math.floor(rng.uniform() * nT)]++;
    let nd = 0;
    for (let t = 0; t < nT; t++) if (counts[t]) { drawn[nd] = t; times[nd++] = counts[t]; }
    for (let e = 0; e < nE; e++) {
      const s = scores[e];
      let sum = 0;
      for (let k = 0; k < nd; k++) sum += times[k] * s[drawn[k]];
      means[e] = sum / nT;
    }
    idx.sort((a, b) => means[a] - means[b] || order(a, b));
    idx.forEach((e, pos) => (ranks[e][r] = pos + 1));
  }
  const q = (arr: Int32Array, p: number) => {
    const a = Int32Array.from(arr).sort();
    return a[Math.min(a.length - 1, Math.max(0, Math.round(p * (a.length - 1))))];
  };
  return { intervals: ranks.map((r) => [q(r, 0.025), q(r, 0.975)] as [number, number]), replicates: reps };
}
