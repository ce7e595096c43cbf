/**
 * The challenge page's physics in the browser comes from shared/ only: the Pauli grammar of
 * shared/physics/observable.ts and the light cone of shared/physics/light-cone.ts. Check values
 * from PHYSICS.md ("Light cones": a Z site's cone is the graph ball of radius t - 1, an X or Y
 * site's radius t), worked by hand on a chain.
 */
import { describe, expect, it } from 'vitest';
import type { ChallengeSpec } from '@shared/physics/challenge';
import { parseObservables, supportOf, targetLightCone } from '@/features/challenges/lib/spec-physics';

const spec: ChallengeSpec = { id: 'c', version: 1, title: 'c', description: 'c', lattice: { kind: 'chain', n: 12 }, circuit: { family: 'kicked-ising', steps: [3], thetaH: [0.3] }, observables: [{ id: 'z5', pauli: 'Z5' }, { id: 'x5', pauli: 'X5' }, { id: 'zz', terms: [{ coef: 0.5, pauli: 'Z3Z4' }, { coef: -0.5, pauli: 'Z9 Z10' }] }] };
const detail = { lattice: { kind: 'chain', qubits: 12, edges: [], coords: [] }, observables: spec.observables.map((o) => ({ key: o.id, spec: o, bound: 1 })) };
const range = (a: number, b: number) => Array.from({ length: b - a + 1 }, (_, i) => a + i);

describe('observables and light cones in the browser', () => {
  it('parses both forms with the shared grammar (juxtaposed factors too)', () => {
    const p = parseObservables(detail);
    expect(p.get('z5')?.terms).toEqual([{ coef: 1, factors: [{ qubit: 5, op: 'Z' }] }]);
    expect([...supportOf(p.get('zz'))].sort((a, b) => a - b)).toEqual([3, 4, 9, 10]);
  });

  it('gives a Z site the ball of radius t - 1 and an X site radius t (PHYSICS.md)', () => {
    const p = parseObservables(detail);
    expect([...targetLightCone(spec, 't3-h0.300000', p.get('z5')!)!].sort((a, b) => a - b)).toEqual(range(3, 7));
    expect([...targetLightCone(spec, 't3-h0.300000', p.get('x5')!)!].sort((a, b) => a - b)).toEqual(range(2, 8));
  });

  it('answers null for an instance that is not in the grid', () => {
    expect(targetLightCone(spec, 't9-h0.300000', parseObservables(detail).get('z5')!)).toBeNull();
  });
});
