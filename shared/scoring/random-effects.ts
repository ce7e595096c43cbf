/**
 * Random-effects meta-analysis: x_i = mu + b_i + e_i, b_i ~ N(0, tau^2), e_i ~ N(0, u_i^2).
 * tau^2 by DerSimonian-Laird (1986, Control. Clin. Trials 7:177), Paule-Mandel (solved by
 * bisection to full double precision) or REML (Fisher scoring to |step| < 1e-14 (1 + tau^2)).
 * Results with u = 0 or invalid values are left out (see weighted-mean.ts).
 * I^2 follows metafor: I^2 = 100 tau^2/(tau^2 + s^2), s^2 = (k - 1)/(sum w - sum w^2/sum w);
 * H^2 = (tau^2 + s^2)/s^2. For DL this is (Q - (k - 1))/Q.
 * C = sum w - sum w^2/sum w is formed as 2 sum_{i<j} w_i w_j / sum w (no cancellation when one
 * weight dominates, e.g. u = 1e-12 beside u = 0.01).
 * Scale: randomEffects works on (x_i - x_ref)/s and u_i/s with s the smallest uncertainty and maps
 * the results back (mu, SE scale with s, tau^2 with s^2), so it is scale-equivariant and finite
 * for any u > 0 the entry format allows (tau^2 itself underflows to 0 below about s = 1e-154).
 */
import { partitionByUncertainty } from './weighted-mean';
import type { Measurement } from './types';

export type TauMethod = 'DL' | 'PM' | 'REML';

export interface RandomEffectsResult {
  method: TauMethod;
  tau2: number;
  mu: number;
  /** (sum 1/(u_i^2 + tau^2))^(-1/2). */
  se: number;
  /** Cochran's Q about the fixed-effect mean, df = k - 1. */
  Q: number;
  df: number;
  /** Percent. */
  I2: number;
  H2: number;
  /** Fixed-effect (weighted) mean and its standard error. */
  fixedMu: number;
  fixedSe: number;
  /** Indices used. */
  included: number[];
  /** sum (x_i - mu)^2/(u_i^2 + tau^2) over the included results (the generalised Q at tau^2),
   * computed at unit scale. */
  residualChi2: number;
  iterations: number;
  converged: boolean;
}

function weightedMeanSe(y: Float64Array, v: Float64Array, tau2: number): { mu: number; sw: number } {
  let sw = 0;
  let swy = 0;
  for (let i = 0; i < y.length; i++) {
    const w = 1 / (v[i] + tau2);
    sw += w;
    swy += w * y[i];
  }
  return { mu: swy / sw, sw };
}

/** Generalised Q(tau2) = sum w_i* (y_i - mu*)^2 with w_i* = 1/(v_i + tau2). */
function generalisedQ(y: Float64Array, v: Float64Array, tau2: number): number {
  const { mu } = weightedMeanSe(y, v, tau2);
  let q = 0;
  for (let i = 0; i < y.length; i++) q += ((y[i] - mu) * (y[i] - mu)) / (v[i] + tau2);
  return q;
}

/** tau^2 by Paule-Mandel: root of Q(tau2) = k - 1 (Q decreasing in tau2), 0 if Q(0) <= k - 1. */
export function pauleMandelTau2(y: Float64Array, v: Float64Array): { tau2: number; iterations: number; converged: boolean } {
  const k = y.length;
  if (k < 2) return { tau2: 0, iterations: 0, converged: true };
  const f = (t: number) => generalisedQ(y, v, t) - (k - 1);
  if (f(0) <= 0) return { tau2: 0, iterations: 0, converged: true };
  let lo = 0;
  let hi = 0;
  let mean = 0;
  for (let i = 0; i < k; i++) mean += y[i] / k;
  for (let i = 0; i < k; i++) hi += ((y[i] - mean) ** 2) / (k - 1);
  hi = Math.max(hi, 1e-300);
  let it = 0;
  while (f(hi) > 0 && it < 2000) {
    lo = hi;
    hi *= 2;
    it++;
  }
  for (let i = 0; i < 2000; i++) {
    const mid = 0.5 * (lo + hi);
    if (mid <= lo || mid >= hi) return { tau2: mid, iterations: it + i, converged: true };
    if (f(mid) > 0) lo = mid;
    else hi = mid;
  }
  return { tau2: 0.5 * (lo + hi), iterations: it + 2000, converged: false };
}

/** tau^2 by REML (Fisher scoring, equivalently the fixed point
 * tau2 = sum w^2((y - mu)^2 - v)/sum w^2 + 1/sum w, truncated at 0). */
export function remlTau2(y: Float64Array, v: Float64Array, start: number, maxIter = 10_000): { tau2: number; iterations: number; converged: boolean } {
  const k = y.length;
  if (k < 2) return { tau2: 0, iterations: 0, converged: true };
  // convergence is judged against the variances' own scale, not an absolute 1e-14
  let vmin = Infinity;
  for (let i = 0; i < k; i++) vmin = Math.min(vmin, v[i]);
  let tau2 = Math.max(0, start);
  for (let it = 1; it <= maxIter; it++) {
    const { mu, sw } = weightedMeanSe(y, v, tau2);
    let sw2 = 0;
    let num = 0;
    for (let i = 0; i < k; i++) {
      const w = 1 / (v[i] + tau2);
      sw2 += w * w;
      num += w * w * ((y[i] - mu) ** 2 - v[i]);
    }
    const next = Math.max(0, num / sw2 + 1 / sw);
    if (Math.abs(next - tau2) <= 1e-14 * (vmin + tau2)) return { tau2: next, iterations: it, converged: true };
    tau2 = next;
  }
  return { tau2, iterations: maxIter, converged: false };
}

/** Random-effects estimate over the usable results of `xs` (value = y_i, uncertainty = sqrt(v_i)). */
export function randomEffects(xs: readonly Measurement[], method: TauMethod = 'DL'): RandomEffectsResult {
  const included = partitionByUncertainty(xs).weighted;
  const k = included.length;
  if (k === 0) {
    return { method, tau2: NaN, mu: NaN, se: NaN, Q: NaN, df: 0, I2: NaN, H2: NaN, fixedMu: NaN, fixedSe: NaN, included, residualChi2: NaN, iterations: 0, converged: true };
  }
  // unit scale: s = the smallest uncertainty, values relative to that result's value
  let ref = included[0];
  for (const j of included) if (xs[j].uncertainty < xs[ref].uncertainty) ref = j;
  const s = xs[ref].uncertainty;
  const x0 = xs[ref].value;
  const y = new Float64Array(k);
  const v = new Float64Array(k);
  included.forEach((j, i) => {
    y[i] = (xs[j].value - x0) / s;
    const r = xs[j].uncertainty / s;
    v[i] = r * r;
  });
  let sw = 0;
  let pairs = 0; // sum_{i<j} w_i w_j
  let swy = 0;
  for (let i = 0; i < k; i++) {
    const w = 1 / v[i];
    pairs += w * sw;
    sw += w;
    swy += w * y[i];
  }
  const fixedMu = swy / sw;
  let Q = 0;
  for (let i = 0; i < k; i++) Q += ((y[i] - fixedMu) ** 2) / v[i];
  const df = k - 1;
  const C = (2 * pairs) / sw;
  const tauDL = k > 1 && C > 0 ? Math.max(0, (Q - df) / C) : 0;
  let tau2 = tauDL;
  let iterations = 0;
  let converged = true;
  if (method === 'PM') ({ tau2, iterations, converged } = pauleMandelTau2(y, v));
  else if (method === 'REML') ({ tau2, iterations, converged } = remlTau2(y, v, tauDL));
  const re = weightedMeanSe(y, v, tau2);
  const s2 = k > 1 && C > 0 ? df / C : NaN;
  const I2 = k > 1 ? (100 * tau2) / (tau2 + s2) : NaN;
  return {
    method,
    tau2: tau2 * s * s,
    mu: x0 + s * re.mu,
    se: s / Math.sqrt(re.sw),
    Q,
    df,
    I2: Number.isNaN(I2) ? NaN : tau2 === 0 ? 0 : I2,
    H2: k > 1 ? (tau2 + s2) / s2 : NaN,
    fixedMu: x0 + s * fixedMu,
    fixedSe: s / Math.sqrt(sw),
    included,
    residualChi2: generalisedQ(y, v, tau2),
    iterations,
    converged,
  };
}
