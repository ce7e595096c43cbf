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

/** Scaled sqrt(a^2 + b^2) (no overflow or underflow of the squares). */
function hyp(a: number, b: number): number {
  const m = a > b ? a : b;
  return m === 0 ? 0 : m * Math.sqrt((a / m) * (a / m) + (b / m) * (b / m));
}

/** Weighted mean with weights (s0/sd_i)^2 relative to the smallest sd (each <= 1: an underflow to
 * 0 only drops a result whose weight is below 1e-308 of the best one), values relative to x0. */
function relWeighted(xs: readonly Measurement[], idx: readonly number[], sd: Float64Array, x0: number) {
  let s0 = Infinity;
  for (let i = 0; i < idx.length; i++) s0 = Math.min(s0, sd[i]);
  let sw = 0;
  let swe = 0;
  let pairs = 0; // sum_{i<j} w_i w_j
  for (let i = 0; i < idx.length; i++) {
    const r = s0 / sd[i];
    const w = r * r;
    pairs += w * sw;
    sw += w;
    swe += w * (xs[idx[i]].value - x0);
  }
  return { mu: x0 + swe / sw, se: s0 / Math.sqrt(sw), s0, sw, pairs };
}

/** sqrt(sum ((x_i - mu)/sd_i)^2) * s0 and the chi2 itself (Infinity when it overflows). */
function residualNorm(xs: readonly Measurement[], idx: readonly number[], sd: Float64Array, mu: number, s0: number): { norm: number; chi2: number } {
  const a = new Float64Array(idx.length);
  let A = 0;
  for (let i = 0; i < idx.length; i++) {
    a[i] = (xs[idx[i]].value - mu) * (s0 / sd[i]);
    A = Math.max(A, Math.abs(a[i]));
  }
  if (A === 0) return { norm: 0, chi2: 0 };
  let S = 0;
  for (let i = 0; i < idx.length; i++) S += (a[i] / A) * (a[i] / A);
  const norm = A * Math.sqrt(S);
  const q = norm / s0;
  return { norm, chi2: q * q };
}

/**
 * Random-effects estimate over the usable results of `xs` (value = y_i, uncertainty = sqrt(v_i)).
 * DerSimonian-Laird is computed in square-root form with weights relative to the smallest
 * uncertainty: tau = s0 sqrt(Q - df)/sqrt(C_rel) with s0 sqrt(Q) formed as a scaled norm, so that
 * uncertainties spanning any range the entry format allows (1e-300 beside 1e15) give finite mu,
 * SE and tau (no u^2 or 1/u^2 is formed). PM and REML iterate at unit scale as before and fall
 * back to the DL value when that overflows.
 */
export function randomEffects(xs: readonly Measurement[], method: TauMethod = 'DL'): RandomEffectsResult {
  const included = partitionByUncertainty(xs).weighted;
  const k = included.length;
  if (k === 0) {
    return { method, tau2: NaN, mu: NaN, se: NaN, Q: NaN, df: 0, I2: NaN, H2: NaN, fixedMu: NaN, fixedSe: NaN, included, residualChi2: NaN, iterations: 0, converged: true };
  }
  let ref = included[0];
  for (const j of included) if (xs[j].uncertainty < xs[ref].uncertainty) ref = j;
  const x0 = xs[ref].value;
  const u = Float64Array.from(included, (j) => xs[j].uncertainty);
  const fixed = relWeighted(xs, included, u, x0);
  const { norm, chi2: Q } = residualNorm(xs, included, u, fixed.mu, fixed.s0);
  const df = k - 1;
  const Crel = fixed.sw > 0 ? (2 * fixed.pairs) / fixed.sw : 0; // C s0^2
  let tau = 0;
  if (k > 1 && Crel > 0 && Q > df) {
    tau = (norm * Math.sqrt(1 - df / Q)) / Math.sqrt(Crel);
    if (!Number.isFinite(tau)) {
      let lo = Infinity;
      let hi = -Infinity;
      for (const j of included) { lo = Math.min(lo, xs[j].value); hi = Math.max(hi, xs[j].value); }
      tau = hi - lo;
    }
  }
  let tau2 = tau * tau;
  let iterations = 0;
  let converged = true;
  if (method !== 'DL') {
    // unit scale: s = the smallest uncertainty, values relative to that result's value
    const s = fixed.s0;
    const y = Float64Array.from(included, (j) => (xs[j].value - x0) / s);
    const v = Float64Array.from(included, (j) => (xs[j].uncertainty / s) ** 2);
    const tauDLunit = (tau / s) * (tau / s);
    const r = method === 'PM' ? pauleMandelTau2(y, v) : remlTau2(y, v, tauDLunit);
    const t = Math.sqrt(r.tau2) * s;
    if (Number.isFinite(t) && Number.isFinite(r.tau2)) {
      tau = t;
      tau2 = r.tau2 * s * s;
      ({ iterations, converged } = r);
    } else converged = false;
  }
  const sdRe = Float64Array.from(u, (ui) => hyp(ui, tau));
  const re = relWeighted(xs, included, sdRe, x0);
  // s^2 = df/C (metafor's typical within-study variance); I^2 = tau^2/(tau^2 + s^2)
  const sTyp = k > 1 && Crel > 0 ? (Math.sqrt(df) * fixed.s0) / Math.sqrt(Crel) : NaN;
  const ratio = tau / sTyp; // tau/s
  const I2 = k > 1 ? (Number.isNaN(ratio) ? NaN : tau === 0 ? 0 : 100 / (1 + 1 / (ratio * ratio))) : NaN;
  return {
    method,
    tau2,
    mu: re.mu,
    se: re.se,
    Q,
    df,
    I2,
    H2: k > 1 ? 1 + ratio * ratio : NaN,
    fixedMu: fixed.mu,
    fixedSe: fixed.se,
    included,
    residualChi2: residualNorm(xs, included, sdRe, re.mu, re.s0).chi2,
    iterations,
    converged,
  };
}
