/**
 * Weighted mean with chi-squared consistency test (Cox 2002, Metrologia 39:589, procedure A).
 *
 * Zero uncertainties: a result with u = 0 (kind 'none', or a claimed exact value) cannot be given a
 * weight 1/u^2 without letting it overrule every other result, so weighted procedures leave it out
 * (it is listed in `excluded` and still gets a degree of equivalence as an excluded result).
 * Results with a non-finite value or a negative/non-finite u are left out likewise.
 * If no result has u > 0, the value is the arithmetic mean of the finite values, its uncertainty
 * the standard error of that mean (0 for a single value), chi2 and p are NaN, and the set counts
 * as consistent only when all values are identical.
 *
 * Scale: the weights are taken relative to the smallest uncertainty, w_i = (u_min/u_i)^2 <= 1, and
 * chi2 terms as ((x_i - y)/u_i)^2, so that no u_i^2 or 1/u_i^2 is formed: uncertainties down to the
 * smallest doubles (the entry format allows any u >= 0) give finite results, and the results are
 * equivariant (to rounding) under a common scaling of values and uncertainties.
 */
import { chiSquaredSurvival } from './special';
import type { ConsistencyTest, Measurement } from './types';

export const DEFAULT_ALPHA = 0.05;

/** Build the consistency test record from chi2 and nu. */
export function consistencyTest(chi2: number, nu: number, alpha = DEFAULT_ALPHA): ConsistencyTest {
  const p = Number.isNaN(chi2) ? NaN : chiSquaredSurvival(chi2, nu);
  return {
    chi2,
    nu,
    p,
    birgeRatio: nu > 0 ? Math.sqrt(chi2 / nu) : NaN,
    consistent: Number.isNaN(p) ? true : p >= alpha,
  };
}

/** Index sets of results usable with weights (u > 0, finite), with zero u, and invalid. */
export function partitionByUncertainty(xs: readonly Measurement[]): { weighted: number[]; zeroU: number[]; invalid: number[] } {
  const weighted: number[] = [];
  const zeroU: number[] = [];
  const invalid: number[] = [];
  xs.forEach((m, i) => {
    if (!Number.isFinite(m.value) || !(m.uncertainty >= 0) || !Number.isFinite(m.uncertainty)) invalid.push(i);
    else if (m.uncertainty === 0) zeroU.push(i);
    else weighted.push(i);
  });
  return { weighted, zeroU, invalid };
}

export interface WeightedMeanResult {
  value: number;
  /** u(y) = (sum 1/u_i^2)^(-1/2). */
  uncertainty: number;
  /** R_B u(y) when R_B > 1, otherwise u(y) (scale-factor rule, memory). */
  scaledUncertainty: number;
  test: ConsistencyTest;
  /** Indices (into the input) that entered the mean. */
  included: number[];
  /** Indices left out (zero or invalid uncertainty, or, with `subset`, not in it). */
  excluded: number[];
}

function complementOf(n: number, inIdx: Set<number> | null): number[] {
  const out: number[] = [];
  if (inIdx) for (let i = 0; i < n; i++) if (!inIdx.has(i)) out.push(i);
  return out;
}

/** Chi2 of a set of results about a given value y, with an optional extra variance tau2:
 * sum (x_i - y)^2/(u_i^2 + tau2), each term formed as a squared ratio (no u^2 that could underflow). */
export function chi2About(xs: readonly Measurement[], idx: readonly number[], y: number, tau2 = 0): number {
  let c = 0;
  const tau = Math.sqrt(tau2);
  for (const i of idx) {
    const e = xs[i].value - y;
    const u = xs[i].uncertainty;
    let d = u;
    if (tau > 0) {
      const m = Math.max(u, tau);
      d = m * Math.sqrt((u / m) * (u / m) + (tau / m) * (tau / m));
    }
    const r = e / d;
    c += r * r;
  }
  return c;
}

/** Cox procedure A over all usable results, or over `subset` (indices) when given. */
export function weightedMean(xs: readonly Measurement[], options: { alpha?: number; subset?: readonly number[]; exactTolerance?: number } = {}): WeightedMeanResult {
  const alpha = options.alpha ?? DEFAULT_ALPHA;
  const part = partitionByUncertainty(xs);
  let idx = part.weighted;
  if (options.subset) {
    const s = new Set(options.subset);
    idx = idx.filter((i) => s.has(i));
  }
  const inIdx = idx.length === xs.length ? null : new Set(idx);
  if (idx.length === 0) {
    // Fallback: no weights available.
    let pool = part.zeroU;
    if (options.subset) {
      const s = new Set(options.subset);
      pool = pool.filter((i) => s.has(i));
    }
    const n = pool.length;
    const excluded = xs.map((_, i) => i).filter((i) => !pool.includes(i));
    if (n === 0) {
      return { value: NaN, uncertainty: NaN, scaledUncertainty: NaN, test: { chi2: NaN, nu: 0, p: NaN, birgeRatio: NaN, consistent: true }, included: [], excluded };
    }
    const mean = pool.reduce((a, i) => a + xs[i].value, 0) / n;
    let ss = 0;
    for (const i of pool) ss += (xs[i].value - mean) ** 2;
    const sem = n > 1 ? Math.sqrt(ss / (n - 1) / n) : 0;
    // equal within the exact tolerance (rules.ts): the spread of the values is at most tol
    const tol = options.exactTolerance ?? 0;
    let lo = Infinity;
    let hi = -Infinity;
    for (const i of pool) { lo = Math.min(lo, xs[i].value); hi = Math.max(hi, xs[i].value); }
    const identical = hi - lo <= tol;
    return {
      value: mean,
      uncertainty: sem,
      scaledUncertainty: sem,
      test: { chi2: identical ? 0 : NaN, nu: n - 1, p: identical ? 1 : NaN, birgeRatio: identical && n > 1 ? 0 : NaN, consistent: identical },
      included: pool.slice(),
      excluded,
    };
  }
  // weights relative to the smallest uncertainty, values relative to that result's value
  let ref = idx[0];
  for (const i of idx) if (xs[i].uncertainty < xs[ref].uncertainty) ref = i;
  const u0 = xs[ref].uncertainty;
  const x0 = xs[ref].value;
  let sw = 0;
  let swx = 0;
  for (const i of idx) {
    const r = u0 / xs[i].uncertainty;
    const w = r * r;
    sw += w;
    swx += w * (xs[i].value - x0);
  }
  const y = x0 + swx / sw;
  const uy = u0 / Math.sqrt(sw);
  const chi2 = chi2About(xs, idx, y);
  const test = consistencyTest(chi2, idx.length - 1, alpha);
  const rb = test.birgeRatio;
  return {
    value: y,
    uncertainty: uy,
    scaledUncertainty: rb > 1 ? rb * uy : uy,
    test,
    included: idx.slice(),
    excluded: complementOf(xs.length, inIdx),
  };
}
