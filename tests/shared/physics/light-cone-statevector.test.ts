import { describe, expect, it } from 'vitest';
// @ts-expect-error quantum-circuit ships no type declarations (its API is typed locally below)
import QuantumCircuitUntyped from 'quantum-circuit';
import type { CompiledCircuit, Gate, ObservableSpec } from '../../../shared/physics/circuit';
import { freeFermionExpectation } from '../../../shared/physics/free-fermion';
import { lightConeStatevectorValue } from '../../../shared/physics/light-cone-statevector';
import { QubitLimitError, Statevector } from '../../../shared/physics/statevector';

interface QCInstance {
  appendGate(name: string, wires: number | number[], options?: { params: Record<string, number | undefined> }): void;
  run(): void;
  stateAsSimpleArray(): { re: number; im: number }[];
}
const QuantumCircuit = QuantumCircuitUntyped as new (n: number) => QCInstance;

/** Per step: RX(thetaH) on every qubit, then RZZ(thetaJ) on every edge (i, i+1) (PHYSICS.md). */
function chainCircuit(n: number, thetaJ: number, thetaH: number, steps: number): CompiledCircuit {
  const gates: Gate[] = [];
  const layers: CompiledCircuit['layers'] = [];
  for (let s = 0; s < steps; s++) {
    let start = gates.length;
    for (let q = 0; q < n; q++) gates.push({ name: 'rx', qubits: [q], params: [thetaH] });
    layers.push({ kind: 'rx', start, end: gates.length });
    start = gates.length;
    for (let q = 0; q + 1 < n; q++) gates.push({ name: 'rzz', qubits: [q, q + 1], params: [thetaJ] });
    layers.push({ kind: 'rzz', start, end: gates.length });
  }
  return { nQubits: n, gates, layers };
}

/**
 * Restrict a chain circuit to the sites lo..hi by hand (keep the gates inside, re-index to 0..k-1).
 * By PHYSICS.md "Light cones" this is exact when lo..hi holds the observable's cone.
 */
function restrict(c: CompiledCircuit, lo: number, hi: number): CompiledCircuit {
  const gates = c.gates
    .filter((g) => g.qubits.every((q) => q >= lo && q <= hi))
    .map((g) => ({ ...g, qubits: g.qubits.map((q) => q - lo) }));
  return { nQubits: hi - lo + 1, gates, layers: [] };
}

/** <Z_q> on the quantum-circuit npm package's run, from the probabilities |amplitude|^2. */
function qcZ(c: CompiledCircuit, q: number): number {
  const qc = new QuantumCircuit(c.nQubits);
  for (const g of c.gates) {
    if (g.name === 'rx') qc.appendGate('rx', g.qubits[0], { params: { theta: g.params![0] } });
    else if (g.name === 'rzz') qc.appendGate('zz', [...g.qubits], { params: { theta: g.params![0] } });
    else throw new Error('helper handles rx and rzz only');
  }
  qc.run();
  let v = 0;
  qc.stateAsSimpleArray().forEach((a, i) => (v += ((i >>> q) & 1 ? -1 : 1) * ((a.re ?? 0) ** 2 + (a.im ?? 0) ** 2)));
  return v;
}

describe('light-cone statevector', () => {
  it('Z_8 on a 16-site chain after 3 steps from its 5-site cone equals the full 16-qubit value', () => {
    const full = chainCircuit(16, 0.7, 0.9, 3);
    const obsFull: ObservableSpec = { id: 'z8', terms: [{ coef: 1, factors: [{ qubit: 8, op: 'Z' }] }] };
    const want = Statevector.run(full).expectation(obsFull); // own full statevector engine
    // Z cone radius t - 1 = 2 (PHYSICS.md): sites 6..10
    const sub = restrict(full, 6, 10);
    const obs: ObservableSpec = { id: 'z8', terms: [{ coef: 1, factors: [{ qubit: 2, op: 'Z' }] }] };
    const r = lightConeStatevectorValue(sub, obs);
    expect(r.nQubits).toBe(5);
    expect(r.bytes).toBe(16 * 32); // PHYSICS.md: 16 bytes per amplitude
    expect(Math.abs(r.value - want)).toBeLessThan(1e-10);
    expect(Math.abs(r.value - qcZ(sub, 2))).toBeLessThan(1e-10); // quantum-circuit npm package
    const f = freeFermionExpectation({ n: 16, thetaJ: 0.7, thetaH: 0.9, steps: 3 }, obsFull, { lightCone: false });
    expect(f.ok && Math.abs(f.value - r.value)).toBeLessThan(1e-10); // PHYSICS.md free-fermion solution
    // a cone one site too small on each side gives a different value (the check can fail)
    const tooSmall = lightConeStatevectorValue(restrict(full, 7, 9), { id: 'z', terms: [{ coef: 1, factors: [{ qubit: 1, op: 'Z' }] }] });
    expect(Math.abs(tooSmall.value - want)).toBeGreaterThan(1e-6);
  });

  it('X_7 Z_8 with coefficients: cone radius t around an X site', () => {
    const full = chainCircuit(18, -0.4, 0.6, 3);
    const terms = [
      { coef: 0.5, factors: [{ qubit: 7, op: 'X' as const }, { qubit: 8, op: 'Z' as const }] },
      { coef: -2, factors: [{ qubit: 7, op: 'Y' as const }] },
    ];
    const want = Statevector.run(full).expectation({ id: 'a', terms }); // own full statevector engine
    const lo = 7 - 3, hi = 8 + 3; // radius t (PHYSICS.md)
    const sub = restrict(full, lo, hi);
    const r = lightConeStatevectorValue(sub, {
      id: 'a',
      terms: terms.map((t) => ({ ...t, factors: t.factors.map((f) => ({ ...f, qubit: f.qubit - lo })) })),
    });
    expect(r.termValues.length).toBe(2);
    expect(Math.abs(r.value - want)).toBeLessThan(1e-10);
  });

  it('rejects an observable outside the restricted qubits, and cones over the qubit limit', () => {
    const sub = chainCircuit(4, 0.3, 0.2, 1);
    expect(() => lightConeStatevectorValue(sub, { id: 'o', terms: [{ coef: 1, factors: [{ qubit: 4, op: 'Z' }] }] })).toThrow(/outside the restricted/);
    expect(() => lightConeStatevectorValue(sub, { id: 'o', terms: [{ coef: 1, factors: [{ qubit: 0, op: 'Z' }] }] }, { maxQubits: 3 })).toThrow(QubitLimitError);
    expect(() => lightConeStatevectorValue(chainCircuit(30, 0.3, 0.2, 1), { id: 'o', terms: [] })).toThrow(/30 qubits exceeds the limit of 26/);
  });

  it('passes progress through', () => {
    const seen: number[] = [];
    lightConeStatevectorValue(chainCircuit(6, 0.3, 0.2, 2), { id: 'o', terms: [] }, { onProgress: (d) => seen.push(d) });
    expect(seen[seen.length - 1]).toBe(22); // 2 x (6 rx + 5 rzz) gates, counted by hand
  });
});
