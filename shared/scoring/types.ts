/**
 * Input and output types shared by the scoring modules (SCORING.md, PRODUCT.md vocabulary).
 * Plain data; no framework imports.
 */

import type { UncertaintyKind } from '../vocabulary';

/** Kind of the declared uncertainty (shared/vocabulary.ts, from the entry schema). It is metadata: every
 * formula treats `uncertainty` as a standard uncertainty (1 sigma) whatever the kind; 'none' normally
 * comes with uncertainty 0. */
export type { UncertaintyKind };

/** The minimum every statistic needs: a value and its standard uncertainty (1 sigma). */
export interface Measurement {
  value: number;
  /** Standard uncertainty (1 sigma), >= 0. */
  uncertainty: number;
}

/** An estimate as submitted by an entry for one target. */
export interface Estimate extends Measurement {
  kind: UncertaintyKind;
}

/** A reference value for a target. `uncertainty` absent (or 0) means exact. */
export interface Reference {
  value: number;
  uncertainty?: number;
}

/** Chi-squared consistency test about a value. */
export interface ConsistencyTest {
  /** sum (x_i - y)^2 / u_i^2 over the tested results (plus tau^2 in the variance for random effects). */
  chi2: number;
  /** Degrees of freedom, n - 1 (0 when fewer than two results). */
  nu: number;
  /** P(chi2_nu > chi2_obs); 1 when nu = 0 (nothing to test); NaN when nothing was tested. */
  p: number;
  /** R_B = sqrt(chi2 / nu); NaN when nu = 0. */
  birgeRatio: number;
  /** p >= alpha (default alpha 0.05). */
  consistent: boolean;
}
