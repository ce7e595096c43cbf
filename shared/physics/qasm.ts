/**
 * OpenQASM 3 export of a compiled instance.
 *
 * stdgates.inc (OpenQASM 3 standard library) defines x, y, z, h, s, sdg, sx, rx, ry, rz, cx, cz
 * but not rzz, so the output defines it:
 *   gate rzz(theta) a, b { cx a, b; rz(theta) b; cx a, b; }
 * which equals exp(-i theta Z(x)Z / 2) exactly (CX conjugation maps Z_b to Z_a Z_b); the test checks
 * the matrices. Angles are written with the shortest round-trip decimal (String(number)).
 * No measurement is written: targets are expectation values of the observables named in the header.
 */
import type { CompiledCircuit } from './circuit';
import type { ChallengeSpec } from './challenge';
import { compileInstance, type CompiledLattice, type Instance } from './compile';

export interface QasmHeader {
  challengeId: string;
  version: number;
  /** hex SHA-256 of the canonical spec */
  checksum: string;
  instanceId: string;
  /** free-text lines for the header, e.g. the instance parameters */
  notes?: string[];
}

export const RZZ_DEFINITION = 'gate rzz(theta) a, b { cx a, b; rz(theta) b; cx a, b; }';

export function formatAngle(x: number): string {
  if (!Number.isFinite(x)) throw new Error(`qasm: non-finite angle ${x}`);
  if (Object.is(x, -0)) return '0';
  return String(x);
}

export function toQasm3(circuit: CompiledCircuit, header: QasmHeader): string {
  const lines: string[] = [];
  lines.push('OPENQASM 3.0;');
  lines.push('include "stdgates.inc";');
  lines.push(`// Parallax challenge ${oneLine(header.challengeId)} version ${header.version}`);
  lines.push(`// checksum sha256:${oneLine(header.checksum)}`);
  lines.push(`// instance ${oneLine(header.instanceId)}`);
  for (const n of header.notes ?? []) lines.push(`// ${oneLine(n)}`);
  lines.push('// initial state |0...0>; qubits 0-based; RX(t) = exp(-i t X/2), RZZ(t) = exp(-i t ZZ/2)');
  if (circuit.gates.some((g) => g.name === 'rzz')) lines.push(RZZ_DEFINITION);
  lines.push(`qubit[${circuit.nQubits}] q;`);
  for (const g of circuit.gates) {
    const args = g.qubits.map((q) => `q[${q}]`).join(', ');
    const params = g.params && g.params.length ? `(${g.params.map(formatAngle).join(', ')})` : '';
    lines.push(`${g.name}${params} ${args};`);
  }
  return lines.join('\n') + '\n';
}

function oneLine(s: string): string {
  return s.replace(/[\r\n]+/g, ' ');
}

/**
 * OpenQASM 3 of one instance of a validated challenge, with the header filled in (challenge id,
 * version, checksum, instance id, instance parameters, observable ids).
 */
export function instanceQasm(
  challenge: { spec: ChallengeSpec; checksum: string },
  instance: Instance,
  lattice?: CompiledLattice,
): string {
  const circuit = compileInstance(challenge.spec, instance, lattice);
  const notes: string[] = [];
  const p = instance.params;
  if (p.family === 'kicked-ising') notes.push(`kicked-ising: steps ${p.steps}, thetaH ${formatAngle(p.thetaH)}, thetaJ ${formatAngle(p.thetaJ)}`);
  const ids = challenge.spec.observables.map((o) => o.id);
  notes.push(`observables: ${ids.slice(0, 20).join(', ')}${ids.length > 20 ? `, ... (${ids.length} in all)` : ''}`);
  return toQasm3(circuit, { challengeId: challenge.spec.id, version: challenge.spec.version, checksum: challenge.checksum, instanceId: instance.id, notes });
}
