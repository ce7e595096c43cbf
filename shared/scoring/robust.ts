/**
 * Robust location estimators: the median with Monte Carlo uncertainty (Cox 2002, procedure B)
 * and ISO 13528 Algorithm A.
 */
import { createRng } from './prng';
import type { Measurement } from './types';

/** Median of an array (mean of the two middle values for even length); NaN for empty input. */
export function median(values: ArrayLike<number>): number {
  const n = values.length;
  if (n === 0) return NaN;
  const a = Float64Array.from(values as ArrayLike<number>).sort();
  const h = n >> 1;
  return n % 2 ? a[h] : 0.5 * (a[h - 1] + a[h]);
}

export interface MedianOptions {
  /** Monte Carlo trials (default 10,000). */
  trials?: number;
  /** PRNG seed (default 20020901), so results are reproducible. */
  seed?: number;
}

export interface MedianResult {
  value: number;
  /** Standard deviation of the simulated medians. */
  uncertainty: number;
  /** Per input: standard deviation of the simulated x_i - median (the degree of equivalence
   * uncertainty, correlation with the median included). */
  doeUncertainties: number[];
  /** Indices used (finite values with u >= 0). */
  included: number[];
  trials: number;
  seed: number;
}

/** Cox procedure B: y = median(x_i); u(y) from M draws x_i ~ N(x_i, u_i^2) (u_i = 0 allowed). */
export function medianWithUncertainty(xs: readonly Measurement[], options: MedianOptions = {}): MedianResult {
  const trials = options.trials ?? 10_000;
  const seed = options.seed ?? 20020901;
  const included: number[] = [];
  xs.forEach((m, i) => {
    if (Number.isFinite(m.value) && m.uncertainty >= 0 && Number.isFinite(m.uncertainty)) included.push(i);
  });
  const n = included.length;
  const doe = new Array<number>(xs.length).fill(NaN);
  if (n === 0) return { value: NaN, uncertainty: NaN, doeUncertainties: doe, included, trials, seed };
  // draws are made in a canonical order (by value, then uncertainty), not the order of the
  // inputs, so that the Monte Carlo uncertainty does not depend on it; identical inputs share
  // their degree-of-equivalence uncertainty (averaged below)
  const canon = included.slice().sort((a, b) => xs[a].value - xs[b].value || xs[a].uncertainty - xs[b].uncertainty);
  const x = canon.map((i) => xs[i].value);
  const u = canon.map((i) => xs[i].uncertainty);
  const value = median(x);
  const rng = createRng(seed);
  const sample = new Float64Array(n);
  const sorted = new Float64Array(n);
  let m1 = 0;
  let m2 = 0;
  const d1 = new Float64Array(n);
  const d2 = new Float64Array(n);
  const h = n >> 1;
  for (let t = 0; t < trials; t++) {
    for (let k = 0; k < n; k++) sample[k] = x[k] + u[k] * rng.normal();
    sorted.set(sample);
    sorted.sort();
    const med = n % 2 ? sorted[h] : 0.5 * (sorted[h - 1] + sorted[h]);
    const dm = med - value;
    m1 += dm;
    m2 += dm * dm;
    for (let k = 0; k < n; k++) {
      const d = sample[k] - med - (x[k] - value);
      d1[k] += d;
      d2[k] += d * d;
    }
  }
  const sd = (s1: number, s2: number) => (trials > 1 ? Math.sqrt(Math.max(0, (s2 - (s1 * s1) / trials) / (trials - 1))) : 0);
  for (let k = 0; k < n; ) {
    let j = k;
    let acc = 0;
    while (j < n && x[j] === x[k] && u[j] === u[k]) acc += sd(d1[j], d2[j++]);
    for (let g = k; g < j; g++) doe[canon[g]] = acc / (j - k);
    k = j;
  }
  return { value, uncertainty: sd(m1, m2), doeUncertainties: doe, included, trials, seed };
}

export interface AlgorithmAOptions {
  /** Return exactly iteration k (k = 0: the starting median and 1.483 MAD). */
  iterations?: number;
  /** Stopping rule when `iterations` is not given:
   * 'converged' (default): stop when |delta x*| and |delta s*| are both <= tolerance * s*
   *   (tolerance default 1e-12), i.e. at the fixed point to double precision;
   * 'iso-3-figures': stop when x* and s* no longer change in their third significant figure
   *   (ISO 13528:2015 C.3, memory). */
  stoppingRule?: 'converged' | 'iso-3-figures';
  tolerance?: number;
  maxIterations?: number;
}

export interface AlgorithmAResult {
  mean: number;
  sd: number;
  iterations: number;
  converged: boolean;
}

/** ISO 13528 Algorithm A: x* = median, s* = 1.483 median|x_i - x*|; repeat delta = 1.5 s*,
 * winsorise to [x* - delta, x* + delta], x* = mean, s* = 1.134 sd (n - 1).
 * If s* becomes 0 (more than half the values identical) the iteration stops there with s* = 0. */
export function algorithmA(values: readonly number[], options: AlgorithmAOptions = {}): AlgorithmAResult {
  const xs = values.filter((v) => Number.isFinite(v));
  const n = xs.length;
  if (n === 0) return { mean: NaN, sd: NaN, iterations: 0, converged: false };
  let x = median(xs);
  let s = 1.483 * median(xs.map((v) => Math.abs(v - x)));
  if (n === 1) return { mean: x, sd: 0, iterations: 0, converged: true };
  const fixedK = options.iterations;
  const rule = options.stoppingRule ?? 'converged';
  const tol = options.tolerance ?? 1e-12;
  const maxIt = options.maxIterations ?? 10_000;
  const sig3 = (a: number) => (a === 0 ? 0 : Number(a.toPrecision(3)));
  const limit = fixedK ?? maxIt;
  let lastDone = false;
  for (let k = 1; k <= limit; k++) {
    if (s === 0) return { mean: x, sd: 0, iterations: k - 1, converged: true };
    const delta = 1.5 * s;
    const lo = x - delta;
    const hi = x + delta;
    let sum = 0;
    for (const v of xs) sum += v < lo ? lo : v > hi ? hi : v;
    const nx = sum / n;
    // squared deviations relative to s (> 0 here), so tiny data do not underflow to s* = 0
    let ss = 0;
    for (const v of xs) {
      const w = ((v < lo ? lo : v > hi ? hi : v) - nx) / s;
      ss += w * w;
    }
    const ns = 1.134 * s * Math.sqrt(ss / (n - 1));
    const done =
      rule === 'converged'
        ? Math.abs(nx - x) <= tol * ns && Math.abs(ns - s) <= tol * ns
        : sig3(nx) === sig3(x) && sig3(ns) === sig3(s);
    x = nx;
    s = ns;
    lastDone = done;
    if (fixedK === undefined && done) return { mean: x, sd: s, iterations: k, converged: true };
  }
  return { mean: x, sd: s, iterations: limit, converged: lastDone };
}
