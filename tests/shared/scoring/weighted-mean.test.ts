import { describe, expect, it } from 'vitest';
import { weightedMean } from '../../../shared/scoring/weighted-mean';
import { expectPublished, expectRel } from './helpers';
import { coxVector } from './cox';


describe('weighted mean (Cox 2002 procedure A)', () => {
  it('BIPM-RI Python_lib CoxProcedureA test vector', () => {
    const r = weightedMean(coxVector);
    // BIPM-RI Python_lib CoxProcedureA test vector
    expectRel(r.value, 43877.38039, 1e-6);
    expectPublished(r.value, '43877.38039');
    expectPublished(r.uncertainty, '53.47732617');
    expectPublished(r.test.chi2, '1.778594');
    expectPublished(r.test.p, '0.776396');
    expectPublished(r.test.birgeRatio, '0.66682');
    expect(r.test.nu).toBe(4);
    expect(r.test.consistent).toBe(true);
    // R_B < 1: no scaling
    expect(r.scaledUncertainty).toBe(r.uncertainty);
  });
  it('identical values give that value with chi2 = 0', () => {
    const r = weightedMean([0.25, 0.25, 0.25].map((value, i) => ({ value, uncertainty: 0.01 * (i + 1) })));
    expect(r.value).toBeCloseTo(0.25, 15);
    expect(r.test.chi2).toBeCloseTo(0, 25);
    expect(r.test.p).toBe(1);
    expect(r.test.consistent).toBe(true);
  });
  it('Birge scaling when R_B > 1', () => {
    // direct evaluation: x = +-1, u = 0.1: y = 0, chi2 = 200, nu = 1, R_B = sqrt(200);
    // the scaled uncertainty R_B u(y) is the particle-physics scale-factor rule (memory, as in SCORING.md)
    const r = weightedMean([{ value: -1, uncertainty: 0.1 }, { value: 1, uncertainty: 0.1 }]);
    expectRel(r.test.chi2, 200, 1e-12);
    expectRel(r.test.birgeRatio, Math.sqrt(200), 1e-12);
    expectRel(r.scaledUncertainty, Math.sqrt(200) * 0.1 / Math.SQRT2, 1e-12);
    expect(r.test.consistent).toBe(false);
  });
  it('N = 0, N = 1 and zero uncertainties', () => {
    const e = weightedMean([]);
    expect(Number.isNaN(e.value)).toBe(true);
    expect(e.included).toEqual([]);
    const one = weightedMean([{ value: 3, uncertainty: 0.5 }]);
    expect(one.value).toBe(3);
    expect(one.uncertainty).toBe(0.5);
    expect(one.test.nu).toBe(0);
    expect(one.test.p).toBe(1);
    expect(Number.isNaN(one.test.birgeRatio)).toBe(true);
    const z = weightedMean([{ value: 1, uncertainty: 0 }, { value: 2, uncertainty: 1 }, { value: 4, uncertainty: 1 }]);
    expect(z.excluded).toEqual([0]);
    expect(z.value).toBe(3);
    const allZero = weightedMean([{ value: 1, uncertainty: 0 }, { value: 2, uncertainty: 0 }]);
    expect(allZero.value).toBe(1.5);
    expect(allZero.test.consistent).toBe(false);
    const allZeroSame = weightedMean([{ value: 1, uncertainty: 0 }, { value: 1, uncertainty: 0 }]);
    expect(allZeroSame.test.consistent).toBe(true);
    expect(allZeroSame.uncertainty).toBe(0);
  });
});
