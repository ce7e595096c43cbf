/**
 * Largest consistent subset (Cox 2007, Metrologia 44:187).
 * If the full set of usable results (u > 0) fails the chi-squared test at level alpha, drop
 * r = 1, 2, ... results; among the subsets of size N - r take the one with the smallest chi2
 * (about its own weighted mean); accept the first that passes.
 *
 * Tractability: for N <= exhaustiveLimit (default 20) every subset of the dropped count is
 * examined (at most 2^N subsets in all): the kept subsets are enumerated depth-first with weighted
 * Welford updates (W += w, m += w (x - m)/W, chi2 += w (x - m)^2 W_old/W), which add only
 * non-negative terms, so a subset's chi2 carries no cancellation from the other results however
 * far they lie (two exact methods that disagree by 1e-3 at u = 1e-12 give chi2 ~ 1e18 for the
 * full set and still chi2 ~ 1 for the consistent part); chi2 only grows as results are added, so
 * branches already worse than the best are cut.
 * Above that a greedy fallback is used: drop, one at a time, the result whose removal gives the
 * smallest chi2 (the largest decrease w_k e_k^2 W/(W - w_k) about the current mean), until the
 * remainder passes; the remainder's chi2 is recomputed in two passes after every drop. The greedy
 * path is not guaranteed to find the minimum-chi2 subset of each size; `method` says which path was
 * taken. Weights are relative to the smallest uncertainty, (u_min/u_i)^2, as in weighted-mean.ts.
 * Ties between subsets of equal chi2 go to the lexicographically first set of dropped positions in
 * the canonical order (uncertainty, then value): the more precise results are kept, whatever the
 * order of the inputs.
 */
import { DEFAULT_ALPHA, consistencyTest, partitionByUncertainty, weightedMean, type WeightedMeanResult } from './weighted-mean';
import { chiSquaredSurvival } from './special';
import type { ConsistencyTest, Measurement } from './types';

export interface LcsOptions {
  alpha?: number;
  exhaustiveLimit?: number;
  /** weightedMean(xs) already computed by the caller (saves one pass). */
  full?: WeightedMeanResult;
}

export interface LcsResult {
  /** Weighted mean over the accepted subset. */
  mean: WeightedMeanResult;
  /** Indices (into the input) of the accepted subset. */
  subset: number[];
  /** Usable indices dropped from the accepted subset (in increasing order). */
  dropped: number[];
  /** Test of the full usable set before any drop. */
  fullTest: ConsistencyTest;
  method: 'none-needed' | 'exhaustive' | 'greedy';
}

export function largestConsistentSubset(xs: readonly Measurement[], options: LcsOptions = {}): LcsResult {
  const alpha = options.alpha ?? DEFAULT_ALPHA;
  const limit = options.exhaustiveLimit ?? 20;
  const full = options.full ?? weightedMean(xs, { alpha });
  // canonical order (smallest uncertainty first, then value, then index) so that ties between
  // subsets of equal chi2 do not depend on the order of the inputs: among equal chi2 the subset
  // that keeps the more precise results wins (e.g. of two discrepant results, the smaller u)
  const usable = partitionByUncertainty(xs).weighted.sort((a, b) => xs[a].uncertainty - xs[b].uncertainty || xs[a].value - xs[b].value || a - b);
  const n = usable.length;
  if (full.test.consistent || n <= 1) {
    return { mean: full, subset: full.included, dropped: [], fullTest: full.test, method: 'none-needed' };
  }
  // unit scale: weights (u_min/u_i)^2 <= 1, values (x_i - c)/u_min, so chi2 = sum w (z - m)^2
  let u0 = Infinity;
  for (const i of usable) u0 = Math.min(u0, xs[i].uncertainty);
  const c = full.value;
  const w = new Float64Array(n);
  const z = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const m = xs[usable[k]];
    const r = u0 / m.uncertainty;
    w[k] = r * r;
    // clamped: a result more than 1e150 u_min away fails any test anyway, and (z - m)^2 stays finite
    const zk = (m.value - c) / u0;
    z[k] = zk > 1e150 ? 1e150 : zk < -1e150 ? -1e150 : zk;
  }
  const passes = (chi2: number, size: number) => size <= 1 || chiSquaredSurvival(chi2, size - 1) >= alpha;

  let dropped: number[] = [];
  let method: LcsResult['method'] = 'exhaustive';
  if (n <= limit) {
    // Welford state after `depth` kept results
    const W = new Float64Array(n + 1);
    const M = new Float64Array(n + 1);
    const Q = new Float64Array(n + 1);
    const combo = new Int32Array(n);
    const droppedOf = (keep: ArrayLike<number>, size: number): number[] => {
      const out: number[] = [];
      let j = 0;
      for (let k = 0; k < n; k++) {
        if (j < size && keep[j] === k) j++;
        else out.push(k);
      }
      return out;
    };
    const lexLess = (a: readonly number[], b: readonly number[]) => {
      for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return a[i] < b[i];
      return false;
    };
    for (let r = 1; r < n; r++) {
      const size = n - r;
      let best = Infinity;
      let bestDrop: number[] | null = null;
      const rec = (start: number, depth: number): void => {
        if (depth === size) {
          const v = Q[size];
          if (v < best) {
            best = v;
            bestDrop = droppedOf(combo, size);
          } else if (v === best && bestDrop) {
            const d = droppedOf(combo, size);
            if (lexLess(d, bestDrop)) bestDrop = d;
          }
          return;
        }
        const W0 = W[depth];
        const M0 = M[depth];
        const Q0 = Q[depth];
        for (let k = start; k <= n - (size - depth); k++) {
          const W1 = W0 + w[k];
          const d = z[k] - M0;
          const q = W1 > 0 ? Q0 + w[k] * d * d * (W0 / W1) : Q0;
          if (q > best) continue; // chi2 never decreases as results are added
          W[depth + 1] = W1;
          M[depth + 1] = W1 > 0 ? M0 + d * (w[k] / W1) : M0;
          Q[depth + 1] = q;
          combo[depth] = k;
          rec(k + 1, depth + 1);
        }
      };
      rec(0, 0);
      if (bestDrop && passes(best, size)) {
        dropped = bestDrop;
        break;
      }
    }
  } else {
    method = 'greedy';
    const out = new Uint8Array(n);
    let size = n;
    const prefix = new Float64Array(n + 1);
    for (;;) {
      // two-pass weighted mean and chi2 of the current set
      let sw = 0;
      let swz = 0;
      for (let k = 0; k < n; k++) if (!out[k]) { sw += w[k]; swz += w[k] * z[k]; }
      let m = swz / sw;
      let corr = 0;
      for (let k = 0; k < n; k++) if (!out[k]) corr += w[k] * (z[k] - m);
      m += corr / sw;
      let chi2 = 0;
      for (let k = 0; k < n; k++) if (!out[k]) chi2 += w[k] * (z[k] - m) * (z[k] - m);
      if (size <= 1 || passes(chi2, size)) break;
      // removal of k lowers chi2 by w_k e_k^2 W/(W - w_k); W - w_k as a sum of the others
      for (let k = 0; k < n; k++) prefix[k + 1] = prefix[k] + (out[k] ? 0 : w[k]);
      let suffix = 0;
      const others = new Float64Array(n);
      for (let k = n - 1; k >= 0; k--) {
        others[k] = prefix[k] + suffix;
        if (!out[k]) suffix += w[k];
      }
      let bestK = -1;
      let bestD = -Infinity;
      for (let k = 0; k < n; k++) {
        if (out[k]) continue;
        const e = z[k] - m;
        const D = others[k] > 0 ? (w[k] * e * e * sw) / others[k] : 0;
        if (D > bestD) {
          bestD = D;
          bestK = k;
        }
      }
      out[bestK] = 1;
      size--;
    }
    for (let k = 0; k < n; k++) if (out[k]) dropped.push(k);
  }
  const droppedIdx = dropped.map((k) => usable[k]);
  const drop = new Set(droppedIdx);
  const subset = usable.filter((i) => !drop.has(i)).sort((a, b) => a - b);
  droppedIdx.sort((a, b) => a - b);
  const mean = weightedMean(xs, { alpha, subset });
  return { mean, subset, dropped: droppedIdx, fullTest: full.test, method };
}

export { consistencyTest };
