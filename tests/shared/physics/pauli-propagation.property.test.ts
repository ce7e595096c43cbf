/**
 * Property tests of truncated Pauli propagation (PHYSICS.md "Truncation"): whatever the threshold,
 * weight caps or term budget, |truncated value - exact value| <= the reported dropped weight (sum of
 * |c| over everything dropped: triangle inequality, each evolved dropped string has |<P>| <= 1);
 * nothing dropped means the exact value; the term budget holds at the end.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { loadChallenge } from '../../../shared/physics/challenge';
import { compileInstance } from '../../../shared/physics/compile';
import { propagate } from '../../../shared/physics/pauli-propagation';

const arbInstance = fc.record({
  lattice: fc.oneof(
    fc.constant({ kind: 'chain' as const, n: 10 }),
    fc.constant({ kind: 'ring' as const, n: 9 }),
    fc.constant({ kind: 'square' as const, rows: 3, cols: 3 }),
    fc.constant({ kind: 'heavy-hex' as const, rows: 1, cols: 1 }),
  ),
  steps: fc.integer({ min: 1, max: 4 }),
  thetaH: fc.double({ min: 0.05, max: 1.5, noNaN: true }),
  thetaJ: fc.oneof(fc.constant(-Math.PI / 2), fc.double({ min: -1.5, max: 1.5, noNaN: true })),
  pauli: fc.constantFrom('Z4', 'X4', 'Y4 Z5', 'X3 Y4 Z5', 'Z0 Z8'),
});
const arbTruncation = fc.record(
  {
    delta: fc.oneof(fc.constant(0), fc.double({ min: 1e-6, max: 0.3, noNaN: true })),
    maxWeight: fc.integer({ min: 0, max: 6 }),
    maxXY: fc.integer({ min: 0, max: 4 }),
    maxTerms: fc.integer({ min: 1, max: 200 }),
  },
  { requiredKeys: [] },
);

describe('truncated propagation', () => {
  it('the error is bounded by the dropped weight; exact iff nothing dropped; the term budget holds', () => {
    fc.assert(
      fc.property(arbInstance, arbTruncation, (p, tr) => {
        const ch = loadChallenge({
          id: 'trunc', version: 1, title: 't', description: '', lattice: p.lattice,
          circuit: { family: 'kicked-ising', steps: [p.steps], thetaH: [p.thetaH], thetaJ: p.thetaJ },
          observables: [{ id: 'o', terms: [{ coef: 0.8, pauli: p.pauli }, { coef: -0.3, pauli: 'Z2' }] }],
        });
        const circ = compileInstance(ch.spec, ch.instances[0]);
        const obs = ch.observables[0];
        const exact = propagate(circ, obs);
        expect(exact.exact).toBe(true);
        const r = propagate(circ, obs, tr);
        expect(Math.abs(r.value - exact.value)).toBeLessThanOrEqual(r.droppedWeight * (1 + 1e-12) + 1e-12);
        expect(r.exact).toBe(r.droppedTerms === 0);
        if (r.exact) expect(r.value).toBeCloseTo(exact.value, 12);
        if (r.droppedTerms === 0) expect(r.droppedWeight).toBe(0);
        if (tr.maxTerms !== undefined) expect(r.terms).toBeLessThanOrEqual(tr.maxTerms);
        expect(r.peakTerms).toBeLessThanOrEqual(exact.peakTerms);
      }),
      { seed: 8086, numRuns: 120 },
    );
  });
});
