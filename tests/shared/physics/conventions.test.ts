/**
 * PHYSICS.md statements not covered elsewhere, each checked directly:
 * - RZZ(-pi/2) = e^{i pi/4} (Sdg (x) Sdg) CZ (so it costs one CNOT), against our statevector and
 *   against the npm package quantum-circuit;
 * - all RZZ gates commute: reordering them within a step (any colouring, any layer order) leaves
 *   every ideal value unchanged (property test on random instances);
 * - the final ZZ layer commutes with Z-only observables (and matters for X or Y);
 * - RZZ on (a, b) branches a Pauli string only when x_a xor x_b = 1 (all 16 local strings).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { CompiledCircuit, Gate, PauliFactor } from '../../../shared/physics/circuit';
import { loadChallenge, type ChallengeSpec } from '../../../shared/physics/challenge';
import { compileInstance } from '../../../shared/physics/compile';
import { propagate } from '../../../shared/physics/pauli-propagation';
import { Statevector, statevectorExpectation } from '../../../shared/physics/statevector';
import { createRng } from '../../../shared/scoring/prng';
import { qcPauliExpectation } from './qc-reference';

const HALF_PI = Math.PI / 2;

/** Columns of the 2-qubit unitary of `gates`: run each basis state through the statevector. */
function unitary(gates: Gate[]): { re: number; im: number }[][] {
  return [0, 1, 2, 3].map((b) => {
    const prep: Gate[] = [];
    if (b & 1) prep.push({ name: 'x', qubits: [0] });
    if (b & 2) prep.push({ name: 'x', qubits: [1] });
    const sv = Statevector.run({ nQubits: 2, gates: [...prep, ...gates], layers: [] });
    return [0, 1, 2, 3].map((i) => sv.amplitude(i));
  });
}

describe('RZZ(-pi/2) = e^{i pi/4} (Sdg (x) Sdg) CZ (PHYSICS.md)', () => {
  it('as matrices (our statevector)', () => {
    const lhs = unitary([{ name: 'rzz', qubits: [0, 1], params: [-HALF_PI] }]);
    const rhs = unitary([{ name: 'cz', qubits: [0, 1] }, { name: 'sdg', qubits: [0] }, { name: 'sdg', qubits: [1] }]);
    const pr = Math.SQRT1_2, pi = Math.SQRT1_2; // e^{i pi/4}
    for (let c = 0; c < 4; c++) {
      for (let r = 0; r < 4; r++) {
        const a = rhs[c][r];
        expect(lhs[c][r].re).toBeCloseTo(pr * a.re - pi * a.im, 14);
        expect(lhs[c][r].im).toBeCloseTo(pr * a.im + pi * a.re, 14);
      }
    }
  });
  it('as Heisenberg maps, by quantum-circuit: every 2-qubit Pauli after a random preparation has the same value', () => {
    const rng = createRng(5);
    const prep: Gate[] = [];
    for (let q = 0; q < 2; q++) prep.push({ name: 'ry', qubits: [q], params: [3 * rng.uniform()] }, { name: 'rz', qubits: [q], params: [3 * rng.uniform()] });
    prep.push({ name: 'cx', qubits: [0, 1] }, { name: 'rx', qubits: [1], params: [1.1] });
    const ops = ['X', 'Y', 'Z'] as const;
    for (let a = 0; a < 4; a++) {
      for (let b = 0; b < 4; b++) {
        if (!a && !b) continue;
        const f: PauliFactor[] = [];
        if (a) f.push({ qubit: 0, op: ops[a - 1] });
        if (b) f.push({ qubit: 1, op: ops[b - 1] });
        const lhs = qcPauliExpectation(2, [...prep, { name: 'rzz', qubits: [0, 1], params: [-HALF_PI] }], f);
        const rhs = qcPauliExpectation(2, [...prep, { name: 'cz', qubits: [0, 1] }, { name: 'sdg', qubits: [0] }, { name: 'sdg', qubits: [1] }], f);
        expect(lhs).toBeCloseTo(rhs, 12);
      }
    }
  });
});

const arbInstance = fc.record({
  lattice: fc.constantFrom<ChallengeSpec['lattice']>(
    { kind: 'chain' as const, n: 6 },
    { kind: 'ring' as const, n: 7 },
    { kind: 'square' as const, rows: 3, cols: 3 },
    { kind: 'heavy-hex' as const, rows: 1, cols: 1 },
    { kind: 'edges' as const, n: 6, edges: [[0, 1], [1, 2], [2, 0], [2, 3], [3, 4], [4, 5], [5, 1], [0, 4]] },
  ),
  steps: fc.integer({ min: 1, max: 3 }),
  thetaH: fc.double({ min: -3, max: 3, noNaN: true }),
  thetaJ: fc.double({ min: -3, max: 3, noNaN: true }),
  pauli: fc.constantFrom('Z0', 'X1', 'Y2', 'Z1 Z2', 'X0 Y3', 'Z0 X2 Y4'),
  seed: fc.nat(),
});

function instance(p: { lattice: ChallengeSpec['lattice']; steps: number; thetaH: number; thetaJ: number; pauli: string }) {
  const ch = loadChallenge({
    id: 'conv', version: 1, title: 'conv', description: '', lattice: p.lattice,
    circuit: { family: 'kicked-ising', steps: [p.steps], thetaH: [p.thetaH], thetaJ: p.thetaJ },
    observables: [{ id: 'o', pauli: p.pauli }],
  });
  return { circ: compileInstance(ch.spec, ch.instances[0]), obs: ch.observables[0] };
}

/** The gates of each step: [rx gates, rzz gates]. */
function steps(c: CompiledCircuit): { rx: Gate[]; rzz: Gate[] }[] {
  const out: { rx: Gate[]; rzz: Gate[] }[] = [];
  for (const g of c.gates) {
    if (g.name === 'rx' && (out.length === 0 || out[out.length - 1].rzz.length > 0)) out.push({ rx: [], rzz: [] });
    if (g.name === 'rx') out[out.length - 1].rx.push(g);
    else out[out.length - 1].rzz.push(g);
  }
  return out;
}

describe('kicked-Ising facts (PHYSICS.md)', () => {
  it('RZZ gates commute: any reordering of a step\'s RZZ gates (any colouring and layer order) gives the same values', () => {
    fc.assert(
      fc.property(arbInstance, (p) => {
        const { circ, obs } = instance(p);
        const ref = statevectorExpectation(circ, obs).value;
        const rng = createRng(p.seed);
        const gates: Gate[] = [];
        for (const s of steps(circ)) {
          const rzz = s.rzz.slice();
          for (let i = rzz.length - 1; i > 0; i--) {
            const j = Math.floor(rng.uniform() * (i + 1));
            [rzz[i], rzz[j]] = [rzz[j], rzz[i]];
          }
          gates.push(...s.rx, ...rzz);
        }
        const shuffled: CompiledCircuit = { nQubits: circ.nQubits, gates, layers: [] };
        expect(Math.abs(statevectorExpectation(shuffled, obs).value - ref)).toBeLessThan(1e-12);
        expect(Math.abs(propagate(shuffled, obs).value - ref)).toBeLessThan(1e-12);
      }),
      { seed: 61, numRuns: 30 },
    );
  });

  it('the final ZZ layer commutes with Z-only observables: dropping it leaves Z strings unchanged', () => {
    fc.assert(
      fc.property(arbInstance, (p) => {
        const { circ, obs } = instance(p);
        const st = steps(circ);
        const without: CompiledCircuit = { nQubits: circ.nQubits, gates: st.flatMap((s, i) => (i === st.length - 1 ? s.rx : [...s.rx, ...s.rzz])), layers: [] };
        const zOnly = obs.terms.every((t) => t.factors.every((f) => f.op === 'Z'));
        if (zOnly) expect(Math.abs(statevectorExpectation(without, obs).value - statevectorExpectation(circ, obs).value)).toBeLessThan(1e-12);
      }),
      { seed: 62, numRuns: 60 },
    );
    // ... and it matters for X or Y: a generic instance where <X1> changes when the layer is dropped
    const { circ, obs } = instance({ lattice: { kind: 'chain', n: 4 }, steps: 2, thetaH: 0.7, thetaJ: 0.9, pauli: 'X1' });
    const st = steps(circ);
    const without: CompiledCircuit = { nQubits: 4, gates: st.flatMap((s, i) => (i === st.length - 1 ? s.rx : [...s.rx, ...s.rzz])), layers: [] };
    expect(Math.abs(statevectorExpectation(without, obs).value - statevectorExpectation(circ, obs).value)).toBeGreaterThan(1e-3);
  });

  it('RZZ(theta) on (a, b) branches a string only when x_a xor x_b = 1 (all 16 local strings, generic theta)', () => {
    const ops = ['I', 'X', 'Y', 'Z'] as const;
    for (let a = 0; a < 4; a++) {
      for (let b = 0; b < 4; b++) {
        if (!a && !b) continue;
        const f: PauliFactor[] = [];
        if (a) f.push({ qubit: 0, op: ops[a] as 'X' | 'Y' | 'Z' });
        if (b) f.push({ qubit: 1, op: ops[b] as 'X' | 'Y' | 'Z' });
        const r = propagate({ nQubits: 2, gates: [{ name: 'rzz', qubits: [0, 1], params: [0.37] }], layers: [] }, { id: 'o', terms: [{ coef: 1, factors: f }] }, { returnTerms: true });
        const xa = a === 1 || a === 2 ? 1 : 0;
        const xb = b === 1 || b === 2 ? 1 : 0;
        expect(r.finalTerms!.length, `${ops[a]}${ops[b]}`).toBe(xa ^ xb ? 2 : 1);
      }
    }
  });
});
