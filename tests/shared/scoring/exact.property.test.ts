/**
 * Property tests of the scores against an exact reference (SCORING.md "Against an exact
 * reference"), fast-check with fixed seeds.
 * - CRPS of N(x, u^2) at r against its definition, the integral of (F(t) - [t >= r])^2 over t
 *   (Gneiting and Raftery 2007, eq. 20), evaluated here by composite Simpson quadrature;
 * - the interval (Winkler) score against its definition (Gneiting and Raftery 2007, section 6.2);
 * - the z-score sign convention z = (x - r)/u (SCORING.md), the ISO 13528 classes (memory), coverage
 *   |x - r| <= 2u, zeta and En (SCORING.md);
 * - sweep statistics against direct evaluation.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { classifyZ, crpsNormal, enScore, intervalScore, scoreAgainstReference, scoreSweep, zetaScore, zScore, type SweepItem } from '../../../shared/scoring/exact';
import { normalCdf, normalQuantile } from '../../../shared/scoring/special';

function simpson(f: (t: number) => number, a: number, b: number, n = 4000): number {
  if (!(b > a)) return 0;
  const h = (b - a) / n;
  let s = f(a) + f(b);
  for (let i = 1; i < n; i++) s += (i % 2 ? 4 : 2) * f(a + i * h);
  return (s * h) / 3;
}

/** CRPS by its definition: int (F(t) - [t >= r])^2 dt, F the N(x, u^2) CDF. */
function crpsByIntegral(x: number, u: number, r: number): number {
  const F = (t: number) => normalCdf((t - x) / u);
  const lo = x - 14 * u;
  const hi = x + 14 * u;
  // below r: F^2 (exactly 1 beyond hi); above r: (1 - F)^2 (exactly 1 below lo)
  const below = simpson((t) => F(t) ** 2, lo, Math.min(r, hi)) + Math.max(0, r - hi);
  const above = simpson((t) => (1 - F(t)) ** 2, Math.max(r, lo), hi) + Math.max(0, lo - r);
  return below + above;
}

const arbX = fc.double({ min: -2, max: 2, noNaN: true });
const arbU = fc.double({ min: 1e-3, max: 2, noNaN: true });

describe('CRPS of a Gaussian', () => {
  it('closed form equals the defining integral (quadrature to 1e-9)', () => {
    fc.assert(
      fc.property(arbX, arbU, arbX, (x, u, r) => {
        expect(Math.abs(crpsNormal(x, u, r) - crpsByIntegral(x, u, r))).toBeLessThan(1e-9 * (1 + u));
      }),
      { seed: 11, numRuns: 150 },
    );
  });

  it('is non-negative, symmetric in x - r, scale-equivariant, at least |x - r| - u/sqrt(pi) and at most |x - r| + u (common practice)', () => {
    fc.assert(
      fc.property(arbX, arbU, arbX, fc.constantFrom(1e-200, 1e-8, 1e8, 1e15), (x, u, r, s) => {
        const c = crpsNormal(x, u, r);
        expect(c).toBeGreaterThan(0);
        expect(crpsNormal(r, u, x)).toBeCloseTo(c, 14);
        expect(Math.abs(crpsNormal(s * x, s * u, s * r) / s - c)).toBeLessThanOrEqual(1e-12 * (1 + c));
        expect(c).toBeGreaterThanOrEqual(Math.abs(x - r) - u / Math.sqrt(Math.PI) - 1e-15);
        expect(c).toBeLessThanOrEqual(Math.abs(x - r) + u);
      }),
      { seed: 12, numRuns: 300 },
    );
  });

  it('tends to |x - r| as u -> 0, also for subnormal u (no overflow of (r - x)/u)', () => {
    for (const u of [1e-12, 1e-200, 1e-310, 5e-324]) {
      expect(crpsNormal(0, u, 1)).toBeCloseTo(1, 10);
      expect(crpsNormal(1.25, u, 1)).toBeCloseTo(0.25, 10);
    }
    expect(crpsNormal(1, 1e-310, 1)).toBeCloseTo(0, 300);
    expect(Number.isNaN(crpsNormal(0, -1, 0))).toBe(true);
    expect(Number.isNaN(crpsNormal(0, Infinity, 0))).toBe(true);
  });
});

describe('interval (Winkler) score', () => {
  it('equals its definition and is at least the width; a hit scores exactly the width', () => {
    fc.assert(
      fc.property(arbX, fc.double({ min: 0, max: 3, noNaN: true }), arbX, fc.double({ min: 0.01, max: 0.99, noNaN: true }), (l, w, y, alpha) => {
        const h = l + w;
        const s = intervalScore(l, h, y, alpha);
        const def = h - l + (y < l ? (2 / alpha) * (l - y) : 0) + (y > h ? (2 / alpha) * (y - h) : 0);
        expect(s).toBeCloseTo(def, 12);
        expect(s).toBeGreaterThanOrEqual(h - l);
        if (y >= l && y <= h) expect(s).toBe(h - l);
      }),
      { seed: 13, numRuns: 300 },
    );
  });

  it('is NaN for an inverted interval or alpha outside (0, 1)', () => {
    expect(Number.isNaN(intervalScore(1, -1, 0, 0.2))).toBe(true);
    expect(Number.isNaN(intervalScore(-1, 1, 0, 0))).toBe(true);
    expect(Number.isNaN(intervalScore(-1, 1, 0, 1))).toBe(true);
  });

  it('scoreAgainstReference uses the central normal interval x +/- z_{1-alpha/2} u', () => {
    fc.assert(
      fc.property(arbX, arbU, arbX, fc.constantFrom(0.05, 0.1, 0.2, 0.5), (x, u, r, alpha) => {
        const q = normalQuantile(1 - alpha / 2);
        const s = scoreAgainstReference({ value: x, uncertainty: u }, { value: r }, { intervalAlpha: alpha });
        expect(s.intervalScore).toBeCloseTo(intervalScore(x - q * u, x + q * u, r, alpha), 12);
      }),
      { seed: 14, numRuns: 100 },
    );
  });
});

describe('z, classes, coverage, zeta and En', () => {
  it('z = (x - r)/u: positive when the estimate is above the reference; coverage is |x - r| <= 2u; classes at 2 and 3', () => {
    fc.assert(
      fc.property(arbX, arbU, arbX, (x, u, r) => {
        const s = scoreAgainstReference({ value: x, uncertainty: u }, { value: r });
        expect(s.z).toBe((x - r) / u);
        expect(Math.sign(s.z)).toBe(Math.sign(x - r));
        expect(s.error).toBe(x - r);
        expect(s.absError).toBe(Math.abs(x - r));
        expect(s.covered).toBe(Math.abs(x - r) <= 2 * u);
        const a = Math.abs(s.z);
        expect(s.zClass).toBe(a <= 2 ? 'satisfactory' : a < 3 ? 'questionable' : 'unsatisfactory');
        expect(s.crps).toBe(crpsNormal(x, u, r));
        expect(s.zeta).toBeNull();
      }),
      { seed: 15, numRuns: 300 },
    );
  });

  it('zeta = (x - r)/sqrt(u^2 + u_r^2), En = zeta/2 (U = 2u); NaN for a negative uncertainty on either side', () => {
    fc.assert(
      fc.property(arbX, arbU, arbX, arbU, (x, u, r, ur) => {
        const z = zetaScore(x, u, r, ur);
        expect(z).toBeCloseTo((x - r) / Math.sqrt(u * u + ur * ur), 12);
        expect(enScore(x, u, r, ur)).toBeCloseTo(z / 2, 12);
        expect(Number.isNaN(zetaScore(x, -u, r, ur))).toBe(true);
        expect(Number.isNaN(enScore(x, -u, r, ur))).toBe(true);
        expect(Number.isNaN(zetaScore(x, u, r, -ur))).toBe(true);
        const s = scoreAgainstReference({ value: x, uncertainty: u }, { value: r, uncertainty: ur });
        expect(s.zeta).toBe(z);
        expect(s.en).toBe(enScore(x, u, r, ur));
      }),
      { seed: 16, numRuns: 200 },
    );
  });

  it('a negative claimed uncertainty scores NaN everywhere (never a finite number)', () => {
    const s = scoreAgainstReference({ value: 1, uncertainty: -1 }, { value: 0 });
    expect(Number.isNaN(s.z)).toBe(true);
    expect(s.zClass).toBe('undefined');
    expect(s.covered).toBe(false);
    expect(Number.isNaN(s.crps)).toBe(true);
    expect(Number.isNaN(s.intervalScore)).toBe(true);
    expect(classifyZ(zScore(1, -1, 0))).toBe('undefined');
  });
});

describe('sweep statistics (direct evaluation)', () => {
  const arbItem = fc.record({
    estimate: fc.option(fc.record({ value: arbX, uncertainty: arbU }), { nil: undefined }),
    reference: fc.option(fc.record({ value: arbX }), { nil: undefined }),
  });
  it('RMSE, max |error|, mean z^2, fraction covered and mean CRPS over the verifiable targets; grid coverage over all', () => {
    fc.assert(
      fc.property(fc.array(arbItem, { maxLength: 12 }), (raw) => {
        const items: SweepItem[] = raw.map((r, i) => ({ targetId: `t${i}`, estimate: r.estimate, reference: r.reference }));
        const s = scoreSweep(items);
        const ver = items.filter((i) => i.reference);
        const scored = ver.filter((i) => i.estimate);
        expect(s.verifiable.targets).toBe(ver.length);
        expect(s.verifiable.scored).toBe(scored.length);
        expect(s.gridCoverage).toBe(items.length ? items.filter((i) => i.estimate).length / items.length : NaN);
        if (scored.length === 0) {
          expect(Number.isNaN(s.verifiable.rmse)).toBe(true);
          return;
        }
        const e = scored.map((i) => i.estimate!.value - i.reference!.value);
        const z = scored.map((i) => (i.estimate!.value - i.reference!.value) / i.estimate!.uncertainty);
        expect(s.verifiable.rmse).toBeCloseTo(Math.sqrt(e.reduce((a, b) => a + b * b, 0) / e.length), 12);
        expect(s.verifiable.maxAbsError).toBe(Math.max(...e.map(Math.abs)));
        expect(s.verifiable.meanZ2).toBeCloseTo(z.reduce((a, b) => a + b * b, 0) / z.length, 9);
        expect(s.verifiable.fractionCovered).toBe(scored.filter((i) => Math.abs(i.estimate!.value - i.reference!.value) <= 2 * i.estimate!.uncertainty).length / scored.length);
        expect(s.verifiable.meanCrps).toBeCloseTo(scored.reduce((a, i) => a + crpsNormal(i.estimate!.value, i.estimate!.uncertainty, i.reference!.value), 0) / scored.length, 12);
      }),
      { seed: 17, numRuns: 200 },
    );
  });
});
