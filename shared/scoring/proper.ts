/**
 * Proper scores used as ranking keys (scoring rules version: rules.ts).
 *
 * - crpsCensoredNormal: CRPS of the entry's normal N(m, s^2) censored to the observable's range
 *   [lo, hi] (every expectation value of an observable bounded by B lies in [-B, B]). For an
 *   observation y in [lo, hi] it is the threshold-weighted CRPS with weight 1 on [lo, hi]:
 *     integral_lo^hi (Phi((z - m)/s) - 1{y <= z})^2 dz,
 *   proper (Gneiting and Ranjan 2011, JBES 29:411, threshold-weighted CRPS) and never above
 *   hi - lo = 2B, the score of the worst possible answer, which is what a missing answer scores.
 *   Closed form: CRPS(N(m, s^2), y) - s G((lo - m)/s) - s G((m - hi)/s), with
 *     G(a) = integral_{-inf}^a Phi(t)^2 dt = a Phi(a)^2 + 2 Phi(a) phi(a) - Phi(a sqrt 2)/sqrt(pi)
 *   (derivation: d/da G = Phi^2; direct evaluation). s = 0: |clamp(m) - y|.
 * - expectedCrpsNormal: E_Y[CRPS(N(m, s^2), Y)] for Y ~ N(c, uc^2) independent of the entry
 *   (the consensus distribution). With X, X' ~ N(m, s^2): E|X - Y| - E|X - X'|/2, and X - Y is
 *   N(m - c, s^2 + uc^2), so it equals A(m - c, sqrt(s^2 + uc^2)) - s/sqrt(pi) with
 *   A(mu, sigma) = E|N(mu, sigma^2)| = mu (2 Phi(mu/sigma) - 1) + 2 sigma phi(mu/sigma).
 *   uc = 0 gives crpsNormal. It is the CRPS averaged over the consensus uncertainty: a wide
 *   consensus does not reward a confident miss, and a claimed u that is wider than the spread of
 *   the estimates costs (s/sqrt(pi) grows more slowly than A does).
 * Both are written with the error e and the sd multiplying bounded factors, so that tiny or zero
 * sd (z overflowing to +/-Infinity) still gives finite values.
 */
import { normalCdf, normalPdf } from './special';
import { crpsNormal } from './exact';

const SQRT_PI = Math.sqrt(Math.PI);

/** s * G(d/s) for the lower/upper tail corrections, with d = a s passed directly (no overflow). */
function tail(d: number, s: number): number {
  const a = d / s;
  if (a < -40) return 0; // G(-40) < 1e-700: nothing left
  const P = normalCdf(a);
  return d * P * P + s * (2 * P * normalPdf(a) - normalCdf(a * Math.SQRT2) / SQRT_PI);
}

/** CRPS of N(m, s^2) censored to [lo, hi] at y (y is clamped into [lo, hi]). */
export function crpsCensoredNormal(m: number, s: number, y: number, lo: number, hi: number): number {
  if (!Number.isFinite(m) || !Number.isFinite(y) || !(s >= 0) || !Number.isFinite(s) || !(lo < hi)) return NaN;
  const yy = y < lo ? lo : y > hi ? hi : y;
  if (s === 0) {
    const mm = m < lo ? lo : m > hi ? hi : m;
    return Math.abs(mm - yy);
  }
  const v = crpsNormal(m, s, yy) - tail(lo - m, s) - tail(m - hi, s);
  // rounding can leave a hair outside [0, hi - lo]
  return v < 0 ? 0 : v > hi - lo ? hi - lo : v;
}

/** E|N(mu, sigma^2)|, sigma >= 0. */
function absMoment(mu: number, sigma: number): number {
  if (sigma === 0) return Math.abs(mu);
  const z = mu / sigma;
  return mu * (2 * normalCdf(z) - 1) + 2 * sigma * normalPdf(z);
}

/** E over Y ~ N(c, uc^2) of CRPS(N(m, s^2), Y). */
export function expectedCrpsNormal(m: number, s: number, c: number, uc: number): number {
  if (!Number.isFinite(m) || !Number.isFinite(c) || !(s >= 0) || !(uc >= 0) || !Number.isFinite(s) || !Number.isFinite(uc)) return NaN;
  const big = s > uc ? s : uc;
  const sigma = big === 0 ? 0 : big * Math.sqrt((s / big) * (s / big) + (uc / big) * (uc / big));
  return absMoment(m - c, sigma) - s / SQRT_PI;
}
