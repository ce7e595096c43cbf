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
 *   The optimum in k is found to about 1e-8 (grid, then golden section), so E0 to about 1e-9.
 * Numerics: every least-squares problem is solved by Householder QR of diag(sqrt w) X (not the
 * normal equations, which square the condition number when factors lie close together), with
 * weights relative to the smallest u (u from 0 up, as the entry format allows, never overflows).
 * The uncertainties are first order with the weights held fixed: for the 'propagated' exponential
 * fit (weights E_j^2/u_j^2 depend on the data) this equals the full derivative only where the
 * residuals vanish; elsewhere it can differ by a few per cent (standard practice).
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
  points.forEach((p, j) => (v += g[j] * p.value));
  return { model, ok: true, value: v, uncertainty: combined(g, points.map((p) => p.uncertainty)), nu: 0, chi2: 0, coefficients: g };
}

interface LinearFit {
  beta: number[];
  /** Rows of the estimator matrix: beta_k = sum_j L[k][j] y_j. */
  L: number[][];
  /** Residuals y_j - (X beta)_j. */
  residuals: number[];
}

/**
 * Weighted least squares y ~ X beta with weights s_j^2 (s per row; only their ratios matter), by
 * Householder QR of diag(s) X: the normal equations would square the condition number of the
 * Vandermonde-like design (noise-scale factors close together). Null if X is rank-deficient.
 */
function wls(X: number[][], y: readonly number[], s: readonly number[]): LinearFit | null {
  const n = X.length;
  const p = X[0].length;
  if (n < p) return null;
  const A = X.map((row, i) => row.map((x) => s[i] * x));
  // B = Q^T diag(s), built by applying the same reflections to diag(s)
  const B = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? s[i] : 0)));
  const v = new Array<number>(n).fill(0);
  for (let k = 0; k < p; k++) {
    let scale = 0;
    for (let i = k; i < n; i++) scale = Math.max(scale, Math.abs(A[i][k]));
    if (!(scale > 0)) return null;
    let norm2 = 0;
    for (let i = k; i < n; i++) norm2 += (A[i][k] / scale) ** 2;
    const alpha = (A[k][k] > 0 ? -1 : 1) * scale * Math.sqrt(norm2);
    let vn2 = 0;
    for (let i = k; i < n; i++) {
      v[i] = A[i][k] - (i === k ? alpha : 0);
      vn2 += v[i] * v[i];
    }
    if (!(vn2 > 0)) continue;
    const reflect = (M: number[][], cols: number, from: number) => {
      for (let j = from; j < cols; j++) {
        let dot = 0;
        for (let i = k; i < n; i++) dot += v[i] * M[i][j];
        const f = (2 * dot) / vn2;
        if (f !== 0) for (let i = k; i < n; i++) M[i][j] -= f * v[i];
      }
    };
    reflect(A, p, k);
    reflect(B, n, 0);
  }
  for (let k = 0; k < p; k++) if (!(Math.abs(A[k][k]) > 1e-300)) return null;
  // R L = B[0..p): back substitution, column by column of B
  const L = Array.from({ length: p }, () => new Array<number>(n).fill(0));
  for (let j = 0; j < n; j++) {
    for (let k = p - 1; k >= 0; k--) {
      let t = B[k][j];
      for (let m = k + 1; m < p; m++) t -= A[k][m] * L[m][j];
      L[k][j] = t / A[k][k];
    }
  }
  const beta = L.map((r) => r.reduce((acc, l, i) => acc + l * y[i], 0));
  const residuals = X.map((row, i) => y[i] - row.reduce((acc, x, b) => acc + x * beta[b], 0));
  return { beta, L, residuals };
}

/** sqrt(sum (a_j u_j)^2) without squaring tiny or huge numbers. */
function combined(a: readonly number[], u: readonly number[]): number {
  let m = 0;
  for (let j = 0; j < a.length; j++) m = Math.max(m, Math.abs(a[j] * u[j]));
  if (!(m > 0)) return m === 0 ? 0 : NaN;
  let s = 0;
  for (let j = 0; j < a.length; j++) s += ((a[j] * u[j]) / m) ** 2;
  return m * Math.sqrt(s);
}

/** Residual chi2 sum (r_j / u_j)^2. */
function chi2Of(r: readonly number[], u: readonly number[]): number {
  let c = 0;
  for (let j = 0; j < r.length; j++) c += (r[j] / u[j]) ** 2;
  return c;
}

/** Square-root weights proportional to 1/u_j (relative to the smallest u, so none overflows). */
function sqrtWeights(u: readonly number[]): number[] {
  const u0 = Math.min(...u);
  return u.map((x) => u0 / x);
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
  const us = points.map((p) => p.uncertainty);
  const weighted = (options.weighting ?? 'weighted') === 'weighted' && us.every((u) => u > 0);
  const fit = wls(X, points.map((p) => p.value), weighted ? sqrtWeights(us) : us.map(() => 1));
  if (!fit) return fail(model, 'singular fit');
  const a = fit.L[0];
  return { model, ok: true, value: fit.beta[0], uncertainty: combined(a, us), chi2: weighted ? chi2Of(fit.residuals, us) : NaN, nu: n - degree - 1, coefficients: a };
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
  const fit = wls(X, y, weighted ? sqrtWeights(ul) : ul.map(() => 1));
  if (!fit) return fail(model, 'singular fit');
  const a = fit.L[0];
  const uLnA = combined(a, ul);
  const A = sign * Math.exp(fit.beta[0]);
  return { model, ok: true, value: A, uncertainty: Math.abs(A) * uLnA, chi2: weighted ? chi2Of(fit.residuals, ul) : NaN, nu: points.length - 2 };
}

/** E = a + b exp(-k c) with free asymptote a. */
export function exponentialFreeAsymptoteFit(points: readonly NoisePoint[]): ZneModelResult {
  const model = 'exponential-free-asymptote';
  const n = points.length;
  const cs = points.map((p) => p.scale);
  if (new Set(cs).size < 3) return fail(model, 'needs at least 3 distinct noise-scale factors');
  const us = points.map((p) => p.uncertainty);
  const weighted = us.every((u) => u > 0);
  const sw = weighted ? sqrtWeights(us) : us.map(() => 1);
  const ys = points.map((p) => p.value);
  const cmin = Math.min(...cs.map(Math.abs).filter((c) => c > 0), Infinity);
  const cmax = Math.max(...cs.map(Math.abs));
  const kLo = 1e-3 / cmax;
  const kHi = 50 / (Number.isFinite(cmin) ? cmin : cmax);
  const profile = (logk: number) => {
    const k = Math.exp(logk);
    const f = wls(points.map((p) => [1, Math.exp(-k * p.scale)]), ys, sw);
    // proportional to chi2 (relative weights): finite whatever the scale of u
    return f ? f.residuals.reduce((acc, r, i) => acc + (sw[i] * r) ** 2, 0) : Infinity;
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
  const f = wls(points.map((p) => [1, Math.exp(-k * p.scale)]), ys, sw);
  if (!f) return fail(model, 'singular fit');
  const [A, B] = f.beta;
  // Gauss-Newton linearisation at the optimum: delta theta = (J^T W J)^-1 J^T W delta y, i.e. the
  // least-squares estimator of the Jacobian J of (a, b, k); E0 = a + b has gradient (1, 1, 0).
  const J = points.map((p) => [1, Math.exp(-k * p.scale), -B * p.scale * Math.exp(-k * p.scale)]);
  const lin = wls(J, ys, sw);
  if (!lin) return fail(model, 'singular Jacobian at the optimum');
  const coeff = points.map((_, i) => lin.L[0][i] + lin.L[1][i]);
  return { model, ok: true, value: A + B, uncertainty: combined(coeff, us), chi2: weighted ? chi2Of(f.residuals, us) : NaN, nu: n - 3, coefficients: coeff };
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
