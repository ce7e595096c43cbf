import { describe, expect, it } from 'vitest';
import { exponentialFit, exponentialFreeAsymptoteFit, linearFit, polynomialFit, richardson, richardsonCoefficients, zneSummary } from '../../../shared/scoring/zne';
import { expectRel } from './helpers';

const worked = [0.8, 0.65, 0.52].map((value, j) => ({ scale: j + 1, value, uncertainty: 0.01 }));

describe('Richardson coefficients (Temme, Bravyi and Gambetta 2017)', () => {
  it('published cases', () => {
    const cases: [number[], number[]][] = [
      [[1, 2], [2, -1]],
      [[1, 2, 3], [3, -3, 1]],
      [[1, 3, 5], [1.875, -1.25, 0.375]],
      [[1, 1.5, 2], [6, -8, 3]],
    ];
    for (const [c, g] of cases) richardsonCoefficients(c).forEach((v, j) => expectRel(v, g[j], 1e-12));
  });
  it('rejects repeated factors', () => {
    expect(() => richardsonCoefficients([1, 1, 2])).toThrow(/repeated/);
    expect(richardson([{ scale: 1, value: 1, uncertainty: 0 }, { scale: 1, value: 1, uncertainty: 0 }]).ok).toBe(false);
  });
});

describe('worked ZNE example (direct evaluation)', () => {
  it('Richardson 0.97 +/- 0.0435889894', () => {
    const r = richardson(worked);
    expectRel(r.value, 0.97, 1e-9);
    expectRel(r.uncertainty, 0.0435889894, 1e-6);
  });
  it('weighted linear fit 0.9366666667 +/- 0.0152752523', () => {
    const r = linearFit(worked);
    expectRel(r.value, 0.9366666667, 1e-6);
    expectRel(r.uncertainty, 0.0152752523, 1e-6);
  });
  it('exponential with asymptote 0 (log-linear fit, unweighted) 0.9948452693', () => {
    const r = exponentialFit(worked, { weighting: 'unweighted' });
    expect(r.ok).toBe(true);
    expectRel(r.value, 0.9948452693, 1e-6);
  });
  it('polynomial of degree n - 1 equals Richardson', () => {
    const p = polynomialFit(worked, 2);
    expectRel(p.value, 0.97, 1e-9);
    expectRel(p.uncertainty, 0.0435889894, 1e-6);
  });
  it('free-asymptote exponential goes through three points exactly', () => {
    const r = exponentialFreeAsymptoteFit(worked);
    expect(r.ok).toBe(true);
    // direct evaluation: E_c = a + b q^c with q = e^{-k} through the three points:
    // q = (E3 - E2)/(E2 - E1) = 13/15, b = (E2 - E1)/(q^2 - q), a = E1 - b q, E0 = a + b
    const q = 13 / 15;
    const b = (0.65 - 0.8) / (q * q - q);
    const a = 0.8 - b * q;
    expectRel(r.value, a + b, 1e-8);
  });
  it('exponential uncertainty is propagated through the log', () => {
    const r = exponentialFit(worked, { weighting: 'unweighted' });
    // direct evaluation: unweighted intercept coefficients at c = 1, 2, 3 are (4/3, 1/3, -2/3);
    // u(ln A)^2 = sum a_j^2 (u_j/E_j)^2 and u(A) = A u(ln A)
    const a = [4 / 3, 1 / 3, -2 / 3];
    const uLnA = Math.sqrt(a.reduce((s, aj, j) => s + (aj * 0.01 / worked[j].value) ** 2, 0));
    expectRel(r.uncertainty, 0.9948452693 * uLnA, 1e-6);
  });
  it('rejects non-positive or sign-changing data with a reason; all-negative data are fitted', () => {
    const z = exponentialFit([{ scale: 1, value: 0.5, uncertainty: 0.01 }, { scale: 2, value: 0, uncertainty: 0.01 }]);
    expect(z.ok).toBe(false);
    expect(z.reason).toMatch(/zero/);
    const s = exponentialFit([{ scale: 1, value: 0.5, uncertainty: 0.01 }, { scale: 2, value: -0.1, uncertainty: 0.01 }]);
    expect(s.ok).toBe(false);
    expect(s.reason).toMatch(/sign/);
    const neg = exponentialFit(worked.map((p) => ({ ...p, value: -p.value })), { weighting: 'unweighted' });
    expectRel(neg.value, -0.9948452693, 1e-6);
  });
  it('summary lists each model and the spread', () => {
    const s = zneSummary(worked, { exponentialWeighting: 'unweighted' });
    expect(s.models.map((m) => m.model)).toEqual(['richardson', 'linear', 'exponential']);
    expectRel(s.spread.min, 0.9366666667, 1e-6);
    expectRel(s.spread.max, 0.9948452693, 1e-6);
    expectRel(s.spread.range, 0.9948452693 - 0.9366666667, 1e-6);
  });
});
