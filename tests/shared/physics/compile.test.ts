import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import type { CompiledCircuit, Gate, PauliFactor } from '../../../shared/physics/circuit';
import { loadChallenge, type ChallengeSpec } from '../../../shared/physics/challenge';
import {
  compileInstance,
  compileLattice,
  detectLayers,
  enumerateInstances,
  enumerateTargets,
  gateCounts,
  instanceId,
  kickedIsingGateTotals,
} from '../../../shared/physics/compile';
import { kickedIsing } from '../../../shared/physics/kicked-ising';
import { chain, edgeColouring, heavyHex, square } from '../../../shared/physics/lattices';
import { parsePauli } from '../../../shared/physics/observable';

const fixture = (name: string) => JSON.parse(readFileSync(`tests/fixtures/challenges/${name}.json`, 'utf8')) as ChallengeSpec;

/* ---- a minimal dense statevector, written here from the gate definitions in circuit.ts ---- */
type C = [number, number];
const S2 = Math.SQRT1_2;
function oneQubitMatrix(g: Gate): C[] {
  const t = g.params?.[0] ?? 0;
  const c = Math.cos(t / 2);
  const s = Math.sin(t / 2);
  switch (g.name) {
    case 'x': return [[0, 0], [1, 0], [1, 0], [0, 0]];
    case 'y': return [[0, 0], [0, -1], [0, 1], [0, 0]];
    case 'z': return [[1, 0], [0, 0], [0, 0], [-1, 0]];
    case 'h': return [[S2, 0], [S2, 0], [S2, 0], [-S2, 0]];
    case 's': return [[1, 0], [0, 0], [0, 0], [0, 1]];
    case 'sdg': return [[1, 0], [0, 0], [0, 0], [0, -1]];
    case 'sx': return [[0.5, 0.5], [0.5, -0.5], [0.5, -0.5], [0.5, 0.5]];
    case 'rx': return [[c, 0], [0, -s], [0, -s], [c, 0]];
    case 'ry': return [[c, 0], [-s, 0], [s, 0], [c, 0]];
    case 'rz': return [[c, -s], [0, 0], [0, 0], [c, s]];
    default: throw new Error(g.name);
  }
}
function run(circ: CompiledCircuit): Float64Array {
  const N = 1 << circ.nQubits;
  const v = new Float64Array(2 * N);
  v[0] = 1;
  for (const g of circ.gates) {
    if (g.qubits.length === 1) {
      const m = oneQubitMatrix(g);
      const bit = 1 << g.qubits[0];
      for (let i = 0; i < N; i++) {
        if (i & bit) continue;
        const j = i | bit;
        const [ar, ai, br, bi] = [v[2 * i], v[2 * i + 1], v[2 * j], v[2 * j + 1]];
        v[2 * i] = m[0][0] * ar - m[0][1] * ai + m[1][0] * br - m[1][1] * bi;
        v[2 * i + 1] = m[0][0] * ai + m[0][1] * ar + m[1][0] * bi + m[1][1] * br;
        v[2 * j] = m[2][0] * ar - m[2][1] * ai + m[3][0] * br - m[3][1] * bi;
        v[2 * j + 1] = m[2][0] * ai + m[2][1] * ar + m[3][0] * bi + m[3][1] * br;
      }
    } else {
      const [a, b] = g.qubits;
      const ba = 1 << a;
      const bb = 1 << b;
      if (g.name === 'cx') {
        for (let i = 0; i < N; i++) {
          if (i & ba && !(i & bb)) {
            const j = i | bb;
            for (const k of [0, 1]) [v[2 * i + k], v[2 * j + k]] = [v[2 * j + k], v[2 * i + k]];
          }
        }
      } else {
        const t = g.params?.[0] ?? 0;
        for (let i = 0; i < N; i++) {
          const par = (i & ba ? 1 : 0) ^ (i & bb ? 1 : 0);
          let pr: number, pi: number;
          if (g.name === 'cz') [pr, pi] = i & ba && i & bb ? [-1, 0] : [1, 0];
          else [pr, pi] = [Math.cos(t / 2), par ? Math.sin(t / 2) : -Math.sin(t / 2)]; // exp(-i t/2 zz)
          const [re, im] = [v[2 * i], v[2 * i + 1]];
          v[2 * i] = re * pr - im * pi;
          v[2 * i + 1] = re * pi + im * pr;
        }
      }
    }
  }
  return v;
}
function expectation(v: Float64Array, factors: PauliFactor[]): number {
  const N = v.length / 2;
  let sum = 0;
  for (let i = 0; i < N; i++) {
    // (P|v>)_j for j = i with flips: P|i> = phase |i ^ xmask>
    let j = i;
    let pr = 1, pi = 0;
    for (const f of factors) {
      const bit = (i >> f.qubit) & 1;
      if (f.op !== 'Z') j ^= 1 << f.qubit;
      // X|b> = |1-b>; Y|b> = i(-1)^b |1-b>; Z|b> = (-1)^b |b>
      if (f.op === 'Y') [pr, pi] = bit ? [pi, -pr] : [-pi, pr];
      if (f.op === 'Z' && bit) [pr, pi] = [-pr, -pi];
    }
    // <j| conj * phase * v_i
    const [vr, vi] = [v[2 * i], v[2 * i + 1]];
    const [ur, ui] = [v[2 * j], v[2 * j + 1]];
    const qr = pr * vr - pi * vi;
    const qi = pr * vi + pi * vr;
    sum += ur * qr + ui * qi;
  }
  return sum;
}

describe('instances and targets', () => {
  const spec = fixture('chain-small');
  it('enumerate the grid steps x thetaH, steps outer, with stable ids', () => {
    const inst = enumerateInstances(spec);
    expect(inst.length).toBe(3 * 4);
    expect(inst.map((i) => i.id).slice(0, 5)).toEqual(['t1-h0.000000', 't1-h0.392699', 't1-h0.785398', 't1-h1.570796', 't2-h0.000000']);
    expect(inst[6].params).toEqual({ family: 'kicked-ising', steps: 2, thetaH: Math.PI / 4, thetaJ: -Math.PI / 2 });
    expect(instanceId(4, 0.7853981633974483)).toBe('t4-h0.785398');
    expect(instanceId(4, -0.5)).toBe('t4-h-0.500000');
  });
  it('target id is instance id + ":" + observable id', () => {
    const t = enumerateTargets(spec);
    expect(t.length).toBe(12 * 5);
    expect(t[0]).toEqual({ id: 't1-h0.000000:z0', instanceId: 't1-h0.000000', observableId: 'z0' });
    expect(new Set(t.map((x) => x.id)).size).toBe(t.length);
  });
  it('gates family is one instance "base"', () => {
    const s = fixture('gates-small');
    expect(enumerateInstances(s).map((i) => i.id)).toEqual(['base']);
    expect(enumerateTargets(s).map((t) => t.id)).toEqual(['base:z0', 'base:x1z2', 'base:h']);
  });
});

describe('kicked-ising compilation', () => {
  it('per step: one rx layer on every qubit, then one rzz layer per edge colour', () => {
    const g = heavyHex(2, 2);
    const colours = edgeColouring(g.n, g.edges);
    const c = kickedIsing(g.n, colours, { steps: 3, thetaH: 0.3, thetaJ: -Math.PI / 2 });
    expect(c.layers.length).toBe(3 * (1 + colours.length));
    expect(c.layers.map((l) => l.kind).slice(0, 4)).toEqual(['rx', 'rzz', 'rzz', 'rzz']);
    // layers tile the gate list
    let pos = 0;
    for (const l of c.layers) {
      expect(l.start).toBe(pos);
      pos = l.end;
      const qs = c.gates.slice(l.start, l.end).flatMap((x) => [...x.qubits]);
      expect(new Set(qs).size).toBe(qs.length); // disjoint qubits inside a layer
      for (const x of c.gates.slice(l.start, l.end)) expect(x.name).toBe(l.kind);
    }
    expect(pos).toBe(c.gates.length);
    const counts = gateCounts(c);
    expect(counts.byName.rx).toBe(3 * g.n);
    expect(counts.byName.rzz).toBe(3 * g.edges.length);
    expect(kickedIsingGateTotals(g.n, g.edges.length, 3).total).toBe(counts.total);
    expect(c.gates[0].params).toEqual([0.3]);
    expect(c.gates[g.n].params).toEqual([-Math.PI / 2]);
  });

  it('depth of a chain step is 1 (RX) + 2 (two colour layers)', () => {
    const g = chain(10);
    const c = kickedIsing(10, edgeColouring(10, g.edges), { steps: 5, thetaH: 0.1, thetaJ: 0.2 });
    expect(gateCounts(c).depth).toBe(15);
    expect(gateCounts(c).twoQubitDepth).toBe(10);
    // square grid: 4 colour layers, depth 5 per step
    const s = square(4, 4);
    const cs = kickedIsing(16, edgeColouring(16, s.edges), { steps: 2, thetaH: 0.1, thetaJ: 0.2 });
    expect(gateCounts(cs).depth).toBe(10);
  });

  it('compileInstance uses the spec thetaJ default of -pi/2 and the lattice edges', () => {
    const spec = fixture('heavy-hex');
    const lat = compileLattice(spec);
    const inst = enumerateInstances(spec);
    const c = compileInstance(spec, inst[4], lat);
    expect(c.nQubits).toBe(49);
    expect(c.gates.filter((x) => x.name === 'rzz').every((x) => x.params![0] === -Math.PI / 2)).toBe(true);
    expect(c.gates.length).toBe(2 * (49 + 54));
  });

  // PHYSICS.md: thetaH = 0 -> Z strings give 1, anything with X/Y gives 0; thetaH = pi ->
  // <Z_q> = (-1)^t; thetaH = pi/2 -> <Z_q> = 0 for t >= 1;
  // symmetry <P>(-thetaH) = (-1)^{#X+#Y} <P>(thetaH).
  it('statevector checks of the family conventions on a 3 x 3 square grid and a ring', () => {
    const spec: ChallengeSpec = {
      id: 'sq', version: 1, title: 't', description: '',
      lattice: { kind: 'square', rows: 3, cols: 3 },
      circuit: { family: 'kicked-ising', steps: [1, 2, 3], thetaH: [0, Math.PI, Math.PI / 2, 0.4, -0.4] },
      observables: [{ id: 'z4', pauli: 'Z4' }],
    };
    const lat = compileLattice(spec);
    const val = (steps: number, thetaH: number, p: string) =>
      expectation(run(compileInstance(spec, { id: '', index: 0, params: { family: 'kicked-ising', steps, thetaH, thetaJ: -Math.PI / 2 } }, lat)), parsePauli(p, 9));
    for (const t of [1, 2, 3]) {
      expect(val(t, 0, 'Z4')).toBeCloseTo(1, 12);
      expect(val(t, 0, 'Z0 Z4')).toBeCloseTo(1, 12);
      expect(val(t, 0, 'X4')).toBeCloseTo(0, 12);
      expect(val(t, Math.PI, 'Z4')).toBeCloseTo((-1) ** t, 12);
      expect(val(t, Math.PI / 2, 'Z4')).toBeCloseTo(0, 12);
      for (const p of ['X4', 'Y1 Z4', 'X0 X1', 'Z3']) {
        const k = parsePauli(p, 9).filter((f) => f.op !== 'Z').length;
        expect(val(t, -0.4, p)).toBeCloseTo((-1) ** k * val(t, 0.4, p), 12);
      }
    }
    // a non-trivial value really is non-trivial (the checks above could not pass on an identity circuit)
    expect(Math.abs(val(2, 0.4, 'Z4') - 1)).toBeGreaterThan(1e-3);
  });
});

describe('gates family', () => {
  it('compiles the list directly and detects layers', () => {
    const spec = fixture('gates-small');
    const c = compileInstance(spec, enumerateInstances(spec)[0]);
    expect(c.nQubits).toBe(6);
    expect(c.gates.length).toBe(19);
    expect(c.gates[1]).toEqual({ name: 'rx', qubits: [1], params: [0.3] });
    expect(c.gates[0]).toEqual({ name: 'h', qubits: [0] });
    let pos = 0;
    for (const l of c.layers) {
      expect(l.start).toBe(pos);
      pos = l.end;
    }
    expect(pos).toBe(19);
  });

  it('detectLayers: runs of rx -> rx, runs of rzz -> rzz, overlapping qubits split a layer', () => {
    const G = (name: Gate['name'], qubits: number[], params?: number[]): Gate => ({ name, qubits, params });
    const layers = detectLayers([
      G('rx', [0], [1]), G('rx', [1], [1]),
      G('rzz', [0, 1], [1]), G('rzz', [2, 3], [1]), G('rzz', [1, 2], [1]),
      G('h', [0]), G('cx', [1, 2]), G('h', [1]),
    ]);
    expect(layers).toEqual([
      { kind: 'rx', start: 0, end: 2 },
      { kind: 'rzz', start: 2, end: 4 },
      { kind: 'rzz', start: 4, end: 5 },
      { kind: 'generic', start: 5, end: 7 },
      { kind: 'generic', start: 7, end: 8 },
    ]);
  });

  it('the test statevector agrees with hand values (H|0> gives <X> = 1; RY(t) gives <Z> = cos t)', () => {
    const c = (gates: Gate[]): CompiledCircuit => ({ nQubits: 2, gates, layers: detectLayers(gates) });
    expect(expectation(run(c([{ name: 'h', qubits: [0] }])), [{ qubit: 0, op: 'X' }])).toBeCloseTo(1, 14);
    expect(expectation(run(c([{ name: 'ry', qubits: [1], params: [0.7] }])), [{ qubit: 1, op: 'Z' }])).toBeCloseTo(Math.cos(0.7), 14);
    expect(expectation(run(c([{ name: 'ry', qubits: [1], params: [0.7] }])), [{ qubit: 1, op: 'X' }])).toBeCloseTo(Math.sin(0.7), 14);
    expect(expectation(run(c([{ name: 'rx', qubits: [0], params: [0.7] }])), [{ qubit: 0, op: 'Y' }])).toBeCloseTo(-Math.sin(0.7), 14);
    // Bell state: H, CX -> <Z0 Z1> = 1, <X0 X1> = 1, <Y0 Y1> = -1
    const bell = run(c([{ name: 'h', qubits: [0] }, { name: 'cx', qubits: [0, 1] }]));
    expect(expectation(bell, parsePauli('X0 X1', 2))).toBeCloseTo(1, 14);
    expect(expectation(bell, parsePauli('Y0 Y1', 2))).toBeCloseTo(-1, 14);
    expect(expectation(bell, parsePauli('Z0 Z1', 2))).toBeCloseTo(1, 14);
  });
});

describe('fixtures load', () => {
  it('all three fixtures validate', () => {
    for (const f of ['chain-small', 'heavy-hex', 'gates-small']) expect(loadChallenge(fixture(f)).targets.length).toBeGreaterThan(0);
  });
});
