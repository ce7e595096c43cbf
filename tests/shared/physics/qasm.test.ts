import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import type { Gate, GateName } from '../../../shared/physics/circuit';
import { GATE_ARITY } from '../../../shared/physics/circuit';
import { loadChallenge, type ChallengeSpec } from '../../../shared/physics/challenge';
import { compileInstance, compileLattice } from '../../../shared/physics/compile';
import { formatAngle, instanceQasm, RZZ_DEFINITION, toQasm3 } from '../../../shared/physics/qasm';

const fixture = (name: string) => JSON.parse(readFileSync(`tests/fixtures/challenges/${name}.json`, 'utf8')) as ChallengeSpec;

/* 4 x 4 complex matrices, basis index = 2 * a + b (a = first qubit) */
type M = { re: number[][]; im: number[][] };
const zeros = (): M => ({ re: [0, 1, 2, 3].map(() => [0, 0, 0, 0]), im: [0, 1, 2, 3].map(() => [0, 0, 0, 0]) });
function mul(A: M, B: M): M {
  const C = zeros();
  for (let i = 0; i < 4; i++)
    for (let j = 0; j < 4; j++)
      for (let k = 0; k < 4; k++) {
        C.re[i][j] += A.re[i][k] * B.re[k][j] - A.im[i][k] * B.im[k][j];
        C.im[i][j] += A.re[i][k] * B.im[k][j] + A.im[i][k] * B.re[k][j];
      }
  return C;
}
const CX = (() => {
  const m = zeros();
  // control a, target b: |a b> -> |a, a xor b>
  for (let a = 0; a < 2; a++) for (let b = 0; b < 2; b++) m.re[2 * a + (a ^ b)][2 * a + b] = 1;
  return m;
})();
function rzOnB(t: number): M {
  const m = zeros();
  for (let i = 0; i < 4; i++) {
    const b = i & 1;
    m.re[i][i] = Math.cos(t / 2);
    m.im[i][i] = b ? Math.sin(t / 2) : -Math.sin(t / 2); // RZ(t) = diag(e^{-it/2}, e^{it/2})
  }
  return m;
}
function rzzExact(t: number): M {
  const m = zeros();
  for (let i = 0; i < 4; i++) {
    const zz = ((i >> 1) & 1) ^ (i & 1) ? -1 : 1;
    m.re[i][i] = Math.cos(t / 2);
    m.im[i][i] = -zz * Math.sin(t / 2); // exp(-i t/2 ZZ)
  }
  return m;
}

describe('OpenQASM 3 export', () => {
  it('rzz definition cx; rz(theta) b; cx equals exp(-i theta ZZ / 2) (global phase 1)', () => {
    for (const t of [0, 0.3, -Math.PI / 2, 1.234, Math.PI, 5.5]) {
      const def = mul(CX, mul(rzOnB(t), CX));
      const want = rzzExact(t);
      // compare up to a global phase: find the phase from the largest entry, then compare all
      let pr = 0, pi = 0;
      for (let i = 0; i < 4; i++) {
        // want = phase * def on the diagonal
        const d = def.re[i][i] ** 2 + def.im[i][i] ** 2;
        if (d > 0.25) {
          pr = (want.re[i][i] * def.re[i][i] + want.im[i][i] * def.im[i][i]) / d;
          pi = (want.im[i][i] * def.re[i][i] - want.re[i][i] * def.im[i][i]) / d;
          break;
        }
      }
      expect(Math.hypot(pr, pi)).toBeCloseTo(1, 14);
      expect(pr).toBeCloseTo(1, 14); // in fact exactly equal, not just up to phase
      for (let i = 0; i < 4; i++)
        for (let j = 0; j < 4; j++) {
          expect(pr * def.re[i][j] - pi * def.im[i][j]).toBeCloseTo(want.re[i][j], 14);
          expect(pr * def.im[i][j] + pi * def.re[i][j]).toBeCloseTo(want.im[i][j], 14);
        }
    }
  });

  it('writes the header, stdgates include, rzz definition, register and one line per gate', () => {
    const c = loadChallenge(fixture('chain-small'));
    const inst = c.instances.find((i) => i.id === 't2-h0.785398')!;
    const circ = compileInstance(c.spec, inst, compileLattice(c.spec));
    const q = toQasm3(circ, { challengeId: c.spec.id, version: c.spec.version, checksum: c.checksum, instanceId: inst.id, notes: ['steps 2, thetaH 0.7853981633974483'] });
    const lines = q.trimEnd().split('\n');
    // OpenQASM 3 spec: the version statement comes first, then includes.
    expect(lines[0]).toBe('OPENQASM 3.0;');
    expect(lines[1]).toBe('include "stdgates.inc";');
    expect(q).toContain('// Parallax challenge chain-12 version 1\n');
    expect(q).toContain(`// checksum sha256:${c.checksum}\n`);
    expect(q).toContain('// instance t2-h0.785398\n');
    expect(q).toContain(RZZ_DEFINITION + '\n');
    expect(q).toContain('qubit[12] q;\n');
    expect(q).toContain('\nrx(0.7853981633974483) q[0];\n');
    expect(q).toContain('\nrzz(-1.5707963267948966) q[0], q[1];\n');
    const gateLines = lines.filter((l) => /^[a-z]+(\(|\s)/.test(l) && !l.startsWith('include') && !l.startsWith('gate') && !l.startsWith('qubit'));
    expect(gateLines.length).toBe(circ.gates.length);
  });

  it('round-trips: parsing the gate lines back gives the same gate list (angles exact)', () => {
    const c = loadChallenge(fixture('gates-small'));
    const circ = compileInstance(c.spec, c.instances[0]);
    const q = toQasm3(circ, { challengeId: c.spec.id, version: 2, checksum: c.checksum, instanceId: 'base' });
    expect(q.trimEnd().split('\n').every((l) => l.length > 0)).toBe(true); // no empty lines
    const parsed: Gate[] = [];
    for (const line of q.split('\n')) {
      const m = /^([a-z]+)(?:\(([^)]*)\))? (q\[\d+\](?:, q\[\d+\])*);$/.exec(line);
      if (!m || line.startsWith('gate ')) continue;
      const name = m[1] as GateName;
      expect(GATE_ARITY[name]).toBeDefined();
      const qubits = [...m[3].matchAll(/q\[(\d+)\]/g)].map((x) => Number(x[1]));
      parsed.push(m[2] ? { name, qubits, params: m[2].split(', ').map(Number) } : { name, qubits });
    }
    expect(parsed).toEqual(circ.gates);
  });

  it('no rzz definition when the circuit has no rzz; angles print shortest round-trip', () => {
    const q = toQasm3({ nQubits: 1, gates: [{ name: 'h', qubits: [0] }], layers: [] }, { challengeId: 'x', version: 1, checksum: 'ab', instanceId: 'base' });
    expect(q).not.toContain('gate rzz');
    expect(formatAngle(-0)).toBe('0');
    expect(formatAngle(1e-7)).toBe('1e-7');
    expect(Number(formatAngle(Math.PI / 3))).toBe(Math.PI / 3);
    expect(() => formatAngle(NaN)).toThrow();
  });

  it('header fields cannot break out of the comment line', () => {
    const q = toQasm3({ nQubits: 1, gates: [], layers: [] }, { challengeId: 'a\nx q[0];', version: 1, checksum: 'ab', instanceId: 'i' });
    expect(q.split('\n').filter((l) => l.startsWith('x '))).toEqual([]);
  });

  it('instanceQasm fills the header from the challenge', () => {
    const c = loadChallenge(fixture('heavy-hex'));
    const q = instanceQasm(c, c.instances[4]);
    expect(q).toContain('// Parallax challenge heavy-hex-2x3 version 1\n');
    expect(q).toContain(`// checksum sha256:${c.checksum}\n`);
    expect(q).toContain('// instance t2-h0.785398\n');
    expect(q).toContain('// kicked-ising: steps 2, thetaH 0.7853981633974483, thetaJ -1.5707963267948966\n');
    expect(q).toContain('// observables: z0, z10, x20y21, z3z4z5\n');
    expect(q).toContain('qubit[49] q;\n');
    expect(q.split('\n').filter((l) => l.startsWith('rzz(')).length).toBe(2 * 54);
  });
});
