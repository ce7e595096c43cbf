/**
 * Largest consistent subset (Cox 2007, Metrologia 44:187).
 * If the full set of usable results (u > 0) fails the chi-squared test at level alpha, drop
 * r = 1, 2, ... results; among the subsets of size N - r take the one with the smallest chi2
 * (about its own weighted mean); accept the first that passes.
 *
 * Tractability: for N <= exhaustiveLimit (default 20) every subset of the dropped count is
 * examined (at most 2^N subsets in all, O(1) each from running sums of centred values).
 * Above that a greedy fallback is used: drop, one at a time, the result whose removal gives the
 * smallest chi2, until the remainder passes. The greedy path is not guaranteed to find the
 * minimum-chi2 subset of each size; `method` says which path was taken.
 * Ties between subsets of equal chi2 go to the lexicographically first set of dropped indices.
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
  const usable = partitionByUncertainty(xs).weighted;
  const n = usable.length;
  if (full.test.consistent || n <= 1) {
    return { mean: full, subset: full.included, dropped: [], fullTest: full.test, method: 'none-needed' };
  }
  const c = full.value;
  const w = new Float64Array(n);
  const wx = new Float64Array(n);
  const wxx = new Float64Array(n);
  let Sw = 0;
  let Sx = 0;
  let Sxx = 0;
  for (let k = 0; k < n; k++) {
    const m = xs[usable[k]];
    const e = m.value - c;
    w[k] = 1 / (m.uncertainty * m.uncertainty);
    wx[k] = w[k] * e;
    wxx[k] = w[k] * e * e;
    Sw += w[k];
    Sx += wx[k];
    Sxx += wxx[k];
  }
  const chi2Of = (dw: number, dx: number, dxx: number) => {
    const sw = Sw - dw;
    const sx = Sx - dx;
    return Math.max(0, Sxx - dxx - (sx * sx) / sw);
  };
  const passes = (chi2: number, size: number) => size <= 1 || chiSquaredSurvival(chi2, size - 1) >= alpha;

  let dropped: number[] = [];
  let method: LcsResult['method'] = 'exhaustive';
  if (n <= limit) {
    for (let r = 1; r < n; r++) {
      let best = Infinity;
      let bestSet: number[] = [];
      const combo: number[] = [];
      const rec = (start: number, dw: number, dx: number, dxx: number) => {
        if (combo.length === r) {
          const v = chi2Of(dw, dx, dxx);
          if (v < best) {
            best = v;
            bestSet = combo.slice();
          }
          return;
        }
        const need = r - combo.length;
        for (let k = start; k <= n - need; k++) {
          combo.push(k);
          rec(k + 1, dw + w[k], dx + wx[k], dxx + wxx[k]);
          combo.pop();
        }
      };
      rec(0, 0, 0, 0);
      if (passes(best, n - r)) {
        dropped = bestSet;
        break;
      }
    }
  } else {
    method = 'greedy';
    const out = new Uint8Array(n);
    let dw = 0;
    let dx = 0;
    let dxx = 0;
    let size = n;
    while (size > 1 && !passes(chi2Of(dw, dx, dxx), size)) {
      let best = Infinity;
      let bestK = -1;
      for (let k = 0; k < n; k++) {
        if (out[k]) continue;
        const v = chi2Of(dw + w[k], dx + wx[k], dxx + wxx[k]);
        if (v < best) {
          best = v;
          bestK = k;
        }
      }
      out[bestK] = 1;
      dw += w[bestK];
      dx += wx[bestK];
      dxx += wxx[bestK];
      size--;
    }
    for (let k = 0; k < n; k++) if (out[k]) dropped.push(k);
  }
  const droppedIdx = dropped.map((k) => usable[k]);
  const drop = new Set(droppedIdx);
  const subset = usable.filter((i) => !drop.has(i));
  const mean = weightedMean(xs, { alpha, subset });
  return { mean, subset, dropped: droppedIdx, fullTest: full.test, method };
}

export { consistencyTest };
