import { describe, expect, it } from 'vitest';
import { classifyZ, crpsNormal, enScore, intervalScore, scoreAgainstReference, scoreSweep, zScore, zetaScore } from '../../../shared/scoring/exact';
import { expectRel } from './helpers';

describe('CRPS of a Gaussian', () => {
  it('published values', () => {
    // scoringRules package tests: standard normal, y = 0
    expectRel(crpsNormal(0, 1, 0), 0.2336949773, 1e-6);
    // scoringRules package tests: standard normal, y = 1
    expectRel(crpsNormal(0, 1, 1), 0.6024413576, 1e-6);
    // direct evaluation: 1.2 +/- 0.3 against 1.0
    expectRel(crpsNormal(1.2, 0.3, 1.0), 0.1214149132, 1e-6);
    // direct evaluation: 1.2 +/- 0.05 against 1.0 (overconfident entry penalised)
    expectRel(crpsNormal(1.2, 0.05, 1.0), 0.1717912353, 1e-6);
    expect(crpsNormal(1.2, 0.05, 1.0)).toBeGreaterThan(crpsNormal(1.2, 0.3, 1.0));
  });
  it('u = 0 gives |x - r|', () => {
    expect(crpsNormal(1.25, 0, 1)).toBe(0.25);
    expect(crpsNormal(-3, 0, -3)).toBe(0);
  });
});

describe('interval (Winkler) score', () => {
  it('published values', () => {
    // scoringRules tests: y = 2, [-1, 1], 80%
    expect(intervalScore(-1, 1, 2, 0.2)).toBeCloseTo(12, 12);
    // scoringRules tests: y = 2, [-1, 1], 50%
    expect(intervalScore(-1, 1, 2, 0.5)).toBeCloseTo(6, 12);
    // scoringRules tests: y = 1, [-1, 1], 80%
    expect(intervalScore(-1, 1, 1, 0.2)).toBeCloseTo(2, 12);
  });
  it('penalises a miss below the interval', () => {
    // direct evaluation: width 2 + (2/0.2)(1 - 0.5) = 7
    expect(intervalScore(1, 3, 0.5, 0.2)).toBeCloseTo(7, 12);
  });
});

describe('z, zeta, En and classes', () => {
  it('classes at the ISO 13528 boundaries (memory)', () => {
    expect(classifyZ(2)).toBe('satisfactory');
    expect(classifyZ(-2.0000001)).toBe('questionable');
    expect(classifyZ(2.999)).toBe('questionable');
    expect(classifyZ(3)).toBe('unsatisfactory');
    expect(classifyZ(NaN)).toBe('undefined');
  });
  it('u = 0 convention', () => {
    expect(zScore(1, 0, 1)).toBe(0);
    expect(zScore(1.1, 0, 1)).toBe(Infinity);
    expect(zScore(0.9, 0, 1)).toBe(-Infinity);
    expect(classifyZ(zScore(0.9, 0, 1))).toBe('unsatisfactory');
    expect(Number.isNaN(zScore(1, -1, 1))).toBe(true);
  });
  it('zeta and En', () => {
    // direct evaluation: (1.5 - 1)/sqrt(0.3^2 + 0.4^2) = 1
    expectRel(zetaScore(1.5, 0.3, 1, 0.4), 1, 1e-14);
    expectRel(enScore(1.5, 0.3, 1, 0.4), 0.5, 1e-14);
  });
  it('scoreAgainstReference', () => {
    const s = scoreAgainstReference({ value: 1.2, uncertainty: 0.3 }, { value: 1 });
    expectRel(s.error, 0.2, 1e-12);
    expectRel(s.z, 2 / 3, 1e-12);
    expect(s.zClass).toBe('satisfactory');
    expect(s.covered).toBe(true);
    expect(s.zeta).toBeNull();
    expect(s.en).toBeNull();
    expectRel(s.crps, 0.1214149132, 1e-6);
    // direct evaluation: 95% interval 1.2 +/- 1.959964*0.3 contains 1, score = its width
    expectRel(s.intervalScore, 2 * 1.959963984540054 * 0.3, 1e-12);
    const t = scoreAgainstReference({ value: 1.2, uncertainty: 0.05 }, { value: 1, uncertainty: 0.01 });
    expect(t.covered).toBe(false);
    expect(t.zClass).toBe('unsatisfactory');
    expect(t.zeta).not.toBeNull();
  });
});

describe('sweep statistics', () => {
  it('separates verifiable and unverifiable targets and counts grid coverage', () => {
    const s = scoreSweep([
      { targetId: 'a', estimate: { value: 0.1, uncertainty: 0.1 }, reference: { value: 0 } },
      { targetId: 'b', estimate: { value: -0.3, uncertainty: 0.1 }, reference: { value: 0 } },
      { targetId: 'c', estimate: undefined, reference: { value: 0.5 } },
      { targetId: 'd', estimate: { value: 0.5, uncertainty: 0.1 }, consensus: { value: 0.45, uncertainty: 0.05 } },
    ]);
    // direct evaluation
    expect(s.verifiable.targets).toBe(3);
    expect(s.verifiable.answered).toBe(2);
    expectRel(s.verifiable.gridCoverage, 2 / 3, 1e-14);
    expectRel(s.verifiable.rmse, Math.sqrt((0.01 + 0.09) / 2), 1e-12);
    expectRel(s.verifiable.maxAbsError, 0.3, 1e-12);
    expectRel(s.verifiable.meanZ2, (1 + 9) / 2, 1e-12);
    expect(s.verifiable.fractionCovered).toBe(0.5);
    expectRel(s.verifiable.meanCrps, (crpsNormal(0.1, 0.1, 0) + crpsNormal(-0.3, 0.1, 0)) / 2, 1e-12);
    expect(s.unverifiable.targets).toBe(1);
    expectRel(s.unverifiable.rmse, 0.05, 1e-9);
    expectRel(s.unverifiable.meanZ2, 0.05 ** 2 / (0.01 + 0.0025), 1e-9);
    expectRel(s.gridCoverage, 3 / 4, 1e-14);
  });
});
