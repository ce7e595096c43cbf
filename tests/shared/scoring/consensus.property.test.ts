/**
 * Property tests of the consensus estimators (SCORING.md "Without an exact reference"), fast-check
 * with fixed seeds. The properties follow from the formulas (common practice for estimators):
 * permutation invariance, shift equivariance (shifting every value shifts the consensus), scale
 * equivariance (scaling values and uncertainties scales the value, its uncertainty and sqrt(tau^2)
 * and leaves chi2, p, R_B, I^2 and the chosen subset unchanged), finite outputs for finite valid
 * inputs, the one-entry and identical-value limits, and the tau^2 = 0 boundary of DL and PM.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { CONSENSUS_ESTIMATORS, consensus, type ConsensusEstimator } from '../../../shared/scoring/consensus';
import { weightedMean } from '../../../shared/scoring/weighted-mean';
import { randomEffects } from '../../../shared/scoring/random-effects';
import { largestConsistentSubset } from '../../../shared/scoring/lcs';
import { degreesOfEquivalence } from '../../../shared/scoring/equivalence';
import { chiSquaredSurvival } from '../../../shared/scoring/special';
import { createRng } from '../../../shared/scoring/prng';
import type { Measurement } from '../../../shared/scoring/types';

/** A set of 1 to 9 results at unit scale: values in [-1, 1], u in [0.005, 0.5]. */
const arbSet = (min = 1, max = 9) =>
  fc.array(
    fc.record({ value: fc.double({ min: -1, max: 1, noNaN: true }).map((v) => (Math.abs(v) < 1e-12 ? 0 : v)), uncertainty: fc.double({ min: 0.005, max: 0.5, noNaN: true }) }),
    { minLength: min, maxLength: max, size: 'max' },
  );
/** Mostly consistent sets with an occasional outlier (so that LCS and random effects have work). */
const arbMixed = fc.oneof(
  arbSet(),
  fc.tuple(arbSet(2, 8), fc.double({ min: 0.05, max: 0.3, noNaN: true })).map(([xs, spread]) => xs.map((m, i) => ({ value: 0.3 + spread * m.value * (i % 3 === 0 ? 20 : 1), uncertainty: m.uncertainty * spread }))),
);
const WEIGHTED: ConsensusEstimator[] = ['weighted-mean', 'random-effects-dl', 'random-effects-pm', 'largest-consistent-subset'];
const close = (a: number, b: number, tol: number) => Math.abs(a - b) <= tol * Math.max(1, Math.abs(a), Math.abs(b));
const rel = (a: number, b: number, tol: number) => Math.abs(a - b) <= tol * Math.max(Math.abs(a), Math.abs(b)) || a === b;

describe('every estimator: permutation invariance, finite outputs', () => {
  it('reordering the inputs changes nothing but the indices', () => {
    fc.assert(
      fc.property(arbMixed, fc.nat(), (xs, seed) => {
        const rng = createRng(seed);
        const perm = xs.map((_, i) => i);
        for (let i = perm.length - 1; i > 0; i--) {
          const j = Math.floor(rng.uniform() * (i + 1));
          [perm[i], perm[j]] = [perm[j], perm[i]];
        }
        const ys = perm.map((i) => xs[i]);
        for (const e of WEIGHTED) {
          const a = consensus(xs, e);
          const b = consensus(ys, e);
          expect(close(a.test.chi2, b.test.chi2, 1e-9), e).toBe(true);
          expect(a.disputed, e).toBe(b.disputed);
          expect(b.included.length).toBe(a.included.length);
          // the LCS breaks chi2 ties in a canonical order (uncertainty, then value), not by index
          expect(close(a.value, b.value, 1e-12), e).toBe(true);
          expect(close(a.uncertainty, b.uncertainty, 1e-12), e).toBe(true);
          expect(b.included.map((i) => perm[i]).sort((p, q) => p - q)).toEqual(a.included);
        }
        // the median, with its Monte Carlo uncertainty and per-input u(d_i): draws in a canonical order
        const ma = consensus(xs, 'median', { median: { trials: 50 } });
        const mb = consensus(ys, 'median', { median: { trials: 50 } });
        expect(mb.value).toBe(ma.value);
        expect(mb.uncertainty).toBe(ma.uncertainty);
        expect(mb.test.chi2).toBeCloseTo(ma.test.chi2, 9);
        perm.forEach((orig, k) => expect(close(mb.doeUncertainties![k], ma.doeUncertainties![orig], 1e-12)).toBe(true));
      }),
      { seed: 101, numRuns: 300 },
    );
  });

  it('finite value, uncertainty, chi2 and p for finite valid inputs, at any scale the entry format allows (u in [1e-300, 1e15])', () => {
    const arbScaled = fc.tuple(arbMixed, fc.constantFrom(1e-300, 1e-200, 1e-160, 1e-40, 1e-12, 1, 1e6, 1e12)).map(([xs, s]) => xs.map((m) => ({ value: m.value * s, uncertainty: m.uncertainty * s })));
    fc.assert(
      fc.property(arbScaled, (xs) => {
        for (const e of CONSENSUS_ESTIMATORS) {
          const c = consensus(xs, e, { median: { trials: 50 } });
          expect(Number.isFinite(c.value), `${e} value`).toBe(true);
          expect(Number.isFinite(c.uncertainty), `${e} uncertainty`).toBe(true);
          expect(Number.isFinite(c.test.chi2), `${e} chi2`).toBe(true);
          expect(Number.isFinite(c.test.p), `${e} p`).toBe(true);
          expect(Number.isFinite(c.tau2), `${e} tau2`).toBe(true);
          for (const d of degreesOfEquivalence(xs, c)) expect(Number.isFinite(d.U), `${e} U(d)`).toBe(true);
        }
      }),
      { seed: 202, numRuns: 300 },
    );
  });
});

describe('shift and scale equivariance', () => {
  it('shifting every value by c shifts the consensus by c; chi2, tau^2 and the subset are unchanged', () => {
    fc.assert(
      fc.property(arbMixed, fc.double({ min: -1e3, max: 1e3, noNaN: true }), (xs, c) => {
        const ys = xs.map((m) => ({ value: m.value + c, uncertainty: m.uncertainty }));
        for (const e of CONSENSUS_ESTIMATORS) {
          const a = consensus(xs, e, { median: { trials: 200 } });
          const b = consensus(ys, e, { median: { trials: 200 } });
          // tolerance: rounding of x + c is |c| eps per value
          expect(Math.abs(b.value - c - a.value), e).toBeLessThanOrEqual(1e-12 * (1 + Math.abs(c)) * 8);
          expect(close(a.uncertainty, b.uncertainty, 1e-6), e).toBe(true);
          if (e !== 'median') expect(b.included, e).toEqual(a.included);
        }
      }),
      { seed: 303, numRuns: 200 },
    );
  });

  it('scaling values and uncertainties by s scales the value, u and tau; chi2, p, R_B and I^2 do not change (s from 1e-150 to 1e12)', () => {
    fc.assert(
      fc.property(arbMixed, fc.constantFrom(1e-150, 1e-100, 1e-20, 1e-8, 1e-3, 10, 1e5, 1e12), (xs, s) => {
        const ys = xs.map((m) => ({ value: m.value * s, uncertainty: m.uncertainty * s }));
        for (const e of WEIGHTED) {
          const a = consensus(xs, e);
          const b = consensus(ys, e);
          expect(close(b.value / s, a.value, 1e-12), `${e} value ${a.value} vs ${b.value / s}`).toBe(true);
          expect(rel(b.uncertainty / s, a.uncertainty, 1e-12), `${e} u`).toBe(true);
          expect(close(b.test.chi2, a.test.chi2, 1e-8), `${e} chi2`).toBe(true);
          expect(close(b.inputTest.p, a.inputTest.p, 1e-8), `${e} p`).toBe(true);
          expect(rel(Math.sqrt(b.tau2) / s, Math.sqrt(a.tau2), 1e-7), `${e} tau ${Math.sqrt(a.tau2)} vs ${Math.sqrt(b.tau2) / s}`).toBe(true);
          expect(b.included, e).toEqual(a.included);
          expect(b.disputed, e).toBe(a.disputed);
        }
        for (const m of ['DL', 'PM', 'REML'] as const) {
          const a = randomEffects(xs, m);
          const b = randomEffects(ys, m);
          expect(rel(Math.sqrt(b.tau2) / s, Math.sqrt(a.tau2), 1e-7), `${m} tau`).toBe(true);
          if (a.included.length > 1) expect(close(b.I2, a.I2, 1e-7), `${m} I2`).toBe(true);
        }
      }),
      { seed: 404, numRuns: 200 },
    );
  });
});

describe('limits', () => {
  it('one entry: its value and uncertainty, nu = 0, p = 1, not disputed', () => {
    fc.assert(
      fc.property(arbSet(1, 1), ([m]) => {
        for (const e of WEIGHTED) {
          const c = consensus([m], e);
          expect(c.value).toBe(m.value);
          expect(rel(c.uncertainty, m.uncertainty, 1e-15)).toBe(true);
          expect(c.test.nu).toBe(0);
          expect(c.test.p).toBe(1);
          expect(c.disputed).toBe(false);
          expect(c.tau2).toBe(0);
        }
      }),
      { seed: 505, numRuns: 100 },
    );
  });

  it('identical values: that value, chi2 = 0, tau^2 = 0, not disputed, whatever the uncertainties (also tiny ones)', () => {
    fc.assert(
      fc.property(arbSet(2, 9), fc.double({ min: -1e15, max: 1e15, noNaN: true }), fc.constantFrom(1, 1e-200, 1e-30, 1e10), (xs, v, s) => {
        const ys = xs.map((m) => ({ value: v, uncertainty: m.uncertainty * s }));
        for (const e of CONSENSUS_ESTIMATORS) {
          const c = consensus(ys, e, { median: { trials: 20 } });
          expect(rel(c.value, v, 1e-14), `${e} ${c.value}`).toBe(true);
          expect(c.test.chi2).toBeLessThan(1e-12);
          expect(c.tau2).toBe(0);
          expect(c.disputed).toBe(false);
        }
      }),
      { seed: 606, numRuns: 150 },
    );
  });

  it('all uncertainties equal: the weighted mean is the arithmetic mean with u/sqrt(N)', () => {
    fc.assert(
      fc.property(arbSet(1, 9), fc.double({ min: 1e-6, max: 10, noNaN: true }), (xs, u) => {
        const ys = xs.map((m) => ({ value: m.value, uncertainty: u }));
        const r = weightedMean(ys);
        const mean = ys.reduce((a, m) => a + m.value, 0) / ys.length;
        expect(close(r.value, mean, 1e-14)).toBe(true);
        expect(rel(r.uncertainty, u / Math.sqrt(ys.length), 1e-14)).toBe(true);
      }),
      { seed: 707, numRuns: 200 },
    );
  });

  it('two entries: weighted mean between them, chi2 = (x1 - x2)^2/(u1^2 + u2^2) (direct evaluation)', () => {
    fc.assert(
      fc.property(arbSet(2, 2), (xs) => {
        const r = weightedMean(xs);
        const [a, b] = xs;
        expect(r.value).toBeGreaterThanOrEqual(Math.min(a.value, b.value) - 1e-15);
        expect(r.value).toBeLessThanOrEqual(Math.max(a.value, b.value) + 1e-15);
        expect(close(r.test.chi2, (a.value - b.value) ** 2 / (a.uncertainty ** 2 + b.uncertainty ** 2), 1e-12)).toBe(true);
        expect(close(r.test.p, chiSquaredSurvival(r.test.chi2, 1), 1e-14)).toBe(true);
      }),
      { seed: 808, numRuns: 200 },
    );
  });
});

describe('random effects: the tau^2 = 0 boundary and the defining equations', () => {
  it('DL: tau^2 = max(0, (Q - (k - 1))/C), zero iff Q <= k - 1; PM: zero iff Q <= k - 1, else Q(tau^2) = k - 1; REML: the fixed point; mu inside the data range', () => {
    fc.assert(
      fc.property(arbMixed, (xs: Measurement[]) => {
        const k = xs.length;
        const dl = randomEffects(xs, 'DL');
        const pm = randomEffects(xs, 'PM');
        const reml = randomEffects(xs, 'REML');
        for (const r of [dl, pm, reml]) {
          expect(r.tau2).toBeGreaterThanOrEqual(0);
          expect(r.mu).toBeGreaterThanOrEqual(Math.min(...xs.map((m) => m.value)) - 1e-12);
          expect(r.mu).toBeLessThanOrEqual(Math.max(...xs.map((m) => m.value)) + 1e-12);
          expect(r.se).toBeGreaterThanOrEqual(r.fixedSe * (1 - 1e-12));
          expect(r.converged).toBe(true);
        }
        if (k === 1) return;
        const w = xs.map((m) => 1 / m.uncertainty ** 2);
        const sw = w.reduce((a, b) => a + b, 0);
        const C = sw - w.reduce((a, b) => a + b * b, 0) / sw;
        const ybar = xs.reduce((a, m, i) => a + w[i] * m.value, 0) / sw;
        const Q = xs.reduce((a, m, i) => a + w[i] * (m.value - ybar) ** 2, 0);
        expect(close(dl.Q, Q, 1e-9)).toBe(true);
        const boundary = Q <= k - 1;
        if (Math.abs(Q - (k - 1)) > 1e-9 * k) {
          expect(dl.tau2 === 0).toBe(boundary);
          expect(pm.tau2 === 0).toBe(boundary);
        }
        if (!boundary) expect(close(dl.tau2, (Q - (k - 1)) / C, 1e-9)).toBe(true);
        const genQ = (t2: number) => {
          const ws = xs.map((m) => 1 / (m.uncertainty ** 2 + t2));
          const s = ws.reduce((a, b) => a + b, 0);
          const mu = xs.reduce((a, m, i) => a + ws[i] * m.value, 0) / s;
          return xs.reduce((a, m, i) => a + ws[i] * (m.value - mu) ** 2, 0);
        };
        if (pm.tau2 > 0) expect(close(genQ(pm.tau2), k - 1, 1e-9)).toBe(true);
        // REML fixed point tau2 = sum w^2 ((y - mu)^2 - v) / sum w^2 + 1/sum w, truncated at 0
        const ws = xs.map((m) => 1 / (m.uncertainty ** 2 + reml.tau2));
        const s1 = ws.reduce((a, b) => a + b, 0);
        const s2 = ws.reduce((a, b) => a + b * b, 0);
        const fp = Math.max(0, xs.reduce((a, m, i) => a + ws[i] ** 2 * ((m.value - reml.mu) ** 2 - m.uncertainty ** 2), 0) / s2 + 1 / s1);
        expect(Math.abs(fp - reml.tau2)).toBeLessThanOrEqual(1e-9 * (reml.tau2 + 1 / s1));
      }),
      { seed: 909, numRuns: 300 },
    );
  });

  it('DL with one dominant weight (u = 1e-9 beside u = 1): C = sum w - sum w^2/sum w without cancellation (direct evaluation: tau^2 = 8)', () => {
    // w = (1e18, 1, 1, 1), y = (0, 5, -5, 1): ybar = 1e-18, Q = 51 - 1e-18, C = 2(3e18 + 3)/(1e18 + 3) = 6 - 1.2e-17,
    // tau^2 = (Q - 3)/C = 8 to 1e-15
    for (const u0 of [1e-9, 1e-12, 1e-15]) {
      const xs = [{ value: 0, uncertainty: u0 }, { value: 5, uncertainty: 1 }, { value: -5, uncertainty: 1 }, { value: 1, uncertainty: 1 }];
      const r = randomEffects(xs, 'DL');
      expect(r.tau2).toBeCloseTo(8, 9);
      // and the random-effects mean is then nearly the plain mean of the four: weights 1/(v + 8)
      const ws = xs.map((m) => 1 / (m.uncertainty ** 2 + 8));
      expect(r.mu).toBeCloseTo(xs.reduce((a, m, i) => a + ws[i] * m.value, 0) / ws.reduce((a, b) => a + b, 0), 12);
    }
  });
});

/** Brute-force LCS: every subset of each size, chi2 recomputed by weightedMean (two-pass). */
function bruteLcs(xs: readonly Measurement[]): number[] {
  const n = xs.length;
  const full = weightedMean(xs);
  if (full.test.consistent || n <= 1) return [];
  for (let r = 1; r < n; r++) {
    let best = Infinity;
    let bestDrop: number[] = [];
    for (let mask = 0; mask < 1 << n; mask++) {
      let pop = 0;
      for (let m = mask; m; m &= m - 1) pop++;
      if (pop !== r) continue;
      const keep = xs.map((_, i) => i).filter((i) => !(mask & (1 << i)));
      const chi2 = weightedMean(xs, { subset: keep }).test.chi2;
      if (chi2 < best) {
        best = chi2;
        bestDrop = xs.map((_, i) => i).filter((i) => mask & (1 << i));
      }
    }
    if (n - r <= 1 || chiSquaredSurvival(best, n - r - 1) >= 0.05) return bestDrop;
  }
  return [];
}

describe('largest consistent subset (Cox 2007)', () => {
  it('exhaustive search equals brute force over every subset (chi2 recomputed), and the result passes', () => {
    fc.assert(
      fc.property(arbMixed, (xs) => {
        const r = largestConsistentSubset(xs);
        const brute = bruteLcs(xs);
        // chi2 near-ties can go either way by rounding; compare the chi2 of the choices instead
        if (JSON.stringify(r.dropped) !== JSON.stringify(brute)) {
          expect(r.dropped.length).toBe(brute.length);
          const c1 = weightedMean(xs, { subset: r.subset }).test.chi2;
          const c2 = weightedMean(xs, { subset: xs.map((_, i) => i).filter((i) => !brute.includes(i)) }).test.chi2;
          expect(close(c1, c2, 1e-9)).toBe(true);
        }
        expect(r.mean.test.consistent || r.subset.length <= 1).toBe(true);
      }),
      { seed: 1001, numRuns: 300 },
    );
  });

  it('two tight clusters with tiny uncertainties (u = 1e-12, 3 against 2): the majority is kept (no cancellation in chi2)', () => {
    const A = [0.3, 0.3 + 1e-12, 0.3 - 1e-12];
    const B = [0.5, 0.5 + 1e-12];
    for (const order of [[...A, ...B], [B[0], A[0], B[1], A[1], A[2]]]) {
      const xs = order.map((value) => ({ value, uncertainty: 1e-12 }));
      for (const limit of [20, 0]) {
        const r = largestConsistentSubset(xs, { exhaustiveLimit: limit });
        // direct evaluation: cluster A has chi2 = 2 on nu = 2 (p = 0.37): it is the LCS after dropping B
        expect(r.subset.map((i) => xs[i].value).sort()).toEqual([...A].sort());
        expect(r.mean.test.chi2).toBeCloseTo(2, 3); // 0.3 +/- 1e-12 is itself rounded to 5e-17
      }
    }
  });

  it('greedy path (above the exhaustive limit) is scale invariant and keeps a consistent remainder', () => {
    fc.assert(
      fc.property(arbMixed, fc.constantFrom(1e-150, 1e-12, 1e9), (xs, s) => {
        const a = largestConsistentSubset(xs, { exhaustiveLimit: 0 });
        const b = largestConsistentSubset(xs.map((m) => ({ value: m.value * s, uncertainty: m.uncertainty * s })), { exhaustiveLimit: 0 });
        expect(b.dropped).toEqual(a.dropped);
        expect(a.mean.test.consistent || a.subset.length <= 1).toBe(true);
      }),
      { seed: 1102, numRuns: 200 },
    );
  });
});

describe('uncertainty propagation against Monte Carlo (seeded; tolerance 5%, about 3 standard errors at 4000 draws)', () => {
  it('weighted mean: sd of y equals u(y); sd of d_i equals u(d_i) (included, u^2(d_i) = u_i^2 - u^2(y))', () => {
    const xs = [{ value: 0, uncertainty: 0.1 }, { value: 0, uncertainty: 0.2 }, { value: 0, uncertainty: 0.05 }, { value: 0, uncertainty: 0.3 }];
    const wm = weightedMean(xs);
    const doe = degreesOfEquivalence(xs, wm);
    const rng = createRng(42);
    const M = 4000;
    const ys: number[] = [];
    const ds: number[][] = xs.map(() => []);
    for (let t = 0; t < M; t++) {
      const sample = xs.map((m) => ({ value: m.uncertainty * rng.normal(), uncertainty: m.uncertainty }));
      const y = weightedMean(sample).value;
      ys.push(y);
      sample.forEach((m, i) => ds[i].push(m.value - y));
    }
    const sd = (a: number[]) => {
      const mu = a.reduce((p, q) => p + q, 0) / a.length;
      return Math.sqrt(a.reduce((p, q) => p + (q - mu) ** 2, 0) / (a.length - 1));
    };
    expect(Math.abs(sd(ys) / wm.uncertainty - 1)).toBeLessThan(0.05);
    doe.forEach((d, i) => expect(Math.abs(sd(ds[i]) / d.u - 1)).toBeLessThan(0.05));
  });

  it('random effects with known tau^2: sd of d_i = x_i - mu equals sqrt(u_i^2 + tau^2 - u^2(mu))', () => {
    const u = [0.1, 0.2, 0.05, 0.3, 0.15];
    const tau2 = 0.04;
    const rng = createRng(7);
    const M = 4000;
    const w = u.map((x) => 1 / (x * x + tau2));
    const sw = w.reduce((a, b) => a + b, 0);
    const ds: number[][] = u.map(() => []);
    for (let t = 0; t < M; t++) {
      const x = u.map((ui) => Math.sqrt(tau2) * rng.normal() + ui * rng.normal());
      const mu = x.reduce((a, xi, i) => a + w[i] * xi, 0) / sw;
      x.forEach((xi, i) => ds[i].push(xi - mu));
    }
    const doe = degreesOfEquivalence(u.map((ui) => ({ value: 0, uncertainty: ui })), { value: 0, uncertainty: 1 / Math.sqrt(sw), included: [0, 1, 2, 3, 4], tau2 });
    doe.forEach((d, i) => {
      const s = Math.sqrt(ds[i].reduce((a, b) => a + b * b, 0) / M);
      expect(Math.abs(s / d.u - 1)).toBeLessThan(0.05);
    });
  });
});

describe('degrees of equivalence of a dominant result (u = 1e-12 beside u = 0.01)', () => {
  it('u^2(d_i) = u_i^2 - u^2(y) is formed without cancellation (direct evaluation: u_i sqrt(sum_{j != i} w_j / sum w))', () => {
    for (const s of [1, 1e-150, 1e10]) {
      const xs = [{ value: 0.5, uncertainty: 1e-12 }, { value: 0.6, uncertainty: 0.01 }, { value: 0.7, uncertainty: 0.01 }].map((m) => ({ value: m.value * s, uncertainty: m.uncertainty * s }));
      const wm = weightedMean(xs);
      const doe = degreesOfEquivalence(xs, wm);
      // relative weights 1, 1e-20, 1e-20: u(d_0) = 1e-12 sqrt(2e-20 / (1 + 2e-20)); d_0 = -(1e-20 (0.1 + 0.2))/(1 + 2e-20)
      expect(Math.abs(doe[0].u / s / (1e-12 * Math.sqrt(2e-20)) - 1)).toBeLessThan(1e-9);
      expect(Math.abs(doe[0].d / s / -3e-21 - 1)).toBeLessThan(1e-9);
      // |d|/U = 10.6: the others disagree with the dominant result (y itself rounds to x_0)
      expect(Math.abs(doe[0].d) / doe[0].U).toBeCloseTo(3e-21 / (2e-12 * Math.sqrt(2e-20)), 6);
      // the others: u(d_j)^2 = u_j^2 - u^2(y) = 1e-4 - 1e-24
      expect(Math.abs(doe[1].u / s / 0.01 - 1)).toBeLessThan(1e-12);
      // and through the random-effects and LCS paths as well
      for (const e of ['random-effects-dl', 'largest-consistent-subset'] as const) {
        const c = consensus(xs, e);
        const d = degreesOfEquivalence(xs, c);
        // (a lone included result has d = 0 and u(d) = 0 exactly)
        expect(d.every((x) => Number.isFinite(x.U) && (x.U > 0 || (c.included.length === 1 && x.included))), e).toBe(true);
      }
    }
  });
});

describe('huge spreads', () => {
  it('values over the whole format range (|x| <= 1e15) with u from 1e-6 to 1: finite results; random effects absorb the spread into tau', () => {
    const arbHuge = fc.array(
      fc.record({ value: fc.double({ min: -1e15, max: 1e15, noNaN: true }), uncertainty: fc.double({ min: 1e-6, max: 1, noNaN: true }) }),
      { minLength: 2, maxLength: 8, size: 'max' },
    );
    fc.assert(
      fc.property(arbHuge, (xs) => {
        for (const e of CONSENSUS_ESTIMATORS) {
          const c = consensus(xs, e, { median: { trials: 20 } });
          expect(Number.isFinite(c.value), e).toBe(true);
          expect(Number.isFinite(c.uncertainty), e).toBe(true);
          expect(c.value).toBeGreaterThanOrEqual(Math.min(...xs.map((m) => m.value)) - 1);
          expect(c.value).toBeLessThanOrEqual(Math.max(...xs.map((m) => m.value)) + 1);
        }
        const spread = Math.max(...xs.map((m) => m.value)) - Math.min(...xs.map((m) => m.value));
        if (spread > 1e3) {
          for (const m of ['DL', 'PM', 'REML'] as const) {
            const r = randomEffects(xs, m);
            // with u negligible beside the spread, PM and REML put tau at the order of the spread (DL
            // can be far below it when the far result has the smallest weight: a known DL bias)
            if (m !== 'DL') expect(Math.sqrt(r.tau2), m).toBeGreaterThan(spread / (10 * xs.length));
            expect(Math.sqrt(r.tau2), m).toBeLessThan(spread);
          }
        }
      }),
      { seed: 1313, numRuns: 200 },
    );
  });
});
