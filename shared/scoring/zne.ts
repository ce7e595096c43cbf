/**
 * Zero-noise extrapolation re-analysis of per-noise-factor data (c_j, E_j, u_j).
 *
 * - Richardson (Temme, Bravyi and Gambetta 2017): g_j = prod_{m != j} c_m/(c_m - c_j),
 *   E0 = sum g_j E_j, u^2(E0) = sum g_j^2 u_j^2 (independent inputs).
 * - Weighted polynomial fit of degree p (weights 1/u_j^2; unweighted if any u_j = 0 or on request):
 *   E0 is the intercept. Every fit here is a linear estimator E0 = sum a_j y_j, so its uncertainty
 *   is propagated as u^2 = sum a_j^2 u_j^2 (for the weighted fit this is the usual covariance
 *   element, not rescaled by the residual chi2, which is reported beside it).
 * - Exponential with asymptote 0: E = A exp(-b c), fitted as a line in ln|E| with
 *   u(ln|E_j|) = u_j/|E_j|; E0 = A, u(E0) = |A| u(ln A). All E_j must be non-zero and of one sign
 *   (negative data are fitted as -E); otherwise the model is rejected with a reason. Weighting:
 *   'propagated' (default, weights E_j^2/u_j^2) or 'unweighted'.
 * - Exponential with free asymptote: E = a + b exp(-k c), k > 0, by least squares profiled over k
 *   (linear in a, b for fixed k); u(E0 = a + b) from the Gauss-Newton covariance. Needs >= 3
 *   distinct factors; rejected when the best k lies on the search boundary (no decay visible).
 */
import type { Measurement } from './types';

export interface NoisePoint extends Measurement {
  /** Noise-scale factor c_j (1 = unamplified). */
  scale: number;
}

export interface ZneModelResult {
  model: string;
  ok: boolean;
  value: number;
  uncertainty: number;
  reason?: string;
  /** Residual chi2 and degrees of freedom where defined. */
  chi2?: number;
  nu?: number;
  /** Linear-estimator coefficients a_j (E0 = sum a_j y_j) where defined. */
  coefficients?: number[];
}

const fail = (model: string, reason: string): ZneModelResult => ({ model, ok: false, value: NaN, uncertainty: NaN, reason });

/** Richardson coefficients g_j; throws on repeated scale factors. */
export function richardsonCoefficients(c: readonly number[]): number[] {
  const n = c.length;
  const g = new Array<number>(n);
  for (let j = 0; j < n; j++) {
    let p = 1;
    for (let m = 0; m < n; m++) {
      if (m === j) continue;
      if (c[m] === c[j]) throw new Error(`repeated noise-scale factor ${c[j]}`);
      p *= c[m] / (c[m] - c[j]);
    }
    g[j] = p;
  }
  return g;
}

export function richardson(points: readonly NoisePoint[]): ZneModelResult {
  const model = 'richardson';
  if (points.length === 0) return fail(model, 'no data');
  const c = points.map((p) => p.scale);
  if (new Set(c).size !== c.length) return fail(model, 'repeated noise-scale factors');
  const g = richardsonCoefficients(c);
  let v = 0;
  let u2 = 0;
  points.forEach((p, j) => {
    v += g[j] * p.value;
    u2 += g[j] * g[j] * p.uncertainty * p.uncertainty;
  });
  return { model, ok: true, value: v, uncertainty: Math.sqrt(u2), nu: 0, chi2: 0, coefficients: g };
}

/** Solve the small symmetric system M a = b by Gauss-Jordan with partial pivoting; null if singular. */
function invert(M: number[][]): number[][] | null {
  const n = M.length;
  const A = M.map((r, i) => [...r, ...Array.from({ length: n }, (_, j) => (i === j ? 1 : 0))]);
  for (let col = 0; col < n; col++) {
    let piv = col;
    for (let r = col + 1; r < n; r++) if (Math.abs(A[r][col]) > Math.abs(A[piv][col])) piv = r;
    if (!(Math.abs(A[piv][col]) > 1e-300)) return null;
    [A[col], A[piv]] = [A[piv], A[col]];
    const d = A[col][col];
    for (let j = 0; j < 2 * n; j++) A[col][j] /= d;
    for (let r = 0; r < n; r++) {
      if (r === col) continue;
      const f = A[r][col];
      if (f !== 0) for (let j = 0; j < 2 * n; j++) A[r][j] -= f * A[col][j];
    }
  }
  return A.map((r) => r.slice(n));
}

interface LinearFit {
  beta: number[];
  /** Rows of the estimator matrix: beta_k = sum_j L[k][j] y_j. */
  L: number[][];
  chi2: number;
}

/** Weighted least squares y ~ X beta with weights w (y, w per row). */
function wls(X: number[][], y: readonly number[], w: readonly number[]): LinearFit | null {
  const n = X.length;
  const p = X[0].length;
  const M = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  for (let i = 0; i < n; i++) for (let a = 0; a < p; a++) for (let b = 0; b < p; b++) M[a][b] += w[i] * X[i][a] * X[i][b];
  const Mi = invert(M);
  if (!Mi) return null;
  const L = Array.from({ length: p }, (_, a) => X.map((row, i) => w[i] * row.reduce((s, x, b) => s + Mi[a][b] * x, 0)));
  const beta = L.map((r) => r.reduce((s, l, i) => s + l * y[i], 0));
  let chi2 = 0;
  for (let i = 0; i < n; i++) {
    const f = X[i].reduce((s, x, b) => s + x * beta[b], 0);
    chi2 += w[i] * (y[i] - f) ** 2;
  }
  return { beta, L, chi2 };
}

export interface FitOptions {
  /** 'weighted' (1/u^2, default; falls back to unweighted when some u = 0) or 'unweighted'. */
  weighting?: 'weighted' | 'unweighted';
}

/** Weighted polynomial fit of the given degree; E0 = intercept. */
export function polynomialFit(points: readonly NoisePoint[], degree: number, options: FitOptions = {}): ZneModelResult {
  const model = degree === 1 ? 'linear' : `polynomial-${degree}`;
  const n = points.length;
  if (!(degree >= 0) || !Number.isInteger(degree)) return fail(model, 'degree must be a non-negative integer');
  if (new Set(points.map((p) => p.scale)).size < degree + 1) return fail(model, `needs at least ${degree + 1} distinct noise-scale factors`);
  const cmax = Math.max(...points.map((p) => Math.abs(p.scale)));
  // Scaled abscissa t = c/cmax for conditioning; the intercept is unchanged.
  const X = points.map((p) => Array.from({ length: degree + 1 }, (_, k) => (p.scale / cmax) ** k));
  const weighted = (options.weighting ?? 'weighted') === 'weighted' && points.every((p) => p.uncertainty > 0);
  const w = points.map((p) => (weighted ? 1 / (p.uncertainty * p.uncertainty) : 1));
  const fit = wls(X, points.map((p) => p.value), w);
  if (!fit) return fail(model, 'singular fit');
  const a = fit.L[0];
  const u2 = a.reduce((s, aj, j) => s + aj * aj * points[j].uncertainty * points[j].uncertainty, 0);
  return { model, ok: true, value: fit.beta[0], uncertainty: Math.sqrt(u2), chi2: weighted ? fit.chi2 : NaN, nu: n - degree - 1, coefficients: a };
}

export function linearFit(points: readonly NoisePoint[], options: FitOptions = {}): ZneModelResult {
  return polynomialFit(points, 1, options);
}

export interface ExponentialOptions {
  weighting?: 'propagated' | 'unweighted';
}

/** E = A exp(-b c) via a line in ln|E|. */
export function exponentialFit(points: readonly NoisePoint[], options: ExponentialOptions = {}): ZneModelResult {
  const model = 'exponential';
  if (points.some((p) => !(p.value !== 0 && Number.isFinite(p.value)))) return fail(model, 'zero or non-finite value: log-linear fit needs non-zero values');
  const sign = Math.sign(points[0].value);
  if (points.some((p) => Math.sign(p.value) !== sign)) return fail(model, 'values change sign: exponential decay to 0 cannot fit them');
  if (new Set(points.map((p) => p.scale)).size < 2) return fail(model, 'needs at least 2 distinct noise-scale factors');
  const y = points.map((p) => Math.log(Math.abs(p.value)));
  const ul = points.map((p) => p.uncertainty / Math.abs(p.value));
  const weighted = (options.weighting ?? 'propagated') === 'propagated' && ul.every((u) => u > 0);
  const X = points.map((p) => [1, p.scale]);
  const fit = wls(X, y, ul.map((u) => (weighted ? 1 / (u * u) : 1)));
  if (!fit) return fail(model, 'singular fit');
  const a = fit.L[0];
  const uLnA = Math.sqrt(a.reduce((s, aj, j) => s + aj * aj * ul[j] * ul[j], 0));
  const A = sign * Math.exp(fit.beta[0]);
  return { model, ok: true, value: A, uncertainty: Math.abs(A) * uLnA, chi2: weighted ? fit.chi2 : NaN, nu: points.length - 2 };
}

/** E = a + b exp(-k c) with free asymptote a. */
export function exponentialFreeAsymptoteFit(points: readonly NoisePoint[]): ZneModelResult {
  const model = 'exponential-free-asymptote';
  const n = points.length;
  const cs = points.map((p) => p.scale);
  if (new Set(cs).size < 3) return fail(model, 'needs at least 3 distinct noise-scale factors');
  const weighted = points.every((p) => p.uncertainty > 0);
  const w = points.map((p) => (weighted ? 1 / (p.uncertainty * p.uncertainty) : 1));
  const ys = points.map((p) => p.value);
  const cmin = Math.min(...cs.map(Math.abs).filter((c) => c > 0), Infinity);
  const cmax = Math.max(...cs.map(Math.abs));
  const kLo = 1e-3 / cmax;
  const kHi = 50 / (Number.isFinite(cmin) ? cmin : cmax);
  const profile = (logk: number) => {
    const k = Math.exp(logk);
    const f = wls(points.map((p) => [1, Math.exp(-k * p.scale)]), ys, w);
    return f ? f.chi2 : Infinity;
  };
  const G = 400;
  let bi = 0;
  let bv = Infinity;
  const lo = Math.log(kLo);
  const hi = Math.log(kHi);
  for (let i = 0; i <= G; i++) {
    const v = profile(lo + ((hi - lo) * i) / G);
    if (v < bv) {
      bv = v;
      bi = i;
    }
  }
  if (bi === 0 || bi === G) return fail(model, 'no interior least-squares decay rate: the data show no exponential decay');
  // Golden-section refinement.
  let a = lo + ((hi - lo) * (bi - 1)) / G;
  let b = lo + ((hi - lo) * (bi + 1)) / G;
  const gr = (Math.sqrt(5) - 1) / 2;
  let x1 = b - gr * (b - a);
  let x2 = a + gr * (b - a);
  let f1 = profile(x1);
  let f2 = profile(x2);
  for (let it = 0; it < 200 && b - a > 1e-13; it++) {
    if (f1 < f2) {
      b = x2;
      x2 = x1;
      f2 = f1;
      x1 = b - gr * (b - a);
      f1 = profile(x1);
    } else {
      a = x1;
      x1 = x2;
      f1 = f2;
      x2 = a + gr * (b - a);
      f2 = profile(x2);
    }
  }
  const k = Math.exp(0.5 * (a + b));
  const f = wls(points.map((p) => [1, Math.exp(-k * p.scale)]), ys, w);
  if (!f) return fail(model, 'singular fit');
  const [A, B] = f.beta;
  // Gauss-Newton covariance of (a, b, k), then u(E0 = a + b) with inputs' stated u.
  const J = points.map((p) => [1, Math.exp(-k * p.scale), -B * p.scale * Math.exp(-k * p.scale)]);
  const M = [0, 1, 2].map((r) => [0, 1, 2].map((s) => J.reduce((acc, row, i) => acc + w[i] * row[r] * row[s], 0)));
  const Mi = invert(M);
  if (!Mi) return fail(model, 'singular Jacobian at the optimum');
  // Linearised estimator: delta theta = Mi J^T W delta y; E0 gradient (1, 1, 0).
  const coeff = points.map((_, i) => [0, 1, 2].reduce((s, r) => s + (Mi[0][r] + Mi[1][r]) * J[i][r] * w[i], 0));
  const u2 = coeff.reduce((s, cj, j) => s + cj * cj * points[j].uncertainty * points[j].uncertainty, 0);
  return { model, ok: true, value: A + B, uncertainty: Math.sqrt(u2), chi2: weighted ? f.chi2 : NaN, nu: n - 3, coefficients: coeff };
}

export interface ZneSummaryOptions {
  /** Polynomial degrees to fit besides Richardson (default: linear when >= 2 factors, quadratic
   * when >= 4, so that it is a fit and not Richardson again). */
  polynomialDegrees?: readonly number[];
  includeFreeAsymptote?: boolean;
  exponentialWeighting?: 'propagated' | 'unweighted';
}

export interface ZneSummary {
  models: ZneModelResult[];
  /** Over the models that succeeded. */
  spread: { min: number; max: number; range: number; sd: number; count: number };
}

export function zneSummary(points: readonly NoisePoint[], options: ZneSummaryOptions = {}): ZneSummary {
  const distinct = new Set(points.map((p) => p.scale)).size;
  const degrees = options.polynomialDegrees ?? [1, 2].filter((d) => (d === 1 ? distinct >= 2 : d + 1 < distinct));
  const models: ZneModelResult[] = [richardson(points)];
  for (const d of degrees) models.push(polynomialFit(points, d));
  models.push(exponentialFit(points, { weighting: options.exponentialWeighting }));
  if (options.includeFreeAsymptote) models.push(exponentialFreeAsymptoteFit(points));
  const vals = models.filter((m) => m.ok && Number.isFinite(m.value)).map((m) => m.value);
  const count = vals.length;
  const mean = vals.reduce((s, v) => s + v, 0) / (count || 1);
  const sd = count > 1 ? Math.sqrt(vals.reduce((s, v) => s + (v - mean) ** 2, 0) / (count - 1)) : count === 1 ? 0 : NaN;
  const min = count ? Math.min(...vals) : NaN;
  const max = count ? Math.max(...vals) : NaN;
  return { models, spread: { min, max, range: max - min, sd, count } };
}
