import { describe, expect, it } from 'vitest';
import { CONSENSUS_ESTIMATORS, consensus } from '../../../shared/scoring/consensus';
import { coxVector } from './cox';
import { bcgLogRiskRatios } from './bcg';
import { expectRel } from './helpers';

describe('consensus entry point', () => {
  it('weighted mean on the Cox vector', () => {
    const c = consensus(coxVector, 'weighted-mean');
    // BIPM-RI Python_lib CoxProcedureA test vector
    expectRel(c.value, 43877.38039, 1e-6);
    expectRel(c.uncertainty, 53.47732617, 1e-6);
    expect(c.estimator).toBe('weighted-mean');
    expect(c.disputed).toBe(false);
    expect(c.included).toEqual([0, 1, 2, 3, 4]);
  });
  it('random effects through the entry point match the BCG values', () => {
    // metafor 3.8-1 dat.bcg: DL mu = -0.7141172221, SE = 0.1787420895; PM mu = -0.7149681535
    const dl = consensus(bcgLogRiskRatios, 'random-effects-dl');
    expectRel(dl.value, -0.7141172221, 1e-6);
    expectRel(dl.uncertainty, 0.1787420895, 1e-6);
    expectRel(consensus(bcgLogRiskRatios, 'random-effects-pm').value, -0.7149681535, 1e-6);
    // the raw inputs are heterogeneous; the weighted mean is disputed, random effects is not
    expect(dl.inputTest.consistent).toBe(false);
    expect(consensus(bcgLogRiskRatios, 'weighted-mean').disputed).toBe(true);
    expect(dl.disputed).toBe(false);
  });
  it('LCS drops a gross outlier and is then not disputed; an even split is disputed', () => {
    const xs = [...coxVector, { value: 45000, uncertainty: 50 }];
    const c = consensus(xs, 'largest-consistent-subset');
    expect(c.excluded).toEqual([5]);
    expect(c.disputed).toBe(false);
    expect(c.inputTest.consistent).toBe(false);
    const split = consensus([{ value: 0, uncertainty: 0.01 }, { value: 1, uncertainty: 0.01 }], 'largest-consistent-subset');
    expect(split.included.length).toBe(1);
    expect(split.disputed).toBe(true);
  });
  it('edge cases for every estimator: N = 0, 1, 2, identical values, zero uncertainty', () => {
    for (const e of CONSENSUS_ESTIMATORS) {
      const none = consensus([], e);
      expect(Number.isNaN(none.value)).toBe(true);
      expect(none.disputed).toBe(false);
      expect(none.estimator).toBe(e);
      const one = consensus([{ value: 0.5, uncertainty: 0.1 }], e);
      expect(one.value).toBe(0.5);
      expect(one.disputed).toBe(false);
      const two = consensus([{ value: 0.5, uncertainty: 0.1 }, { value: 0.52, uncertainty: 0.1 }], e);
      expectRel(two.value, 0.51, 1e-12);
      expect(two.disputed).toBe(false);
      const same = consensus([0.2, 0.2, 0.2].map((value) => ({ value, uncertainty: 0.05 })), e);
      expectRel(same.value, 0.2, 1e-14);
      expect(same.test.chi2).toBeCloseTo(0, 20);
      const zeroU = consensus([{ value: 0.3, uncertainty: 0 }, { value: 0.5, uncertainty: 0.1 }, { value: 0.52, uncertainty: 0.1 }], e);
      if (e === 'median') expect(zeroU.included).toEqual([0, 1, 2]);
      else expect(zeroU.excluded).toEqual([0]);
    }
  });
  it('median estimator is seeded and reproducible', () => {
    const a = consensus(coxVector, 'median');
    const b = consensus(coxVector, 'median');
    expect(a.value).toBe(43910);
    expect(a.uncertainty).toBe(b.uncertainty);
    expect(a.doeUncertainties?.length).toBe(5);
  });
});
