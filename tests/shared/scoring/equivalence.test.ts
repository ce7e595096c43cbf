import { describe, expect, it } from 'vitest';
import { degreesOfEquivalence, entryAgreement, pairwiseEquivalence } from '../../../shared/scoring/equivalence';
import { consensus } from '../../../shared/scoring/consensus';
import { weightedMean } from '../../../shared/scoring/weighted-mean';
import { coxVector } from './cox';
import { expectPublished, expectRel } from './helpers';

describe('degrees of equivalence', () => {
  it('BIPM-RI Python_lib CoxProcedureA test vector: d and U(d)', () => {
    const wm = weightedMean(coxVector);
    const doe = degreesOfEquivalence(coxVector, wm);
    // BIPM-RI Python_lib CoxProcedureA test vector
    const d = ['-105.380389', '32.619611', '69.619611', '32.619611', '22.619611'];
    const U = ['161.853954', '168.999119', '179.559746', '301.596920', '549.691461'];
    doe.forEach((x, i) => {
      expectPublished(x.d, d[i]);
      expectPublished(x.U, U[i]);
      expect(x.included).toBe(true);
    });
  });
  it('excluded results use u_i^2 + u^2(y)', () => {
    const xs = [...coxVector, { value: 50000, uncertainty: 100 }];
    const c = consensus(xs, 'largest-consistent-subset');
    expect(c.excluded).toEqual([5]);
    const doe = degreesOfEquivalence(xs, c);
    // direct evaluation
    expectRel(doe[5].u, Math.sqrt(100 ** 2 + c.uncertainty ** 2), 1e-12);
    expectRel(doe[0].u, Math.sqrt(97 ** 2 - c.uncertainty ** 2), 1e-12);
  });
  it('random effects include tau^2 in u(d_i)', () => {
    const xs = [0, 1, 2, 3].map((value) => ({ value, uncertainty: 0.1 }));
    const c = consensus(xs, 'random-effects-dl');
    expect(c.tau2).toBeGreaterThan(0);
    const doe = degreesOfEquivalence(xs, c);
    // direct evaluation: u^2(d_i) = u_i^2 + tau^2 - u^2(mu)
    expectRel(doe[0].u ** 2, 0.01 + c.tau2 - c.uncertainty ** 2, 1e-12);
  });
  it('pairwise', () => {
    const p = pairwiseEquivalence(coxVector);
    // direct evaluation
    expect(p.d[0][1]).toBe(43772 - 43910);
    expectRel(p.U[0][1], 2 * Math.hypot(97, 100), 1e-14);
    expect(p.d[2][2]).toBe(0);
  });
  it('entry agreement: median |d|/U and count of |d| > U', () => {
    const a = entryAgreement([
      { d: 1, U: 2 },
      { d: -3, U: 2 },
      { d: 0.2, U: 1 },
      { d: 0, U: 0 },
    ]);
    // direct evaluation: ratios 0.5, 1.5, 0.2, 0 -> median 0.35
    expectRel(a.medianRatio, 0.35, 1e-14);
    expect(a.exceedCount).toBe(1);
    expect(a.targets).toBe(4);
  });
});
