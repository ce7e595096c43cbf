import { describe, expect, it } from 'vitest';
import { algorithmA, median, medianWithUncertainty } from '../../../shared/scoring/robust';
import { expectPublished } from './helpers';

// ISO 5725-5 creosote data via metRology algA
const CREOSOTE = [24.14, 20.155, 19.5, 20.3, 20.705, 17.57, 20.1, 20.94, 21.185];

describe('ISO 13528 Algorithm A', () => {
  it('iterations 1 and 2', () => {
    // ISO 5725-5 creosote data via metRology algA: iteration 1 (20.3872222, 0.9855966)
    const a1 = algorithmA(CREOSOTE, { iterations: 1 });
    expectPublished(a1.mean, '20.3872222');
    expectPublished(a1.sd, '0.9855966');
    // ISO 5725-5 creosote data via metRology algA: iteration 2 (20.4066049, 1.0096829)
    const a2 = algorithmA(CREOSOTE, { iterations: 2 });
    expectPublished(a2.mean, '20.4066049');
    expectPublished(a2.sd, '1.0096829');
  });
  it('fixed point', () => {
    // ISO 5725-5 creosote data via metRology algA: fixed point x* = 20.412142857, s* = 1.069839703
    const a = algorithmA(CREOSOTE);
    expect(a.converged).toBe(true);
    expectPublished(a.mean, '20.412142857');
    expectPublished(a.sd, '1.069839703');
  });
  it('iteration 0 is the median and 1.483 MAD; the ISO three-figure rule stops earlier', () => {
    const a0 = algorithmA(CREOSOTE, { iterations: 0 });
    expect(a0.mean).toBe(20.3);
    // direct evaluation: median of |x - 20.3| is 0.64
    expect(a0.sd).toBeCloseTo(1.483 * 0.64, 12);
    const iso = algorithmA(CREOSOTE, { stoppingRule: 'iso-3-figures' });
    expect(iso.iterations).toBeLessThan(algorithmA(CREOSOTE).iterations);
    expect(iso.mean.toPrecision(3)).toBe('20.4');
  });
  it('more than half identical gives s* = 0 and stops', () => {
    const a = algorithmA([1, 1, 1, 2, 5]);
    expect(a.mean).toBe(1);
    expect(a.sd).toBe(0);
  });
});

describe('median with Monte Carlo uncertainty (Cox 2002 procedure B)', () => {
  it('is reproducible with a seed and sensible in size', () => {
    const xs = [1, 2, 3, 4, 5].map((value) => ({ value, uncertainty: 0.1 }));
    const a = medianWithUncertainty(xs, { seed: 7, trials: 4000 });
    const b = medianWithUncertainty(xs, { seed: 7, trials: 4000 });
    expect(a.value).toBe(3);
    expect(a.uncertainty).toBe(b.uncertainty);
    // direct evaluation: well-separated values, the median is the middle one, u ~ 0.1
    expect(a.uncertainty).toBeGreaterThan(0.09);
    expect(a.uncertainty).toBeLessThan(0.11);
    // u(d_middle) ~ 0 since d_3 = x_3 - median = 0 in nearly every trial
    expect(a.doeUncertainties[2]).toBeLessThan(0.01);
    expect(a.doeUncertainties[0]).toBeGreaterThan(0.12);
    expect(median([4, 1, 3, 2])).toBe(2.5);
  });
});
