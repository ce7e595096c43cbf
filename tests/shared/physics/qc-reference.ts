/**
 * The npm package quantum-circuit (0.9.x, MIT) as an outside reference statevector for small
 * circuits (PHYSICS.md "Reference library for tests"). Its conventions: rx, ry are exp(-i t P/2),
 * rz takes `phi` and is exp(-i phi Z/2) up to a global phase, zz is exp(-i t ZZ/2), srn is sqrt(X);
 * wire w is bit w of the basis index (checked in statevector.test.ts). It has no Pauli expectation
 * function, so X and Y factors are rotated to Z (H for X, Sdg then H for Y) and the Z-string value
 * is taken from the probabilities. Amplitudes are rounded to 14 decimals by the package.
 */
// @ts-expect-error quantum-circuit ships no type declarations (the part used is typed locally below)
import QuantumCircuitUntyped from 'quantum-circuit';
import type { Gate, ObservableSpec, PauliFactor } from '../../../shared/physics/circuit';

interface QC {
  appendGate(name: string, wires: number | number[], options?: { params: Record<string, number> }): void;
  run(): void;
  stateAsSimpleArray(): { re?: number; im?: number }[];
}
const QuantumCircuit = QuantumCircuitUntyped as new (n: number) => QC;

function appendGate(c: QC, g: Gate): void {
  const t = g.params?.[0] ?? 0;
  const wires = g.qubits.length === 1 ? g.qubits[0] : [...g.qubits];
  switch (g.name) {
    case 'rx':
    case 'ry':
      c.appendGate(g.name, wires, { params: { theta: t } });
      break;
    case 'rz':
      c.appendGate('rz', wires, { params: { phi: t } });
      break;
    case 'rzz':
      c.appendGate('zz', wires, { params: { theta: t } });
      break;
    case 'sx':
      c.appendGate('srn', wires);
      break;
    default:
      c.appendGate(g.name, wires);
  }
}

/** <0...0| U^dag P U |0...0> for one Pauli string, computed by quantum-circuit alone. */
export function qcPauliExpectation(n: number, gates: readonly Gate[], factors: readonly PauliFactor[]): number {
  const c = new QuantumCircuit(n);
  for (const g of gates) appendGate(c, g);
  let mask = 0;
  for (const f of factors) {
    if (f.op === 'X') c.appendGate('h', f.qubit);
    if (f.op === 'Y') {
      c.appendGate('sdg', f.qubit);
      c.appendGate('h', f.qubit);
    }
    mask |= 1 << f.qubit;
  }
  for (let q = 0; q < n; q++) c.appendGate('id', q); // every wire exists even when untouched
  c.run();
  const amps = c.stateAsSimpleArray();
  if (amps.length !== 1 << n) throw new Error(`quantum-circuit returned ${amps.length} amplitudes for ${n} qubits`);
  let v = 0;
  for (let i = 0; i < amps.length; i++) {
    const re = amps[i].re ?? 0;
    const im = amps[i].im ?? 0;
    let par = 0;
    for (let m = i & mask; m; m &= m - 1) par ^= 1;
    v += par ? -(re * re + im * im) : re * re + im * im;
  }
  return v;
}

/** sum_k coef_k <P_k> by quantum-circuit. */
export function qcExpectation(n: number, gates: readonly Gate[], obs: ObservableSpec): number {
  let v = 0;
  for (const t of obs.terms) v += t.coef * (t.factors.length === 0 ? 1 : qcPauliExpectation(n, gates, t.factors));
  return v;
}
