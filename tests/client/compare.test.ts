/**
 * The comparison of two entries (src/features/compare/lib/compare.ts). Check values worked by hand;
 * the chi-squared survival value is the textbook one (chi-squared table: P(chi2_2 > 5.991) = 0.05).
 */
import { describe, expect, it } from 'vitest';
import { compareRows, summarise } from '@/features/compare/lib/compare';

describe('compareRows and summarise', () => {
  const a = new Map([['t2-h0.1:z1', { value: 0.5, uncertainty: 0.03 }], ['t12-h0.1:z1', { value: 0.2, uncertainty: 0.03 }], ['t1-h0.1:z1', { value: 0.9, uncertainty: 0.01 }]]);
  const b = new Map([['t2-h0.1:z1', { value: 0.46, uncertainty: 0.04 }], ['t1-h0.1:z1', { value: 0.9, uncertainty: 0 }], ['t3-h0.1:z1', { value: 0.1, uncertainty: 0.1 }]]);

  it('orders the targets naturally and gives d, u = sqrt(ua² + ub²) and U = 2u where both answered', () => {
    const rows = compareRows(a, b);
    expect(rows.map((r) => r.target)).toEqual(['t1-h0.1:z1', 't2-h0.1:z1', 't3-h0.1:z1', 't12-h0.1:z1']);
    const r2 = rows[1];
    expect(r2.d).toBeCloseTo(0.04, 12);
    expect(r2.u).toBeCloseTo(0.05, 12); // 3-4-5
    expect(r2.U).toBeCloseTo(0.1, 12);
    expect(rows[2].d).toBeNull();
    expect(rows[3].b).toBeNull();
  });

  it('sums chi-squared of the differences with one degree of freedom per target', () => {
    const s = summarise(compareRows(a, b));
    // (0/0.01)² + (0.04/0.05)² = 0.64
    expect(s.chi2).toBeCloseTo(0.64, 12);
    expect(s.nu).toBe(2);
    expect(s.common).toBe(2);
    expect(s.onlyA).toBe(1);
    expect(s.onlyB).toBe(1);
    expect(s.outside).toBe(0);
    expect(s.meanD).toBeCloseTo(0.02, 12);
    // chi-squared with 2 degrees of freedom: P(X > x) = exp(-x/2) (closed form)
    expect(s.p).toBeCloseTo(Math.exp(-0.32), 10);
  });

  it('matches the 5 % point of the chi-squared table', () => {
    const rows = [{ a: { value: 0, uncertainty: 1 }, b: { value: 0, uncertainty: 0 }, d: Math.sqrt(5.991), u: 1, U: 2 }, { a: { value: 0, uncertainty: 1 }, b: { value: 0, uncertainty: 0 }, d: 0, u: 1, U: 2 }];
    const s = summarise(rows);
    expect(s.p).toBeCloseTo(0.05, 3);
    expect(s.outside).toBe(1);
  });
});
