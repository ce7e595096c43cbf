import { describe, expect, it } from 'vitest';
import { randomEffects } from '../../../shared/scoring/random-effects';
import { bcgLogRiskRatios as bcg } from './bcg';
import { expectPublished, expectRel } from './helpers';

describe('random effects on the BCG trials', () => {
  const dl = randomEffects(bcg, 'DL');
  const pm = randomEffects(bcg, 'PM');
  const reml = randomEffects(bcg, 'REML');
  it('Q and the fixed-effect estimate', () => {
    // metafor 3.8-1 dat.bcg: Q = 152.2330080824 (df 12)
    expectRel(dl.Q, 152.2330080824, 1e-6);
    expect(dl.df).toBe(12);
    // metafor 3.8-1 dat.bcg: fixed effect mu = -0.4302851637, SE 0.0404987517
    expectRel(dl.fixedMu, -0.4302851637, 1e-6);
    expectRel(dl.fixedSe, 0.0404987517, 1e-6);
  });
  it('DerSimonian-Laird', () => {
    // metafor 3.8-1 dat.bcg: DL tau^2 = 0.3087602629, mu = -0.7141172221, SE = 0.1787420895, I^2 = 92.1173%
    expectRel(dl.tau2, 0.3087602629, 1e-6);
    expectRel(dl.mu, -0.7141172221, 1e-6);
    expectRel(dl.se, 0.1787420895, 1e-6);
    expectPublished(dl.I2, '92.1173');
  });
  it('REML', () => {
    // metafor 3.8-1 dat.bcg: REML tau^2 = 0.3132432581, mu = -0.7145323422, SE = 0.1797815161
    expectRel(reml.tau2, 0.3132432581, 1e-6);
    expectRel(reml.mu, -0.7145323422, 1e-6);
    expectRel(reml.se, 0.1797815161, 1e-6);
    expect(reml.converged).toBe(true);
  });
  it('Paule-Mandel, fully converged', () => {
    // metafor 3.8-1 dat.bcg: PM tau^2 = 0.3180684522 (fully converged), mu = -0.7149681535
    expectRel(pm.tau2, 0.3180684522, 1e-6);
    expectRel(pm.mu, -0.7149681535, 1e-6);
    // direct evaluation: at the PM root the generalised Q equals k - 1
    const q = bcg.reduce((s, m) => s + (m.value - pm.mu) ** 2 / (m.uncertainty ** 2 + pm.tau2), 0);
    expectRel(q, 12, 1e-10);
  });
  it('homogeneous data give tau^2 = 0 and the fixed-effect mean', () => {
    const xs = [1, 1.01, 0.99].map((value) => ({ value, uncertainty: 0.1 }));
    for (const m of ['DL', 'PM', 'REML'] as const) {
      const r = randomEffects(xs, m);
      expect(r.tau2).toBe(0);
      expectRel(r.mu, 1, 1e-12);
      expectRel(r.se, 0.1 / Math.sqrt(3), 1e-12);
    }
  });
});
