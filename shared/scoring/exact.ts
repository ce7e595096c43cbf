/**
 * Scoring of estimates against an exact (or externally certified) reference value.
 *
 * Conventions (SCORING.md):
 * - error = x - r; absolute error |x - r| is the primary accuracy metric.
 * - z = (x - r)/u. When u = 0 (kind 'none', or a claimed exact value): z = 0 if x = r exactly,
 *   otherwise z = +/-Infinity (class 'unsatisfactory'); if u is negative or not finite, z = NaN
 *   and the class is 'undefined'. Sweep means over z^2 skip NaN but keep Infinity.
 * - ISO 13528 classes (memory): |z| <= 2 satisfactory, 2 < |z| < 3 questionable, >= 3 unsatisfactory.
 * - zeta = (x - r)/sqrt(u^2 + u_r^2) and En = (x - r)/sqrt(U^2 + U_r^2) with U = 2u are given
 *   only when the reference carries its own uncertainty (reference.uncertainty defined); else null.
 * - coverage: |x - r| <= 2u (inclusive).
 * - CRPS of N(x, u^2) at r (Gneiting and Raftery 2007); u = 0 gives |x - r|.
 * - interval (Winkler) score of the central (1 - alpha) normal interval x +/- z_{1-alpha/2} u,
 *   alpha = 0.05 by default.
 */
import { normalCdf, normalPdf, normalQuantile } from './special';
import type { Measurement, Reference } from './types';

export type ZClass = 'satisfactory' | 'questionable' | 'unsatisfactory' | 'undefined';

/** z = (x - r)/u with the u = 0 convention documented above. */
export function zScore(x: number, u: number, r: number): number {
  if (!(u >= 0) || !Number.isFinite(u) || !Number.isFinite(x) || !Number.isFinite(r)) return NaN;
  const e = x - r;
  if (u === 0) return e === 0 ? 0 : e > 0 ? Infinity : -Infinity;
  return e / u;
}

/** ISO 13528 classification of a z (or zeta) score. */
export function classifyZ(z: number): ZClass {
  if (Number.isNaN(z)) return 'undefined';
  const a = Math.abs(z);
  if (a <= 2) return 'satisfactory';
  if (a < 3) return 'questionable';
  return 'unsatisfactory';
}

/** zeta = (x - r)/sqrt(u^2 + u_r^2); same zero-denominator convention as zScore (NaN when either
 * uncertainty is negative or not finite). */
export function zetaScore(x: number, u: number, r: number, ur: number): number {
  if (!(ur >= 0) || !(u >= 0)) return NaN;
  return zScore(x, Math.hypot(u, ur), r);
}

/** En = (x - r)/sqrt(U^2 + U_r^2), U = k u (k = 2); |En| <= 1 acceptable. */
export function enScore(x: number, u: number, r: number, ur: number, k = 2): number {
  if (!(ur >= 0) || !(u >= 0) || !(k > 0)) return NaN;
  return zScore(x, k * Math.hypot(u, ur), r);
}

/** CRPS of the Gaussian N(mean, sd^2) at observation y (closed form, Gneiting et al. 2005);
 * sd = 0 gives |mean - y|. Written as e (2 Phi(z) - 1) + sd (2 phi(z) - 1/sqrt(pi)) with
 * e = y - mean = sd z, so that a tiny sd (z overflowing to +/-Infinity) still gives |e|. */
export function crpsNormal(mean: number, sd: number, y: number): number {
  if (!Number.isFinite(mean) || !Number.isFinite(y) || !(sd >= 0) || !Number.isFinite(sd)) return NaN;
  const e = y - mean;
  if (sd === 0) return Math.abs(e);
  const z = e / sd;
  return e * (2 * normalCdf(z) - 1) + sd * (2 * normalPdf(z) - 1 / Math.sqrt(Math.PI));
}

/** Interval (Winkler) score of a central (1 - alpha) interval [lower, upper] at y:
 * (h - l) + (2/alpha)(l - y)[y < l] + (2/alpha)(y - h)[y > h]. NaN unless lower <= upper and
 * 0 < alpha < 1. */
export function intervalScore(lower: number, upper: number, y: number, alpha: number): number {
  if (!(lower <= upper) || !(alpha > 0 && alpha < 1) || Number.isNaN(y)) return NaN;
  let s = upper - lower;
  if (y < lower) s += (2 / alpha) * (lower - y);
  if (y > upper) s += (2 / alpha) * (y - upper);
  return s;
}

export interface ExactScoreOptions {
  /** Coverage factor for the coverage check (default 2). */
  coverageFactor?: number;
  /** alpha of the central interval for the interval score (default 0.05). */
  intervalAlpha?: number;
}

export interface ExactScore {
  error: number;
  absError: number;
  z: number;
  zClass: ZClass;
  /** Only when the reference has its own uncertainty. */
  zeta: number | null;
  en: number | null;
  covered: boolean;
  crps: number;
  intervalScore: number;
}

const quantileCache = new Map<number, number>();
/** z_{1 - alpha/2}, cached per alpha (the quantile is the costly part of a score). */
function centralQuantile(alpha: number): number {
  let q = quantileCache.get(alpha);
  if (q === undefined) {
    q = normalQuantile(1 - alpha / 2);
    quantileCache.set(alpha, q);
  }
  return q;
}

/** Score one estimate against one reference. */
export function scoreAgainstReference(est: Measurement, ref: Reference, options: ExactScoreOptions = {}): ExactScore {
  const k = options.coverageFactor ?? 2;
  const alpha = options.intervalAlpha ?? 0.05;
  const x = est.value;
  const u = est.uncertainty;
  const r = ref.value;
  const error = x - r;
  const z = zScore(x, u, r);
  const hasRefU = ref.uncertainty !== undefined;
  const ur = ref.uncertainty ?? 0;
  const q = centralQuantile(alpha);
  return {
    error,
    absError: Math.abs(error),
    z,
    zClass: classifyZ(z),
    zeta: hasRefU ? zetaScore(x, u, r, ur) : null,
    en: hasRefU ? enScore(x, u, r, ur) : null,
    covered: Math.abs(error) <= k * (u >= 0 ? u : NaN),
    crps: crpsNormal(x, u, r),
    intervalScore: intervalScore(x - q * u, x + q * u, r, alpha),
  };
}

/** One target as seen by one entry in a sweep. */
export interface SweepItem {
  targetId: string;
  estimate: Measurement | undefined;
  /** Exact reference (verifiable target) or undefined. */
  reference?: Reference;
  /** For unverifiable targets: the consensus value to compare against (optional). */
  consensus?: Reference;
}

export interface SweepStats {
  /** Targets of this class in the challenge. */
  targets: number;
  /** Of those, targets this entry answered (with a finite value). */
  answered: number;
  /** Of the answered ones, those that could be scored (had a reference/consensus). */
  scored: number;
  /** answered / targets (coverage of the grid); NaN when targets = 0. */
  gridCoverage: number;
  rmse: number;
  maxAbsError: number;
  /** Mean z^2 (calibration: near 1 means honest error bars). NaN z skipped; Infinity kept. */
  meanZ2: number;
  /** Fraction of scored targets with r in x +/- 2u. */
  fractionCovered: number;
  meanCrps: number;
  meanIntervalScore: number;
}

export interface EntrySweepScore {
  /** Targets with an exact reference. */
  verifiable: SweepStats;
  /** Targets without one; scored against the consensus when given (z uses sqrt(u^2 + u_c^2);
   * this ignores the correlation of an entry with a consensus it is part of — use
   * equivalence.ts for proper degrees of equivalence). */
  unverifiable: SweepStats;
  /** answered / targets over the whole grid. */
  gridCoverage: number;
}

function emptyAcc() {
  return { targets: 0, answered: 0, scored: 0, se: 0, maxAbs: 0, z2: 0, z2n: 0, covered: 0, crps: 0, is: 0 };
}
type Acc = ReturnType<typeof emptyAcc>;

function finish(a: Acc): SweepStats {
  const n = a.scored;
  return {
    targets: a.targets,
    answered: a.answered,
    scored: n,
    gridCoverage: a.targets > 0 ? a.answered / a.targets : NaN,
    rmse: n > 0 ? Math.sqrt(a.se / n) : NaN,
    maxAbsError: n > 0 ? a.maxAbs : NaN,
    meanZ2: a.z2n > 0 ? a.z2 / a.z2n : NaN,
    fractionCovered: n > 0 ? a.covered / n : NaN,
    meanCrps: n > 0 ? a.crps / n : NaN,
    meanIntervalScore: n > 0 ? a.is / n : NaN,
  };
}

/** Per-entry statistics over a sweep: pass one item per target in the challenge (estimate
 * undefined when the entry did not answer it). */
export function scoreSweep(items: readonly SweepItem[], options: ExactScoreOptions = {}): EntrySweepScore {
  const ver = emptyAcc();
  const unv = emptyAcc();
  for (const it of items) {
    const acc = it.reference ? ver : unv;
    acc.targets++;
    const est = it.estimate;
    if (!est || !Number.isFinite(est.value)) continue;
    acc.answered++;
    const ref = it.reference ?? it.consensus;
    if (!ref) continue;
    const s = scoreAgainstReference(est, ref, options);
    acc.scored++;
    acc.se += s.error * s.error;
    if (s.absError > acc.maxAbs) acc.maxAbs = s.absError;
    const zz = it.reference ? (ref.uncertainty ? (s.zeta as number) : s.z) : (s.zeta ?? s.z);
    if (!Number.isNaN(zz)) {
      acc.z2 += zz * zz;
      acc.z2n++;
    }
    const kcov = options.coverageFactor ?? 2;
    const covered = ref.uncertainty ? Math.abs(s.error) <= kcov * Math.hypot(est.uncertainty, ref.uncertainty) : s.covered;
    if (covered) acc.covered++;
    acc.crps += s.crps;
    acc.is += s.intervalScore;
  }
  const total = ver.targets + unv.targets;
  return {
    verifiable: finish(ver),
    unverifiable: finish(unv),
    gridCoverage: total > 0 ? (ver.answered + unv.answered) / total : NaN,
  };
}
