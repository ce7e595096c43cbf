/**
 * Property tests of the zero-noise extrapolation fits (SCORING.md "Zero-noise extrapolation"),
 * fast-check with fixed seeds. Sources: Richardson's coefficients are the Lagrange weights at 0
 * (Temme, Bravyi and Gambetta 2017), so sum g_j c_j^k = [k = 0] for k < n and the extrapolation is
 * exact on polynomials of degree n - 1; a least-squares polynomial fit of degree d reproduces
 * data of degree <= d exactly; the log-linear exponential fit reproduces A exp(-b c); every
 * linear estimator E0 = sum a_j E_j has u^2 = sum a_j^2 u_j^2 with a_j = dE0/dE_j (checked by
 * central finite differences) and its spread under simulated noise (Monte Carlo) matches u.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  exponentialFit,
  exponentialFreeAsymptoteFit,
  linearFit,
  polynomialFit,
  richardson,
  richardsonCoefficients,
  type NoisePoint,
  type ZneModelResult,
} from '../../../shared/scoring/zne';
import { createRng } from '../../../shared/scoring/prng';

/** 2 to 6 distinct noise-scale factors in [1, 10] (the entry format allows [1, 1000]), at least 0.2 apart. */
const arbScales = fc
  .uniqueArray(fc.integer({ min: 10, max: 100 }), { minLength: 2, maxLength: 6, size: 'max', selector: (v) => Math.round(v / 2) })
  .map((a) => a.map((v) => v / 10));
const arbCoefs = (n: number) => fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: n, maxLength: n });
const polyAt = (coef: readonly number[], c: number) => coef.reduce((s, a, k) => s + a * c ** k, 0);
const points = (cs: readonly number[], f: (c: number) => number, u: (j: number) => number = () => 0.01): NoisePoint[] =>
  cs.map((scale, j) => ({ scale, value: f(scale), uncertainty: u(j) }));

/** Central finite-difference gradient of a fit's value with respect to each E_j. */
function gradient(fit: (p: NoisePoint[]) => ZneModelResult, pts: NoisePoint[], rel = 1e-6): number[] {
  return pts.map((_, j) => {
    const h = rel * Math.max(1e-3, Math.abs(pts[j].value));
    const at = (d: number) => fit(pts.map((p, i) => (i === j ? { ...p, value: p.value + d } : p))).value;
    return (at(h) - at(-h)) / (2 * h);
  });
}
const propagated = (grad: readonly number[], pts: readonly NoisePoint[]) => Math.sqrt(grad.reduce((s, a, j) => s + a * a * pts[j].uncertainty ** 2, 0));

describe('Richardson extrapolation', () => {
  it('coefficients satisfy sum g_j c_j^k = [k = 0] for k = 0..n-1', () => {
    fc.assert(
      fc.property(arbScales, (cs) => {
        const g = richardsonCoefficients(cs);
        const scale = g.reduce((s, x) => s + Math.abs(x), 0);
        for (let k = 0; k < cs.length; k++) {
          const m = g.reduce((s, gj, j) => s + gj * cs[j] ** k, 0);
          expect(Math.abs(m - (k === 0 ? 1 : 0))).toBeLessThan(1e-12 * scale * Math.max(...cs) ** k);
        }
      }),
      { seed: 21, numRuns: 200 },
    );
  });

  it('is exact on polynomials of degree n - 1 (and equals the degree n - 1 polynomial fit, value and u)', () => {
    fc.assert(
      fc.property(arbScales.chain((cs) => fc.tuple(fc.constant(cs), arbCoefs(cs.length))), ([cs, coef]) => {
        const pts = points(cs, (c) => polyAt(coef, c), (j) => 0.01 * (1 + j));
        const r = richardson(pts);
        const scale = r.coefficients!.reduce((s, g, j) => s + Math.abs(g * pts[j].value), 0);
        expect(Math.abs(r.value - coef[0])).toBeLessThan(1e-12 * (1 + scale));
        const p = polynomialFit(pts, cs.length - 1);
        expect(Math.abs(p.value - r.value)).toBeLessThan(1e-9 * (1 + scale));
        expect(Math.abs(p.uncertainty / r.uncertainty - 1)).toBeLessThan(1e-9);
      }),
      { seed: 22, numRuns: 200 },
    );
  });

  it('u^2 = sum g_j^2 u_j^2 equals the finite-difference propagation; the order of the points does not matter', () => {
    fc.assert(
      fc.property(arbScales, (cs) => {
        const pts = points(cs, (c) => 0.8 * Math.exp(-0.2 * c), (j) => 0.005 * (j + 1));
        const r = richardson(pts);
        expect(Math.abs(r.uncertainty / propagated(gradient(richardson, pts), pts) - 1)).toBeLessThan(1e-6);
        const rev = richardson([...pts].reverse());
        expect(rev.value).toBeCloseTo(r.value, 10);
        expect(rev.uncertainty).toBeCloseTo(r.uncertainty, 10);
      }),
      { seed: 23, numRuns: 100 },
    );
  });
});

describe('polynomial and linear least-squares fits', () => {
  it('a degree-d fit reproduces data of degree <= d exactly, weighted or not', () => {
    const arb = arbScales
      .filter((cs) => cs.length >= 3)
      .chain((cs) => fc.tuple(fc.constant(cs), fc.integer({ min: 1, max: cs.length - 2 })))
      .chain(([cs, d]) => fc.tuple(fc.constant(cs), fc.constant(d), arbCoefs(d + 1)));
    fc.assert(
      fc.property(arb, ([cs, d, coef]) => {
        const pts = points(cs, (c) => polyAt(coef, c), (j) => 0.01 + 0.003 * j);
        const size = Math.max(1, ...pts.map((p) => Math.abs(p.value)));
        for (const weighting of ['weighted', 'unweighted'] as const) {
          const r = polynomialFit(pts, d, { weighting });
          expect(r.ok).toBe(true);
          expect(Math.abs(r.value - coef[0])).toBeLessThan(1e-10 * size);
          if (weighting === 'weighted') expect(r.chi2).toBeLessThan(1e-12 * size * size * 1e4);
          expect(r.nu).toBe(cs.length - d - 1);
        }
      }),
      { seed: 24, numRuns: 200 },
    );
  });

  it('u equals the finite-difference propagation (linear estimators) and the Monte Carlo spread of the intercept', () => {
    fc.assert(
      fc.property(arbScales.filter((cs) => cs.length >= 3), (cs) => {
        const pts = points(cs, (c) => 0.9 - 0.1 * c, (j) => 0.01 * (1 + (j % 3)));
        for (const fit of [(p: NoisePoint[]) => linearFit(p), (p: NoisePoint[]) => polynomialFit(p, 2), (p: NoisePoint[]) => linearFit(p, { weighting: 'unweighted' })]) {
          const r = fit(pts);
          expect(Math.abs(r.uncertainty / propagated(gradient(fit, pts), pts) - 1)).toBeLessThan(1e-6);
        }
      }),
      { seed: 25, numRuns: 60 },
    );
    // Monte Carlo (seeded, 4000 draws: the standard error of an sd estimate is 1.1%, tolerance 5%)
    const cs = [1, 1.5, 2, 3];
    const base = points(cs, (c) => 0.9 - 0.1 * c, (j) => 0.01 * (1 + j));
    const u = linearFit(base).uncertainty;
    const rng = createRng(99);
    const vals: number[] = [];
    for (let t = 0; t < 4000; t++) vals.push(linearFit(base.map((p) => ({ ...p, value: p.value + p.uncertainty * rng.normal() }))).value);
    const mean = vals.reduce((a, b) => a + b, 0) / vals.length;
    const sd = Math.sqrt(vals.reduce((a, b) => a + (b - mean) ** 2, 0) / (vals.length - 1));
    expect(Math.abs(sd / u - 1)).toBeLessThan(0.05);
    expect(Math.abs(mean - 0.9)).toBeLessThan(4 * u / Math.sqrt(4000));
  });
});

describe('exponential fits', () => {
  it('E = A exp(-b c): the log-linear fit returns A exactly, for either sign of A and growth or decay', () => {
    fc.assert(
      fc.property(arbScales, fc.double({ min: 0.05, max: 2, noNaN: true }), fc.constantFrom(1, -1), fc.double({ min: -0.5, max: 1.5, noNaN: true }), (cs, A0, sign, b) => {
        const A = sign * A0;
        const pts = points(cs, (c) => A * Math.exp(-b * c), (j) => 0.001 * (1 + j));
        for (const weighting of ['propagated', 'unweighted'] as const) {
          const r = exponentialFit(pts, { weighting });
          expect(r.ok).toBe(true);
          expect(Math.abs(r.value / A - 1)).toBeLessThan(1e-9);
        }
        // at exact data the propagated u equals the finite-difference propagation (the weights'
        // dependence on the data drops out when the residuals are zero)
        const r = exponentialFit(pts);
        expect(Math.abs(r.uncertainty / propagated(gradient((p) => exponentialFit(p), pts), pts) - 1)).toBeLessThan(1e-5);
      }),
      { seed: 26, numRuns: 150 },
    );
  });

  it('E = a + b exp(-k c): the free-asymptote fit recovers a + b and its u matches finite differences', () => {
    const arb = fc.record({
      // the usual ZNE design starts at the unamplified circuit, c = 1
      cs: arbScales.filter((cs) => cs.length >= 3 && Math.max(...cs) >= 3).map((cs) => [1, ...cs.filter((c) => c > 1.1)]),
      a: fc.double({ min: -0.5, max: 0.5, noNaN: true }),
      b: fc.double({ min: 0.2, max: 1, noNaN: true }).chain((v) => fc.constantFrom(v, -v)),
      k: fc.double({ min: 0.2, max: 1.5, noNaN: true }),
    });
    fc.assert(
      fc.property(arb, ({ cs, a, b, k }) => {
        const pts = points(cs, (c) => a + b * Math.exp(-k * c), () => 0.001);
        const r = exponentialFreeAsymptoteFit(pts);
        expect(r.ok, r.reason).toBe(true);
        expect(Math.abs(r.value - (a + b))).toBeLessThan(1e-6);
        // a wider step: each fit is an optimisation, converged to about 1e-8 in k
        const fd = propagated(gradient(exponentialFreeAsymptoteFit, pts, 1e-4), pts);
        expect(Math.abs(r.uncertainty / fd - 1)).toBeLessThan(1e-3);
      }),
      { seed: 27, numRuns: 25 },
    );
  });
});

describe('any uncertainty the entry format allows (u >= 0, down to the smallest doubles)', () => {
  it('scaling every u by s leaves the fitted values unchanged and scales u(E0) by s', () => {
    const base = points([1, 1.5, 2, 3], (c) => 0.85 * Math.exp(-0.25 * c) + 0.002 * Math.sin(7 * c), (j) => 0.01 * (1 + j));
    for (const s of [1e-200, 1e-160, 1e-20, 1e10]) {
      const scaled = base.map((p) => ({ ...p, uncertainty: p.uncertainty * s }));
      const fits: [string, (p: NoisePoint[]) => ZneModelResult][] = [
        ['richardson', richardson],
        ['linear', (p) => linearFit(p)],
        ['quadratic', (p) => polynomialFit(p, 2)],
        ['exponential', (p) => exponentialFit(p)],
        ['free asymptote', exponentialFreeAsymptoteFit],
      ];
      for (const [name, fit] of fits) {
        const a = fit(base);
        const b = fit(scaled);
        expect(b.ok, name).toBe(true);
        // the free-asymptote fit is an optimisation over k, converged to about 1e-8
        expect(Math.abs(b.value - a.value), `${name} at s = ${s}`).toBeLessThan(name === 'free asymptote' ? 1e-7 : 1e-12);
        expect(Math.abs(b.uncertainty / s / a.uncertainty - 1), `${name} u at s = ${s}`).toBeLessThan(1e-6);
      }
    }
  });
});
