import { describe, expect, it } from 'vitest';
import { chiSquaredCdf, chiSquaredSurvival, erf, normalCdf, normalQuantile, regularizedGammaP, regularizedGammaQ } from '../../../shared/scoring/special';
import { expectRel } from './helpers';

describe('special functions', () => {
  it('chi-squared survival of nu = 2 is exp(-x/2)', () => {
    // direct evaluation: for nu = 2 the survival function is exp(-x/2) exactly
    for (const x of [0.1, 1, 5, 20, 60]) expectRel(chiSquaredSurvival(x, 2), Math.exp(-x / 2), 1e-12);
  });
  it('chi-squared CDF of nu = 1 equals erf(sqrt(x/2))', () => {
    // direct evaluation: chi2_1 = Z^2
    for (const x of [0.01, 0.5, 3.841458820694124, 10]) expectRel(chiSquaredCdf(x, 1), erf(Math.sqrt(x / 2)), 1e-12);
    // (memory) 3.841458820694124 is the 95% point of chi2_1
    expectRel(chiSquaredSurvival(3.841458820694124, 1), 0.05, 1e-9);
  });
  it('P + Q = 1 across the series / continued-fraction switch', () => {
    for (const a of [0.5, 2, 6.5, 30]) for (const x of [0.2, a, a + 0.99, a + 1.01, 3 * a]) expectRel(regularizedGammaP(a, x) + regularizedGammaQ(a, x), 1, 1e-13);
  });
  it('normal CDF and quantile', () => {
    // (memory) Phi(1.959963984540054) = 0.975
    expectRel(normalCdf(1.959963984540054), 0.975, 1e-12);
    expectRel(normalQuantile(0.975), 1.959963984540054, 1e-12);
    // (memory) qnorm(1e-10) in R
    expectRel(normalQuantile(1e-10), -6.361340902404056, 1e-9);
    expect(normalCdf(0)).toBe(0.5);
  });
});
