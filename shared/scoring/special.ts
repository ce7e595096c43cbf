/**
 * Special functions: regularised incomplete gamma, chi-squared survival, normal CDF/PDF/quantile.
 * simple-statistics 7.12 has no chi-squared CDF (only a table) and its erf is good to ~1e-7 only,
 * so these are implemented here (series + Lentz continued fraction, relative accuracy ~1e-15);
 * its Lanczos log-gamma (~1e-15) is reused.
 */
import { gammaln } from 'simple-statistics';

const lnGammaCache = new Map<number, number>();
/** ln Gamma(a), memoised: the arguments here are almost always nu/2 or 1/2. */
function lnGamma(a: number): number {
  let v = lnGammaCache.get(a);
  if (v === undefined) {
    v = gammaln(a);
    if (lnGammaCache.size < 4096) lnGammaCache.set(a, v);
  }
  return v;
}

const EPS = 1e-16;
const TINY = 1e-300;
const MAX_ITER = 100_000;

/** Series for P(a, x), valid for x < a + 1. */
function gammaPSeries(a: number, x: number): number {
  let ap = a;
  let sum = 1 / a;
  let del = sum;
  for (let n = 0; n < MAX_ITER; n++) {
    ap += 1;
    del *= x / ap;
    sum += del;
    if (Math.abs(del) < Math.abs(sum) * EPS) break;
  }
  return sum * Math.exp(-x + a * Math.log(x) - lnGamma(a));
}

/** Continued fraction (modified Lentz) for Q(a, x), valid for x >= a + 1. */
function gammaQContinuedFraction(a: number, x: number): number {
  let b = x + 1 - a;
  let c = 1 / TINY;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < MAX_ITER; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < TINY) d = TINY;
    c = b + an / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < EPS) break;
  }
  return Math.exp(-x + a * Math.log(x) - lnGamma(a)) * h;
}

/** Regularised lower incomplete gamma P(a, x) = gamma(a, x) / Gamma(a), a > 0, x >= 0. */
export function regularizedGammaP(a: number, x: number): number {
  if (!(a > 0) || !(x >= 0)) return NaN;
  if (x === 0) return 0;
  if (x === Infinity) return 1;
  return x < a + 1 ? gammaPSeries(a, x) : 1 - gammaQContinuedFraction(a, x);
}

/** Regularised upper incomplete gamma Q(a, x) = 1 - P(a, x), computed without cancellation. */
export function regularizedGammaQ(a: number, x: number): number {
  if (!(a > 0) || !(x >= 0)) return NaN;
  if (x === 0) return 1;
  if (x === Infinity) return 0;
  return x < a + 1 ? 1 - gammaPSeries(a, x) : gammaQContinuedFraction(a, x);
}

/** Chi-squared CDF P(chi2_nu <= x). */
export function chiSquaredCdf(x: number, nu: number): number {
  if (x <= 0) return 0;
  return regularizedGammaP(nu / 2, x / 2);
}

/** Chi-squared survival function P(chi2_nu > x) (the p-value of a consistency test).
 * nu = 0 returns 1 (nothing to test). */
export function chiSquaredSurvival(x: number, nu: number): number {
  if (nu <= 0) return 1;
  if (Number.isNaN(x)) return NaN;
  if (x <= 0) return 1;
  return regularizedGammaQ(nu / 2, x / 2);
}

/** Complementary error function, via erfc(x) = Q(1/2, x^2) for x >= 0. */
export function erfc(x: number): number {
  if (Number.isNaN(x)) return NaN;
  if (x >= 0) return regularizedGammaQ(0.5, x * x);
  return 2 - regularizedGammaQ(0.5, x * x);
}

/** Error function. */
export function erf(x: number): number {
  if (Number.isNaN(x)) return NaN;
  const p = regularizedGammaP(0.5, x * x);
  return x >= 0 ? p : -p;
}

/** Standard normal CDF Phi(z). */
export function normalCdf(z: number): number {
  return 0.5 * erfc(-z / Math.SQRT2);
}

/** Standard normal density phi(z). */
export function normalPdf(z: number): number {
  return Math.exp(-0.5 * z * z) / Math.sqrt(2 * Math.PI);
}

/** Standard normal quantile Phi^-1(p): Acklam's rational approximation refined by two Halley steps
 * on the accurate CDF above (relative accuracy ~1e-15). */
export function normalQuantile(p: number): number {
  if (!(p >= 0 && p <= 1)) return NaN;
  if (p === 0) return -Infinity;
  if (p === 1) return Infinity;
  const a = [-3.969683028665376e1, 2.209460984245205e2, -2.759285104469687e2, 1.38357751867269e2, -3.066479806614716e1, 2.506628277459239];
  const b = [-5.447609879822406e1, 1.615858368580409e2, -1.556989798598866e2, 6.680131188771972e1, -1.328068155288572e1];
  const c = [-7.784894002430293e-3, -3.223964580411365e-1, -2.400758277161838, -2.549732539343734, 4.374664141464968, 2.938163982698783];
  const d = [7.784695709041462e-3, 3.224671290700398e-1, 2.445134137142996, 3.754408661907416];
  const pl = 0.02425;
  let x: number;
  if (p < pl) {
    const q = Math.sqrt(-2 * Math.log(p));
    x = (((((c[0] * q + c[1]) * q + c[2]) * q + c[3]) * q + c[4]) * q + c[5]) / ((((d[0] * q + d[1]) * q + d[2]) * q + d[3]) * q + 1);
  } else if (p <= 1 - pl) {
    const q = p - 0.5;
    const r = q * q;
    x = ((((((a[0] * r + a[1]) * r + a[2]) * r + a[3]) * r + a[4]) * r + a[5]) * q) / (((((b[0] * r + b[1]) * r + b[2]) * r + b[3]) * r + b[4]) * r + 1);
  } else {
    const q = Math.sqrt(-2 * Math.log(1 - p));
    x = -(((((c[0] * q + c[1]) * q + c[2]) * q + c[3]) * q + c[4]) * q + c[5]) / ((((d[0] * q + d[1]) * q + d[2]) * q + d[3]) * q + 1);
  }
  for (let i = 0; i < 2; i++) {
    const e = normalCdf(x) - p;
    const u = e * Math.sqrt(2 * Math.PI) * Math.exp(0.5 * x * x);
    x = x - u / (1 + 0.5 * x * u);
  }
  return x;
}
