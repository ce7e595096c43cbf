import { describe, expect, it } from 'vitest';
// @ts-expect-error quantum-circuit ships no type declarations (the part used is typed locally below)
import QuantumCircuitUntyped from 'quantum-circuit';
interface QC {
  appendGate(name: string, wires: number | number[], options?: { params: Record<string, number> }): void;
  run(): void;
  stateAsSimpleArray(): { re: number; im: number }[];
}
const QuantumCircuit = QuantumCircuitUntyped as new (n: number) => QC;
import type { CompiledCircuit, Gate, Layer, PauliFactor } from '../../../shared/physics/circuit';
import { chainCone, GateConeCounter, graphBall, KickedIsingCones, lightCone } from '../../../shared/physics/light-cone';
import { compileInstance, compileLattice } from '../../../shared/physics/compile';
import type { ChallengeSpec } from '../../../shared/physics/challenge';
import { propagate } from '../../../shared/physics/pauli-propagation';

type Edge = [number, number];

/** Local kicked-Ising builder (PHYSICS.md): RX(thetaH) on every qubit, then RZZ(thetaJ) on every edge in colour layers. */
function kickedIsing(n: number, edges: Edge[], steps: number, thetaH: number, thetaJ = -Math.PI / 2): CompiledCircuit {
  const colour: number[] = [];
  const used: Set<number>[] = Array.from({ length: n }, () => new Set<number>());
  for (const [a, b] of edges) {
    let c = 0;
    while (used[a].has(c) || used[b].has(c)) c++;
    colour.push(c);
    used[a].add(c);
    used[b].add(c);
  }
  const nc = Math.max(0, ...colour.map((c) => c + 1));
  const gates: Gate[] = [];
  const layers: Layer[] = [];
  for (let s = 0; s < steps; s++) {
    const st = gates.length;
    for (let q = 0; q < n; q++) gates.push({ name: 'rx', qubits: [q], params: [thetaH] });
    layers.push({ kind: 'rx', start: st, end: gates.length });
    for (let c = 0; c < nc; c++) {
      const s0 = gates.length;
      edges.forEach(([a, b], k) => { if (colour[k] === c) gates.push({ name: 'rzz', qubits: [a, b], params: [thetaJ] }); });
      layers.push({ kind: 'rzz', start: s0, end: gates.length });
    }
  }
  return { nQubits: n, gates, layers };
}

const chain = (n: number): Edge[] => Array.from({ length: n - 1 }, (_, i) => [i, i + 1]);
const ring = (n: number): Edge[] => Array.from({ length: n }, (_, i) => [i, (i + 1) % n]);
function square(L: number): Edge[] {
  const e: Edge[] = [];
  for (let r = 0; r < L; r++) for (let c = 0; c < L; c++) {
    if (c + 1 < L) e.push([r * L + c, r * L + c + 1]);
    if (r + 1 < L) e.push([r * L + c, (r + 1) * L + c]);
  }
  return e;
}
function heavyHex(rows: number, len: number): { n: number; edges: Edge[] } {
  const edges: Edge[] = [];
  const id = (r: number, c: number) => r * len + c;
  for (let r = 0; r < rows; r++) for (let c = 0; c + 1 < len; c++) edges.push([id(r, c), id(r, c + 1)]);
  let n = rows * len;
  for (let r = 0; r + 1 < rows; r++) {
    for (let c = r % 2 === 0 ? 0 : 2; c < len; c += 4) {
      const br = n++;
      edges.push([id(r, c), br], [br, id(r + 1, c)]);
    }
  }
  return { n, edges };
}

/** The dumb per-gate rule: walking backwards, any gate touching the set adds all its qubits. */
function dumbCone(c: CompiledCircuit, support: number[]): number[] {
  const s = new Set(support);
  for (let i = c.gates.length - 1; i >= 0; i--) {
    const qs = c.gates[i].qubits;
    if (qs.some((q) => s.has(q))) qs.forEach((q) => s.add(q));
  }
  return [...s].sort((a, b) => a - b);
}

const LATTICES: [string, number, Edge[]][] = [
  ['chain 12', 12, chain(12)],
  ['ring 12', 12, ring(12)],
  ['square 4x4', 16, square(4)],
  ['heavy-hex 3x9', heavyHex(3, 9).n, heavyHex(3, 9).edges],
];

describe('kicked-Ising cones equal graph balls (PHYSICS.md: radius t - 1 for a Z site, t for X or Y)', () => {
  for (const [name, n, edges] of LATTICES) {
    it(name, () => {
      for (const t of [1, 2, 3, 4]) {
        const c = kickedIsing(n, edges, t, 0.3);
        for (const q of [0, Math.floor(n / 2), n - 1]) {
          expect(lightCone(c, [{ qubit: q, op: 'Z' }]).qubits).toEqual(graphBall(n, edges, [q], t - 1)); // PHYSICS.md
          expect(lightCone(c, [{ qubit: q, op: 'X' }]).qubits).toEqual(graphBall(n, edges, [q], t)); // PHYSICS.md
          expect(lightCone(c, [{ qubit: q, op: 'Y' }]).qubits).toEqual(graphBall(n, edges, [q], t)); // PHYSICS.md
        }
        // a ZZ pair: union of the two Z balls
        const [a, b] = edges[0];
        expect(lightCone(c, [{ qubit: a, op: 'Z' }, { qubit: b, op: 'Z' }]).qubits).toEqual(graphBall(n, edges, [a, b], t - 1));
      }
    });
  }

  it('the dumb per-gate rule overestimates (colour layers one after another) and contains the cone', () => {
    const c = kickedIsing(40, chain(40), 3, 0.3);
    const cone = lightCone(c, [{ qubit: 20, op: 'Z' }]).qubits;
    const dumb = dumbCone(c, [20]);
    for (const q of cone) expect(dumb).toContain(q);
    expect(dumb.length).toBeGreaterThan(cone.length); // PHYSICS.md: up to 3 hops per step too many
  });
});

describe('brute force: q is in the cone iff changing the circuit on q can change the value', () => {
  // Perturb only qubit q: an extra RY(0.9) on q at the very start, then the kicked-Ising circuit.
  for (const [name, n, edges] of LATTICES) {
    it(name, () => {
      // At generic thetaJ the support-based cone is tight; at the Clifford thetaJ = -pi/2 it is only
      // an upper bound (PHYSICS.md), e.g. the Y_q branch ends as X_q and gives 0 whatever the neighbours do.
      const cases: [number, number, PauliFactor[]][] = [
        [2, 0.7, [{ qubit: 1, op: 'Z' }]],
        [3, 1.1, [{ qubit: 1, op: 'Z' }]],
        [1, 0.7, [{ qubit: 5, op: 'X' }]],
        [2, 1.1, [{ qubit: 5, op: 'Y' }]],
        [2, -Math.PI / 2, [{ qubit: 1, op: 'Z' }]],
        [3, -Math.PI / 2, [{ qubit: 1, op: 'Z' }]],
        [2, -Math.PI / 2, [{ qubit: 5, op: 'X' }]],
      ];
      for (const [t, thetaJ, f] of cases) {
        if (t === 3 && thetaJ === 1.1 && n > 12) continue; // keep the exact runs small
        if (t === 2 && thetaJ === 1.1 && n > 12) continue;
        const c = kickedIsing(n, edges, t, 0.45, thetaJ);
        {
          const o = { id: 'o', terms: [{ coef: 1, factors: f }] };
          const base = propagate(c, o).value;
          const cone = new Set(lightCone(c, f).qubits);
          const influenced: number[] = [];
          for (let q = 0; q < n; q++) {
            const pert: CompiledCircuit = { nQubits: n, gates: [{ name: 'ry', qubits: [q], params: [0.9] }, ...c.gates], layers: [] };
            const v = propagate(pert, o).value;
            if (Math.abs(v - base) > 1e-9) influenced.push(q);
            else expect(Math.abs(v - base)).toBeLessThan(1e-12); // outside: exactly unchanged
          }
          if (thetaJ === 0.7 || thetaJ === 1.1) expect(influenced).toEqual([...cone].sort((x, y) => x - y));
          else for (const q of influenced) expect(cone.has(q)).toBe(true);
        }
      }
    });
  }

  it('random circuits over the whole gate set: gates on qubits outside the cone never matter', () => {
    let s = 77;
    const r = () => ((s = (Math.imul(s, 1103515245) + 12345) >>> 0) / 4294967296);
    const names = ['x', 'y', 'z', 'h', 's', 'sdg', 'sx', 'rx', 'ry', 'rz', 'rzz', 'cx', 'cz'] as const;
    let outside = 0;
    for (let rep = 0; rep < 30; rep++) {
      const n = 8;
      const gates: Gate[] = [];
      for (let i = 0; i < 14; i++) {
        const name = names[Math.floor(r() * names.length)];
        const a = Math.floor(r() * n);
        const b = (a + 1 + Math.floor(r() * (n - 1))) % n;
        const two = name === 'rzz' || name === 'cx' || name === 'cz';
        const g: Gate = { name, qubits: two ? [a, b] : [a] };
        if (name === 'rx' || name === 'ry' || name === 'rz' || name === 'rzz') g.params = [r() * 6];
        gates.push(g);
      }
      const c: CompiledCircuit = { nQubits: n, gates, layers: [] };
      const f: PauliFactor[] = [{ qubit: Math.floor(r() * n), op: (['X', 'Y', 'Z'] as const)[Math.floor(r() * 3)] }];
      const o = { id: 'o', terms: [{ coef: 1, factors: f }] };
      const cone = lightCone(c, f);
      expect(cone.qubits.every((q) => dumbCone(c, f.map((x) => x.qubit)).includes(q))).toBe(true);
      const base = propagate(c, o).value;
      for (let q = 0; q < n; q++) {
        if (cone.toLocal[q] >= 0) continue;
        outside++;
        // insert random rotations on q at random places
        const g2 = [...gates];
        for (let k = 0; k < 3; k++) g2.splice(Math.floor(r() * (g2.length + 1)), 0, { name: 'ry', qubits: [q], params: [0.3 + r()] });
        expect(Math.abs(propagate({ nQubits: n, gates: g2, layers: [] }, o).value - base)).toBeLessThan(1e-12);
      }
      // the sub-circuit gives the same value
      const sub = propagate(cone.circuit, { id: 'o', terms: [{ coef: 1, factors: f.map((x) => ({ qubit: cone.toLocal[x.qubit], op: x.op })) }] });
      expect(Math.abs(sub.value - base)).toBeLessThan(1e-12);
    }
    expect(outside).toBeGreaterThan(20);
  });
});

describe('restricted sub-circuit', () => {
  it('heavy-hex patch: the cone sub-circuit on <= 10 qubits, run by quantum-circuit, equals the full-circuit value', () => {
    const hh = heavyHex(3, 9);
    const c = kickedIsing(hh.n, hh.edges, 3, 0.37);
    const obs = { id: 'z', terms: [{ coef: 1, factors: [{ qubit: 4, op: 'Z' as const }] }] };
    const cone = lightCone(c, obs);
    expect(cone.qubits).toEqual(graphBall(hh.n, hh.edges, [4], 2)); // PHYSICS.md: radius t - 1
    expect(cone.circuit.nQubits).toBe(cone.qubits.length);
    expect(cone.circuit.nQubits).toBeLessThanOrEqual(10);
    for (const g of cone.circuit.gates) for (const q of g.qubits) expect(q).toBeLessThan(cone.circuit.nQubits);
    // non-Clifford count: RX gates kept = |ball 0| + |ball 1| + |ball 2| (PHYSICS.md cone rule per step)
    const balls = [0, 1, 2].map((r) => graphBall(hh.n, hh.edges, [4], r).length);
    expect(cone.nonCliffordRotations).toBe(balls[0] + balls[1] + balls[2]);
    // reference: quantum-circuit on the sub-circuit (Z on the local index of qubit 4)
    const qc = new QuantumCircuit(cone.circuit.nQubits);
    for (const g of cone.circuit.gates) {
      if (g.name === 'rx') qc.appendGate('rx', g.qubits[0], { params: { theta: g.params![0] } });
      else qc.appendGate('zz', [g.qubits[0], g.qubits[1]], { params: { theta: g.params![0] } });
    }
    for (let q = 0; q < cone.circuit.nQubits; q++) qc.appendGate('id', q);
    qc.run();
    const amps = qc.stateAsSimpleArray() as { re: number; im: number }[];
    const bit = 1 << cone.toLocal[4];
    let ref = 0;
    amps.forEach((a, i) => { ref += (i & bit ? -1 : 1) * (a.re * a.re + a.im * a.im); });
    const full = propagate(c, obs).value;
    expect(Math.abs(full - ref)).toBeLessThan(1e-10);
    expect(Math.abs(propagate(cone.circuit, cone.observable!).value - full)).toBeLessThan(1e-12);
    // layers of the sub-circuit are well formed and cover its gates in order
    let cur = 0;
    for (const L of cone.circuit.layers) {
      expect(L.start).toBe(cur);
      expect(L.end).toBeGreaterThan(L.start);
      cur = L.end;
    }
    expect(cur).toBe(cone.circuit.gates.length);
    expect(cone.circuit.layers.some((L) => L.kind === 'rzz')).toBe(true);
  });

  it('a Clifford-angle circuit has no non-Clifford rotations in the cone', () => {
    const c = kickedIsing(12, ring(12), 3, Math.PI / 2);
    expect(lightCone(c, [{ qubit: 3, op: 'Z' }]).nonCliffordRotations).toBe(0);
  });
});

describe('counting variants (the planner counts cones without building them; light-cone.ts owns both)', () => {
  it('GateConeCounter counts the qubits, kept gates and non-Clifford rotations lightCone keeps, on random circuits of the whole gate set', () => {
    let s = 4242;
    const r = () => ((s = (Math.imul(s, 1103515245) + 12345) >>> 0) / 4294967296);
    const names = ['x', 'y', 'z', 'h', 's', 'sdg', 'sx', 'rx', 'ry', 'rz', 'rzz', 'cx', 'cz'] as const;
    let saturated = 0;
    for (let rep = 0; rep < 200; rep++) {
      const n = 3 + Math.floor(r() * 8);
      const gates: Gate[] = [];
      for (let i = 0; i < 4 + Math.floor(r() * 40); i++) {
        const name = names[Math.floor(r() * names.length)];
        const a = Math.floor(r() * n);
        const b = (a + 1 + Math.floor(r() * (n - 1))) % n;
        const two = name === 'rzz' || name === 'cx' || name === 'cz';
        const g: Gate = { name, qubits: two ? [a, b] : [a] };
        // a quarter of the angles are Clifford (multiples of pi/2)
        if (name === 'rx' || name === 'ry' || name === 'rz' || name === 'rzz') g.params = [r() < 0.25 ? (Math.PI / 2) * Math.floor(r() * 5) : r() * 6];
        gates.push(g);
      }
      const c: CompiledCircuit = { nQubits: n, gates, layers: [] };
      const counter = new GateConeCounter(c);
      for (let k = 0; k < 3; k++) {
        const f: PauliFactor[] = [{ qubit: Math.floor(r() * n), op: (['X', 'Y', 'Z'] as const)[Math.floor(r() * 3)] }];
        if (r() < 0.5) f.push({ qubit: (f[0].qubit + 1) % n, op: 'Z' });
        const want = lightCone(c, f);
        let kept = 0, non = 0, rest = 0;
        const got = counter.count([{ coef: 1, factors: f }], {
          kept: (nc) => { kept++; if (nc) non++; },
          rest: (g, nc) => { rest += g; non += nc; saturated++; },
        });
        expect(got).toEqual({ qubits: want.qubits.length, gates: want.keptGates.length, nonClifford: want.nonCliffordRotations });
        expect(kept + rest).toBe(want.keptGates.length);
        expect(non).toBe(want.nonCliffordRotations);
      }
    }
    expect(saturated).toBeGreaterThan(10); // the closed form for a saturated cone was exercised
  });

  it('KickedIsingCones: the block walk and the restricted sub-circuit equal lightCone on the compiled circuit, every lattice kind', () => {
    const lattices: ChallengeSpec['lattice'][] = [
      { kind: 'chain', n: 15 }, { kind: 'ring', n: 11 }, { kind: 'square', rows: 4, cols: 5 }, { kind: 'heavy-hex', rows: 2, cols: 2 },
      { kind: 'edges', n: 8, edges: [[0, 1], [1, 2], [2, 3], [3, 0], [4, 5], [5, 6], [6, 7], [1, 5]] },
    ];
    for (const lattice of lattices) {
      const spec = { lattice, circuit: { family: 'kicked-ising', steps: [4], thetaH: [0.3] } } as unknown as ChallengeSpec;
      const lat = compileLattice(spec);
      const cones = new KickedIsingCones(lat);
      const n = lat.graph.n;
      for (const steps of [0, 1, 2, 4]) {
        const inst = { id: 'i', params: { family: 'kicked-ising' as const, steps, thetaH: 0.3, thetaJ: 0.6 } };
        const circ = compileInstance(spec, inst as never, lat);
        for (const f of [[{ qubit: 0, op: 'Z' }], [{ qubit: n - 1, op: 'X' }], [{ qubit: 2, op: 'Y' }, { qubit: 3, op: 'Z' }]] as PauliFactor[][]) {
          const obs = { id: 'o', terms: [{ coef: 1, factors: f }] };
          const want = lightCone(circ, obs);
          const walk = cones.walk(steps, obs.terms);
          expect(walk.qubits, `${lattice.kind} t=${steps}`).toBe(want.qubits.length);
          expect(walk.rx + walk.rzz, `${lattice.kind} t=${steps}`).toBe(want.keptGates.length);
          const sub = cones.restrict(inst.params, obs);
          expect(sub.qubits).toEqual(want.qubits);
          expect(sub.circuit.gates).toEqual(want.circuit.gates); // the same gates in the compiled order
          expect(sub.observable).toEqual(want.observable);
        }
      }
    }
  });

  it('chainCone is the kicked-Ising cone on an open chain: radius t - 1 around a Z-only support, t around an X-only one', () => {
    const n = 30;
    for (const t of [1, 2, 5]) {
      const c = kickedIsing(n, chain(n), t, 0.4, 0.7);
      for (const [lo, hi, xy] of [[0, 0, false], [10, 11, false], [29, 29, true], [14, 15, true]] as [number, number, boolean][]) {
        const f: PauliFactor[] = [lo, ...(hi > lo ? [hi] : [])].map((qubit) => ({ qubit, op: xy ? 'X' : 'Z' }));
        const cone = lightCone(c, f).qubits;
        expect(chainCone(n, t, lo, hi, xy)).toEqual([cone[0], cone[cone.length - 1]]);
        expect(cone.length).toBe(cone[cone.length - 1] - cone[0] + 1);
      }
    }
  });
});
