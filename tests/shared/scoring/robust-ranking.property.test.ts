/**
 * Property tests of the robust estimators (ISO 13528 Algorithm A, median with Monte Carlo
 * uncertainty), the special functions, the ranking and the accuracy-against-cost front
 * (fast-check, fixed seeds). Sources: the estimators' definitions in SCORING.md (location and
 * scale equivariance follow from them: common practice), the identities Phi^-1(Phi(z)) = z and
 * P + Q = 1, and Pareto dominance as defined in ranking.ts (checked by brute force).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { algorithmA, median, medianWithUncertainty } from '../../../shared/scoring/robust';
import { chiSquaredCdf, chiSquaredSurvival, normalCdf, normalQuantile } from '../../../shared/scoring/special';
import { accuracyCostFront, rankEntries } from '../../../shared/scoring/ranking';
import { createRng } from '../../../shared/scoring/prng';

const shuffle = <T,>(a: readonly T[], seed: number): T[] => {
  const rng = createRng(seed);
  const b = a.slice();
  for (let i = b.length - 1; i > 0; i--) {
    const j = Math.floor(rng.uniform() * (i + 1));
    [b[i], b[j]] = [b[j], b[i]];
  }
  return b;
};
const arbValues = fc.array(fc.double({ min: -10, max: 10, noNaN: true }).map((v) => (Math.abs(v) < 1e-6 ? 0 : v)), { minLength: 1, maxLength: 15, size: 'max' });

describe('ISO 13528 Algorithm A', () => {
  it('permutation invariant, shift and scale equivariant (x* -> a x* + b, s* -> |a| s*), inside the data range', () => {
    fc.assert(
      fc.property(arbValues, fc.double({ min: -100, max: 100, noNaN: true }), fc.constantFrom(1e-12, 0.5, 3, 1e9, -2), fc.nat(), (xs, b, a, seed) => {
        const r = algorithmA(xs);
        expect(r.mean).toBeGreaterThanOrEqual(Math.min(...xs) - 1e-12);
        expect(r.mean).toBeLessThanOrEqual(Math.max(...xs) + 1e-12);
        expect(r.sd).toBeGreaterThanOrEqual(0);
        const p = algorithmA(shuffle(xs, seed));
        expect(p.mean).toBeCloseTo(r.mean, 10);
        expect(p.sd).toBeCloseTo(r.sd, 10);
        const t = algorithmA(xs.map((x) => a * x + b));
        const scale = Math.abs(a) * (1 + Math.max(...xs.map(Math.abs)));
        expect(Math.abs(t.mean - (a * r.mean + b))).toBeLessThanOrEqual(1e-9 * (scale + Math.abs(b)));
        expect(Math.abs(t.sd - Math.abs(a) * r.sd)).toBeLessThanOrEqual(1e-9 * (scale + Math.abs(b)));
      }),
      { seed: 31, numRuns: 300 },
    );
  });

  it('data of tiny magnitude (1e-170) give the scaled result, not s* = 0 from underflowing squares', () => {
    const xs = [1, 2, 3, 4, 100, 2.5, 3.3];
    const r = algorithmA(xs);
    for (const s of [1e-170, 1e-300, 1e200]) {
      const t = algorithmA(xs.map((x) => x * s));
      expect(Math.abs(t.mean / s / r.mean - 1)).toBeLessThan(1e-12);
      expect(Math.abs(t.sd / s / r.sd - 1)).toBeLessThan(1e-12);
    }
  });

  it('one value: that value with s* = 0; two values: their mean (no winsorising: delta = 1.5 * 1.483 |d|/2 > |d|/2)', () => {
    expect(algorithmA([3.5])).toMatchObject({ mean: 3.5, sd: 0 });
    const r = algorithmA([1, 2]);
    expect(r.mean).toBeCloseTo(1.5, 14);
    // s* = 1.134 sd = 1.134 / sqrt 2
    expect(r.sd).toBeCloseTo(1.134 / Math.SQRT2, 12);
  });
});

describe('median with Monte Carlo uncertainty (Cox procedure B)', () => {
  it('median is permutation invariant and shift equivariant; zero uncertainties give u = 0', () => {
    fc.assert(
      fc.property(arbValues, fc.double({ min: -100, max: 100, noNaN: true }), fc.nat(), (xs, b, seed) => {
        expect(median(shuffle(xs, seed))).toBe(median(xs));
        expect(median(xs.map((x) => x + b))).toBeCloseTo(median(xs) + b, 10);
        const m = medianWithUncertainty(xs.map((value) => ({ value, uncertainty: 0 })), { trials: 20 });
        expect(m.value).toBe(median(xs));
        expect(m.uncertainty).toBe(0);
      }),
      { seed: 32, numRuns: 200 },
    );
  });
});

describe('special functions', () => {
  it('normalQuantile inverts normalCdf (z in [-37, 3]: above, 1 - Phi(z) is below the resolution of doubles near 1) and chi-squared CDF + survival = 1, survival decreasing in x', () => {
    fc.assert(
      fc.property(fc.double({ min: -37, max: 3, noNaN: true }), (z) => {
        expect(Math.abs(normalQuantile(normalCdf(z)) - z)).toBeLessThan(1e-9 * (1 + Math.abs(z)));
      }),
      { seed: 33, numRuns: 500 },
    );
    fc.assert(
      fc.property(fc.double({ min: 0, max: 400, noNaN: true }), fc.double({ min: 0, max: 50, noNaN: true }), fc.integer({ min: 1, max: 300 }), (x, dx, nu) => {
        expect(Math.abs(chiSquaredCdf(x, nu) + chiSquaredSurvival(x, nu) - 1)).toBeLessThan(1e-12);
        expect(chiSquaredSurvival(x + dx, nu)).toBeLessThanOrEqual(chiSquaredSurvival(x, nu) + 1e-15);
      }),
      { seed: 34, numRuns: 500 },
    );
  });
});

describe('ranking and the accuracy-against-cost front', () => {
  const arbMetric = fc.oneof(fc.constant(undefined), fc.constant(null), fc.constant(NaN), fc.integer({ min: 0, max: 4 }).map((v) => v / 4));
  const arbEntries = fc.uniqueArray(
    fc.record({ id: fc.string({ minLength: 1, maxLength: 3 }), day: fc.integer({ min: 1, max: 3 }), a: arbMetric, b: arbMetric }),
    { maxLength: 12, selector: (e) => e.id },
  );
  it('ranks are 1..n, sorted by the keys (missing last), and the order does not depend on the input order', () => {
    fc.assert(
      fc.property(arbEntries, fc.nat(), (raw, seed) => {
        const entries = raw.map((e) => ({ id: e.id, submittedAt: `2026-01-0${e.day}T00:00:00Z`, metrics: { rmseVerifiable: e.a, agreementMedianRatio: e.b } }));
        const r = rankEntries(entries);
        expect(r.map((x) => x.rank)).toEqual(entries.map((_, i) => i + 1));
        const key = (v: number | null | undefined) => (v === undefined || v === null || Number.isNaN(v) ? Infinity : v);
        for (let i = 1; i < r.length; i++) {
          const p = r[i - 1].entry.metrics;
          const q = r[i].entry.metrics;
          const cmp = key(p.rmseVerifiable) - key(q.rmseVerifiable) || key(p.agreementMedianRatio) - key(q.agreementMedianRatio);
          expect(cmp <= 0 || Number.isNaN(cmp)).toBe(true);
          expect(r[i].tiedWithPrevious).toBe(key(p.rmseVerifiable) === key(q.rmseVerifiable) && key(p.agreementMedianRatio) === key(q.agreementMedianRatio));
        }
        expect(rankEntries(shuffle(entries, seed)).map((x) => x.entry.id)).toEqual(r.map((x) => x.entry.id));
      }),
      { seed: 35, numRuns: 300 },
    );
  });

  it('the front is exactly the non-dominated points (brute force); missing error or cost is set apart', () => {
    const arbPoints = fc.uniqueArray(
      fc.record({ id: fc.string({ minLength: 1, maxLength: 3 }), error: arbMetric, cost: arbMetric }),
      { maxLength: 14, selector: (p) => p.id },
    );
    fc.assert(
      fc.property(arbPoints, fc.nat(), (pts, seed) => {
        const f = accuracyCostFront(pts);
        const known = (v: number | null | undefined): v is number => typeof v === 'number' && Number.isFinite(v);
        const placed = pts.filter((p) => known(p.error) && known(p.cost));
        const dominated = (p: (typeof pts)[number]) =>
          placed.some((q) => (q.error as number) <= (p.error as number) && (q.cost as number) <= (p.cost as number) && ((q.error as number) < (p.error as number) || (q.cost as number) < (p.cost as number)));
        expect(f.front.map((p) => p.id).sort()).toEqual(placed.filter((p) => !dominated(p)).map((p) => p.id).sort());
        expect(f.dominated.map((p) => p.id).sort()).toEqual(placed.filter(dominated).map((p) => p.id).sort());
        expect(f.unplaced.length).toBe(pts.length - placed.length);
        expect(accuracyCostFront(shuffle(pts, seed)).front.map((p) => p.id)).toEqual(f.front.map((p) => p.id));
      }),
      { seed: 36, numRuns: 500 },
    );
  });
});
