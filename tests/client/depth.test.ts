/** The "where a method breaks" cells of the depth view (src/features/targets/lib/depth.ts); values worked by hand. */
import { describe, expect, it } from 'vitest';
import { breakCell, gridAxes } from '@/features/targets/lib/depth';

describe('breakCell', () => {
  it('compares |error| with u and 2u', () => {
    expect(breakCell({ value: 0.51, uncertainty: 0.02 }, 0.5)).toBe('within');
    expect(breakCell({ value: 0.53, uncertainty: 0.02 }, 0.5)).toBe('beyond-u');
    expect(breakCell({ value: 0.55, uncertainty: 0.02 }, 0.5)).toBe('beyond-2u');
    expect(breakCell({ value: 0.45, uncertainty: 0.02 }, 0.5)).toBe('beyond-2u');
  });
  it('says when there is nothing to compare with', () => {
    expect(breakCell(undefined, 0.5)).toBe('missing');
    expect(breakCell({ value: 0.5, uncertainty: 0.1 }, null)).toBe('no-reference');
  });
  it('treats a claimed-exact answer equal to the reference to double rounding as within', () => {
    expect(breakCell({ value: 0.1 + 0.2, uncertainty: 0 }, 0.3)).toBe('within');
    expect(breakCell({ value: 0.31, uncertainty: 0 }, 0.3)).toBe('beyond-2u');
  });
});

describe('gridAxes', () => {
  it('sorts steps and angles numerically', () => {
    const g = gridAxes([{ params: { steps: 12, thetaH: 0.5 } }, { params: { steps: 2, thetaH: 0.1 } }, { params: { steps: 4, thetaH: 0.5 } }]);
    expect(g).toEqual({ steps: [2, 4, 12], thetas: [0.1, 0.5] });
  });
});
