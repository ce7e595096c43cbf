/**
 * Single entry point for the reference-free consensus value of a target.
 *
 * Estimators (a moderator's choice per challenge; DEFAULT_ESTIMATOR when none is chosen):
 * - 'weighted-mean': Cox 2002 procedure A.
 * - 'random-effects-dl' / 'random-effects-pm': DerSimonian-Laird / Paule-Mandel random effects.
 * - 'largest-consistent-subset': Cox 2007 (weighted mean of the LCS): it equals the weighted mean
 *   whenever the full set is consistent and drops discrepant results otherwise.
 * The default is 'random-effects-dl' (the product brief's choice): it widens the uncertainty by
 * the between-method spread tau^2 instead of discarding results.
 * - 'median': Cox 2002 procedure B (seeded Monte Carlo uncertainty).
 *
 * `test` is the chi-squared test of the included results about the returned value, under the
 * procedure's own variance model (u_i^2 + tau^2 for random effects; for the median, chi2 about the
 * median, which is >= the chi2 about the weighted mean, so the test is conservative).
 * `inputTest` is the plain procedure-A test of all usable results (what the page shows as the
 * raw consistency of the inputs). `disputed` is true when the consistency test fails even after
 * the chosen procedure:
 * - weighted-mean, median, random effects: `test` fails (for Paule-Mandel the residual chi2 equals
 *   nu by construction, so random effects flags a dispute only in degenerate cases: read
 *   inputTest.p and I^2 for heterogeneity);
 * - largest-consistent-subset: the subset fails, or it keeps fewer than max(2, ceil(N/2)) of the
 *   N usable results (N >= 2), i.e. no majority agrees.
 * Edge cases: N = 0 gives NaN value/uncertainty, nothing included, not disputed; N = 1 gives that
 * result with nu = 0, p = 1; results with u = 0 are excluded from the weighted procedures (see
 * weighted-mean.ts) but enter the median; identical values give chi2 = 0.
 */
import { DEFAULT_ALPHA, chi2About, consistencyTest, partitionByUncertainty, weightedMean } from './weighted-mean';
import { randomEffects } from './random-effects';
import { largestConsistentSubset } from './lcs';
import { medianWithUncertainty, type MedianOptions } from './robust';
import type { ConsistencyTest, Measurement } from './types';

export type ConsensusEstimator = 'weighted-mean' | 'random-effects-dl' | 'random-effects-pm' | 'largest-consistent-subset' | 'median';

export const CONSENSUS_ESTIMATORS: readonly ConsensusEstimator[] = ['weighted-mean', 'random-effects-dl', 'random-effects-pm', 'largest-consistent-subset', 'median'];

export const DEFAULT_ESTIMATOR: ConsensusEstimator = 'random-effects-dl';

export interface ConsensusOptions {
  alpha?: number;
  /** Report R_B u(y) as `uncertainty` when R_B > 1 (weighted mean / LCS). Default false. */
  birgeScaling?: boolean;
  /** LCS exhaustive-search limit (default 20). */
  exhaustiveLimit?: number;
  median?: MedianOptions;
  /** Absolute tolerance under which results with u = 0 count as equal (rules.ts); default 0. */
  exactTolerance?: number;
}

export interface ConsensusResult {
  estimator: ConsensusEstimator;
  value: number;
  uncertainty: number;
  /** R_B u(y) when R_B > 1, else u(y) (weighted mean and LCS); equals uncertainty otherwise. */
  scaledUncertainty: number;
  test: ConsistencyTest;
  inputTest: ConsistencyTest;
  /** Indices of the inputs that entered the value. */
  included: number[];
  /** Indices that did not. */
  excluded: number[];
  disputed: boolean;
  /** Between-result variance (random effects); 0 otherwise. */
  tau2: number;
  /** Median only: Monte Carlo u(d_i) per input. */
  doeUncertainties?: number[];
  /** LCS only: which search path was used. */
  lcsMethod?: 'none-needed' | 'exhaustive' | 'greedy';
  /** Random effects only: I^2 in percent. */
  I2?: number;
  /** Weighted mean / LCS with birgeScaling: the factor R_B > 1 applied to u(y) (degrees of
   * equivalence scale every input uncertainty by it too, so that U(d_i) never becomes 0). */
  birgeScale?: number;
}

function complement(n: number, included: readonly number[]): number[] {
  const s = new Set(included);
  const out: number[] = [];
  for (let i = 0; i < n; i++) if (!s.has(i)) out.push(i);
  return out;
}

export function consensus(estimates: readonly Measurement[], estimator: ConsensusEstimator = DEFAULT_ESTIMATOR, options: ConsensusOptions = {}): ConsensusResult {
  const alpha = options.alpha ?? DEFAULT_ALPHA;
  const n = estimates.length;
  const full = weightedMean(estimates, { alpha, exactTolerance: options.exactTolerance });
  const inputTest = full.test;
  switch (estimator) {
    case 'weighted-mean': {
      return {
        estimator,
        value: full.value,
        uncertainty: options.birgeScaling ? full.scaledUncertainty : full.uncertainty,
        scaledUncertainty: full.scaledUncertainty,
        test: full.test,
        inputTest,
        included: full.included,
        excluded: full.excluded,
        disputed: !full.test.consistent,
        tau2: 0,
        ...(options.birgeScaling && full.scaledUncertainty > full.uncertainty ? { birgeScale: full.scaledUncertainty / full.uncertainty } : {}),
      };
    }
    case 'largest-consistent-subset': {
      const l = largestConsistentSubset(estimates, { alpha, exhaustiveLimit: options.exhaustiveLimit, full });
      const N = partitionByUncertainty(estimates).weighted.length;
      const tooFew = N >= 2 && l.subset.length < Math.max(2, Math.ceil(N / 2));
      return {
        estimator,
        value: l.mean.value,
        uncertainty: options.birgeScaling ? l.mean.scaledUncertainty : l.mean.uncertainty,
        scaledUncertainty: l.mean.scaledUncertainty,
        test: l.mean.test,
        inputTest,
        included: l.subset,
        excluded: complement(n, l.subset),
        disputed: !l.mean.test.consistent || tooFew,
        tau2: 0,
        lcsMethod: l.method,
        ...(options.birgeScaling && l.mean.scaledUncertainty > l.mean.uncertainty ? { birgeScale: l.mean.scaledUncertainty / l.mean.uncertainty } : {}),
      };
    }
    case 'random-effects-dl':
    case 'random-effects-pm': {
      const re = randomEffects(estimates, estimator === 'random-effects-dl' ? 'DL' : 'PM');
      if (re.included.length === 0) {
        return { ...consensus(estimates, 'weighted-mean', options), estimator, tau2: 0 };
      }
      const test = consistencyTest(re.residualChi2, re.included.length - 1, alpha);
      return {
        estimator,
        value: re.mu,
        uncertainty: re.se,
        scaledUncertainty: re.se,
        test,
        inputTest,
        included: re.included,
        excluded: complement(n, re.included),
        disputed: !test.consistent,
        tau2: re.tau2,
        I2: re.I2,
      };
    }
    case 'median': {
      const m = medianWithUncertainty(estimates, options.median);
      const w = partitionByUncertainty(estimates).weighted;
      const test = w.length > 0 ? consistencyTest(chi2About(estimates, w, m.value), w.length - 1, alpha) : inputTest;
      return {
        estimator,
        value: m.value,
        uncertainty: m.uncertainty,
        scaledUncertainty: m.uncertainty,
        test,
        inputTest,
        included: m.included,
        excluded: complement(n, m.included),
        disputed: !test.consistent,
        tau2: 0,
        doeUncertainties: m.doeUncertainties,
      };
    }
    default: {
      const never: never = estimator;
      throw new Error(`unknown consensus estimator: ${String(never)}`);
    }
  }
}
