/**
 * Every check value of SCORING.md to every digit it is quoted with (the other test files compare
 * most of them at 1e-6 relative). Sources are named beside each value as in SCORING.md.
 */
import { describe, it } from 'vitest';
import { randomEffects } from '../../../shared/scoring/random-effects';
import { weightedMean } from '../../../shared/scoring/weighted-mean';
import { degreesOfEquivalence } from '../../../shared/scoring/equivalence';
import { crpsNormal, intervalScore } from '../../../shared/scoring/exact';
import { exponentialFit, linearFit, richardson, richardsonCoefficients } from '../../../shared/scoring/zne';
import { algorithmA } from '../../../shared/scoring/robust';
import { bcgLogRiskRatios as bcg } from './bcg';
import { coxVector } from './cox';
import { expectAllDigits } from './helpers';

describe('SCORING.md check values to every quoted digit', () => {
  it('BCG trials (metafor 3.8-1 dat.bcg; its tests cross-check Stata metan)', () => {
    const dl = randomEffects(bcg, 'DL');
    const reml = randomEffects(bcg, 'REML');
    const pm = randomEffects(bcg, 'PM');
    expectAllDigits(dl.Q, '152.2330080824');
    expectAllDigits(dl.fixedMu, '-0.4302851637');
    expectAllDigits(dl.fixedSe, '0.0404987517');
    expectAllDigits(dl.tau2, '0.3087602629');
    expectAllDigits(dl.mu, '-0.7141172221');
    expectAllDigits(dl.se, '0.1787420895');
    expectAllDigits(dl.I2, '92.1173');
    expectAllDigits(reml.tau2, '0.3132432581');
    expectAllDigits(reml.mu, '-0.7145323422');
    expectAllDigits(reml.se, '0.1797815161');
    // "fully converged": a PM stopped at a loose tolerance misses the last digits
    expectAllDigits(pm.tau2, '0.3180684522');
    expectAllDigits(pm.mu, '-0.7149681535');
  });

  it('Cox procedure A (BIPM-RI Python_lib CoxProcedureA test vector)', () => {
    const r = weightedMean(coxVector);
    expectAllDigits(r.value, '43877.38039');
    expectAllDigits(r.uncertainty, '53.47732617');
    expectAllDigits(r.test.chi2, '1.778594');
    expectAllDigits(r.test.p, '0.776396');
    expectAllDigits(r.test.birgeRatio, '0.66682');
    const doe = degreesOfEquivalence(coxVector, r);
    ['-105.380389', '32.619611', '69.619611', '32.619611', '22.619611'].forEach((d, i) => expectAllDigits(doe[i].d, d));
    ['161.853954', '168.999119', '179.559746', '301.596920', '549.691461'].forEach((U, i) => expectAllDigits(doe[i].U, U));
  });

  it('CRPS (scoringRules package tests and direct evaluation) and the interval score (scoringRules tests)', () => {
    expectAllDigits(crpsNormal(0, 1, 0), '0.2336949773');
    expectAllDigits(crpsNormal(0, 1, 1), '0.6024413576');
    expectAllDigits(crpsNormal(1.2, 0.3, 1.0), '0.1214149132');
    expectAllDigits(crpsNormal(1.2, 0.05, 1.0), '0.1717912353');
    expectAllDigits(intervalScore(-1, 1, 2, 0.2), '12');
    expectAllDigits(intervalScore(-1, 1, 2, 0.5), '6');
    expectAllDigits(intervalScore(-1, 1, 1, 0.2), '2');
  });

  it('ZNE coefficients and worked example (Temme, Bravyi and Gambetta 2017; direct evaluation)', () => {
    const cases: [number[], string[]][] = [
      [[1, 2], ['2', '-1']],
      [[1, 2, 3], ['3', '-3', '1']],
      [[1, 3, 5], ['1.875', '-1.25', '0.375']],
      [[1, 1.5, 2], ['6', '-8', '3']],
    ];
    for (const [c, g] of cases) richardsonCoefficients(c).forEach((v, j) => expectAllDigits(v, g[j]));
    const worked = [0.8, 0.65, 0.52].map((value, j) => ({ scale: j + 1, value, uncertainty: 0.01 }));
    expectAllDigits(richardson(worked).value, '0.97');
    expectAllDigits(richardson(worked).uncertainty, '0.0435889894');
    expectAllDigits(linearFit(worked).value, '0.9366666667');
    expectAllDigits(linearFit(worked).uncertainty, '0.0152752523');
    expectAllDigits(exponentialFit(worked, { weighting: 'unweighted' }).value, '0.9948452693');
  });

  it('Algorithm A (ISO 5725-5 creosote data as in metRology algA)', () => {
    const x = [24.14, 20.155, 19.5, 20.3, 20.705, 17.57, 20.1, 20.94, 21.185];
    const a1 = algorithmA(x, { iterations: 1 });
    expectAllDigits(a1.mean, '20.3872222');
    expectAllDigits(a1.sd, '0.9855966');
    const a2 = algorithmA(x, { iterations: 2 });
    expectAllDigits(a2.mean, '20.4066049');
    expectAllDigits(a2.sd, '1.0096829');
    const a = algorithmA(x);
    expectAllDigits(a.mean, '20.412142857');
    expectAllDigits(a.sd, '1.069839703');
  });
});
