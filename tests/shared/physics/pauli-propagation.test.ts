import { describe, expect, it } from 'vitest';
// @ts-expect-error quantum-circuit ships no type declarations (the part used is typed locally below)
import QuantumCircuitUntyped from 'quantum-circuit';
interface QC {
  appendGate(name: string, wires: number | number[], options?: { params: Record<string, number> }): void;
  run(): void;
  stateAsSimpleArray(): { re: number; im: number }[];
}
const QuantumCircuit = QuantumCircuitUntyped as new (n: number) => QC;
import type { CompiledCircuit, Gate, GateName, Layer, ObservableSpec, PauliFactor } from '../../../shared/physics/circuit';
import { propagate, cliffordQuarterTurns } from '../../../shared/physics/pauli-propagation';

// ---------------------------------------------------------------------------------------------
// Reference: the npm package quantum-circuit (statevector). Qubit q is bit q of the basis index
// (checked below). X and Y factors are measured by basis changes: H for X, Sdg then H for Y.

type Amp = { re: number; im: number };

function qcGate(c: QC, g: Gate): void {
  const t = g.params?.[0] ?? 0;
  switch (g.name) {
    case 'rx': case 'ry': c.appendGate(g.name, g.qubits[0], { params: { theta: t } }); break;
    case 'rz': c.appendGate('rz', g.qubits[0], { params: { phi: t } }); break;
    case 'rzz': c.appendGate('zz', [g.qubits[0], g.qubits[1]], { params: { theta: t } }); break;
    case 'sx': c.appendGate('srn', g.qubits[0]); break;
    case 'cx': case 'cz': c.appendGate(g.name, [g.qubits[0], g.qubits[1]]); break;
    default: c.appendGate(g.name, g.qubits[0]);
  }
}

/** <0|U^dag P U|0> by quantum-circuit (amplitudes rounded to 14 decimals by the package). */
function qcExpectation(n: number, gates: readonly Gate[], factors: readonly PauliFactor[]): number {
  const c = new QuantumCircuit(n);
  for (const g of gates) qcGate(c, g);
  let mask = 0;
  for (const f of factors) {
    if (f.op === 'X') c.appendGate('h', f.qubit);
    if (f.op === 'Y') { c.appendGate('sdg', f.qubit); c.appendGate('h', f.qubit); }
    mask |= 1 << f.qubit;
  }
  // make sure every wire exists even when untouched
  for (let q = 0; q < n; q++) c.appendGate('id', q);
  c.run();
  const amps = c.stateAsSimpleArray() as Amp[];
  expect(amps.length).toBe(1 << n);
  let v = 0;
  for (let i = 0; i < amps.length; i++) {
    const p = amps[i].re * amps[i].re + amps[i].im * amps[i].im;
    let par = 0;
    for (let m = i & mask; m; m &= m - 1) par ^= 1;
    v += par ? -p : p;
  }
  return v;
}

function circ(n: number, gates: Gate[], layers: Layer[] = []): CompiledCircuit {
  return { nQubits: n, gates, layers };
}
const obs = (factors: PauliFactor[], coef = 1): ObservableSpec => ({ id: 'o', terms: [{ coef, factors }] });
const g1 = (name: GateName, q: number, t?: number): Gate => (t === undefined ? { name, qubits: [q] } : { name, qubits: [q], params: [t] });
const g2 = (name: GateName, a: number, b: number, t?: number): Gate =>
  t === undefined ? { name, qubits: [a, b] } : { name, qubits: [a, b], params: [t] };

function rng(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const OPS = ['X', 'Y', 'Z'] as const;
function allPaulis2(): PauliFactor[][] {
  const out: PauliFactor[][] = [];
  for (let a = 0; a < 4; a++) for (let b = 0; b < 4; b++) {
    if (a === 0 && b === 0) continue;
    const f: PauliFactor[] = [];
    if (a) f.push({ qubit: 0, op: OPS[a - 1] });
    if (b) f.push({ qubit: 1, op: OPS[b - 1] });
    out.push(f);
  }
  return out;
}

/** A generic 2-qubit state preparation (random rotations and an entangler). */
function randomPrep(r: () => number, n: number): Gate[] {
  const gs: Gate[] = [];
  for (let layer = 0; layer < 2; layer++) {
    for (let q = 0; q < n; q++) {
      gs.push(g1('ry', q, 0.3 + 2.5 * r()));
      gs.push(g1('rz', q, 0.3 + 2.5 * r()));
    }
    for (let q = 0; q + 1 < n; q++) gs.push(g2('cx', q, q + 1));
  }
  return gs;
}

/** Local kicked-Ising builder (PHYSICS.md): RX(thetaH) on every qubit, then RZZ(thetaJ) on every edge in colour layers. */
function kickedIsing(n: number, edges: [number, number][], steps: number, thetaH: number, thetaJ = -Math.PI / 2): CompiledCircuit {
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
    for (let q = 0; q < n; q++) gates.push(g1('rx', q, thetaH));
    layers.push({ kind: 'rx', start: st, end: gates.length });
    for (let c = 0; c < nc; c++) {
      const s0 = gates.length;
      edges.forEach(([a, b], k) => { if (colour[k] === c) gates.push(g2('rzz', a, b, thetaJ)); });
      layers.push({ kind: 'rzz', start: s0, end: gates.length });
    }
  }
  return { nQubits: n, gates, layers };
}

const ring = (n: number): [number, number][] => Array.from({ length: n }, (_, i) => [i, (i + 1) % n] as [number, number]);
const chain = (n: number): [number, number][] => Array.from({ length: n - 1 }, (_, i) => [i, i + 1] as [number, number]);

/** Heavy-hex-like patch: `rows` rows of `len` qubits, joined by bridge qubits every 4 columns (offset 0 / 2 alternating). */
function heavyHex(rows: number, len: number): { n: number; edges: [number, number][] } {
  const edges: [number, number][] = [];
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

// ---------------------------------------------------------------------------------------------

describe('reference conventions (quantum-circuit)', () => {
  it('qubit q is bit q of the index and <Z> after RX(t) is cos t', () => {
    // analytic: RX(t)|0> = cos(t/2)|0> - i sin(t/2)|1>, so <Z> = cos t (from memory / textbook)
    expect(qcExpectation(2, [g1('rx', 1, 0.7)], [{ qubit: 1, op: 'Z' }])).toBeCloseTo(Math.cos(0.7), 12);
    expect(qcExpectation(2, [g1('rx', 1, 0.7)], [{ qubit: 0, op: 'Z' }])).toBeCloseTo(1, 12);
    // <Y> after RX(t) is -sin t (analytic, from memory)
    expect(qcExpectation(1, [g1('rx', 0, 0.7)], [{ qubit: 0, op: 'Y' }])).toBeCloseTo(-Math.sin(0.7), 12);
  });
});

describe('one qubit, analytic', () => {
  it('<Z> after RX(t) = cos t; <Z> after RY(t) = cos t; <X> after RY(t) = sin t', () => {
    for (const t of [0.1, 0.7, 1.3, 2.9, -0.4]) {
      // analytic (textbook Bloch rotation)
      expect(propagate(circ(1, [g1('rx', 0, t)]), obs([{ qubit: 0, op: 'Z' }])).value).toBeCloseTo(Math.cos(t), 14);
      expect(propagate(circ(1, [g1('ry', 0, t)]), obs([{ qubit: 0, op: 'Z' }])).value).toBeCloseTo(Math.cos(t), 14);
      expect(propagate(circ(1, [g1('ry', 0, t)]), obs([{ qubit: 0, op: 'X' }])).value).toBeCloseTo(Math.sin(t), 14);
    }
  });
  it('PHYSICS.md: RX: Z -> cos t Z + sin t Y, Y -> cos t Y - sin t Z', () => {
    const t = 0.37;
    const r = propagate(circ(1, [g1('rx', 0, t)]), obs([{ qubit: 0, op: 'Z' }]), { returnTerms: true });
    const m = new Map(r.finalTerms!.map((x) => [x.factors.map((f) => f.op + f.qubit).join(' '), x.coef]));
    expect(m.get('Z0')).toBeCloseTo(Math.cos(t), 15);
    expect(m.get('Y0')).toBeCloseTo(Math.sin(t), 15);
    const r2 = propagate(circ(1, [g1('rx', 0, t)]), obs([{ qubit: 0, op: 'Y' }]), { returnTerms: true });
    const m2 = new Map(r2.finalTerms!.map((x) => [x.factors.map((f) => f.op + f.qubit).join(' '), x.coef]));
    expect(m2.get('Y0')).toBeCloseTo(Math.cos(t), 15);
    expect(m2.get('Z0')).toBeCloseTo(-Math.sin(t), 15);
  });
  it('Clifford angles are recognised within 1e-12 only', () => {
    expect(cliffordQuarterTurns(Math.PI / 2 + 5e-13)).toBe(1);
    expect(cliffordQuarterTurns(-Math.PI / 2)).toBe(3);
    expect(cliffordQuarterTurns(4 * Math.PI)).toBe(0);
    expect(cliffordQuarterTurns(Math.PI / 2 + 1e-9)).toBe(-1);
  });
});

function termMap(r: ReturnType<typeof propagate>): Map<string, number> {
  return new Map(r.finalTerms!.map((x) => [x.factors.map((f) => f.op + f.qubit).join(' '), x.coef]));
}

describe('Clifford conjugation rules, Heisenberg direction', () => {
  it('PHYSICS.md rules, stated explicitly', () => {
    const one = (g: Gate, f: PauliFactor[], n = 2) => termMap(propagate(circ(n, [g]), obs(f), { returnTerms: true }));
    // PHYSICS.md: S maps X -> -Y, Y -> X
    expect(one(g1('s', 0), [{ qubit: 0, op: 'X' }])).toEqual(new Map([['Y0', -1]]));
    expect(one(g1('s', 0), [{ qubit: 0, op: 'Y' }])).toEqual(new Map([['X0', 1]]));
    // PHYSICS.md: H swaps x and z, Y gains a minus sign
    expect(one(g1('h', 0), [{ qubit: 0, op: 'Y' }])).toEqual(new Map([['Y0', -1]]));
    expect(one(g1('h', 0), [{ qubit: 0, op: 'X' }])).toEqual(new Map([['Z0', 1]]));
    // PHYSICS.md: RZZ(-pi/2): X_a -> Y_a Z_b, Y_a -> -X_a Z_b
    expect(one(g2('rzz', 0, 1, -Math.PI / 2), [{ qubit: 0, op: 'X' }])).toEqual(new Map([['Y0 Z1', 1]]));
    expect(one(g2('rzz', 0, 1, -Math.PI / 2), [{ qubit: 0, op: 'Y' }])).toEqual(new Map([['X0 Z1', -1]]));
    // common practice (stabilizer tableaux): CNOT X_c -> X_c X_t, Z_t -> Z_c Z_t
    expect(one(g2('cx', 0, 1), [{ qubit: 0, op: 'X' }])).toEqual(new Map([['X0 X1', 1]]));
    expect(one(g2('cx', 0, 1), [{ qubit: 1, op: 'Z' }])).toEqual(new Map([['Z0 Z1', 1]]));
  });

  it('PHYSICS.md CNOT and CZ bit rules (sign formulas) hold for all 16 local strings', () => {
    const opOf = (x: number, z: number) => (x ? (z ? 'Y' : 'X') : z ? 'Z' : '');
    for (let code = 1; code < 16; code++) {
      const xa = code & 1, za = (code >> 1) & 1, xb = (code >> 2) & 1, zb = (code >> 3) & 1;
      const f: PauliFactor[] = [];
      if (opOf(xa, za)) f.push({ qubit: 0, op: opOf(xa, za) as 'X' });
      if (opOf(xb, zb)) f.push({ qubit: 1, op: opOf(xb, zb) as 'X' });
      // CNOT(c=0, t=1): x_t ^= x_c, z_c ^= z_t, sign flips when x_c z_t (x_t xor z_c xor 1) = 1
      {
        const nxb = xb ^ xa, nza = za ^ zb;
        const sign = xa & zb & (xb ^ za ^ 1) ? -1 : 1;
        const key = [opOf(xa, nza) && `${opOf(xa, nza)}0`, opOf(nxb, zb) && `${opOf(nxb, zb)}1`].filter(Boolean).join(' ');
        expect(termMap(propagate(circ(2, [g2('cx', 0, 1)]), obs(f), { returnTerms: true }))).toEqual(new Map([[key, sign]]));
      }
      // CZ: z_a ^= x_b, z_b ^= x_a, sign flips when x_a x_b (z_a xor z_b) = 1
      {
        const nza = za ^ xb, nzb = zb ^ xa;
        const sign = xa & xb & (za ^ zb) ? -1 : 1;
        const key = [opOf(xa, nza) && `${opOf(xa, nza)}0`, opOf(xb, nzb) && `${opOf(xb, nzb)}1`].filter(Boolean).join(' ');
        expect(termMap(propagate(circ(2, [g2('cz', 0, 1)]), obs(f), { returnTerms: true }))).toEqual(new Map([[key, sign]]));
      }
    }
  });

  it('every Clifford gate and Clifford-angle rotation, every 2-qubit Pauli, against quantum-circuit', () => {
    const r = rng(7);
    const gates: Gate[] = [];
    for (const name of ['x', 'y', 'z', 'h', 's', 'sdg', 'sx'] as const) gates.push(g1(name, 0), g1(name, 1));
    gates.push(g2('cx', 0, 1), g2('cx', 1, 0), g2('cz', 0, 1), g2('cz', 1, 0));
    for (let k = -4; k <= 4; k++) {
      const t = (k * Math.PI) / 2;
      gates.push(g1('rx', 0, t), g1('ry', 1, t), g1('rz', 0, t), g2('rzz', 0, 1, t));
    }
    const preps = [randomPrep(r, 2), randomPrep(r, 2), randomPrep(r, 2)];
    let checked = 0;
    for (const g of gates) {
      for (const P of allPaulis2()) {
        const res = propagate(circ(2, [g]), obs(P), { returnTerms: true });
        expect(res.finalTerms!.length).toBe(1); // Clifford: one string, no branching
        expect(res.peakTerms).toBe(1);
        const [{ coef, factors }] = res.finalTerms!;
        expect(Math.abs(coef)).toBe(1);
        for (const prep of preps) {
          const lhs = qcExpectation(2, [...prep, g], P); // <psi| g^dag P g |psi>
          const rhs = coef * qcExpectation(2, prep, factors);
          expect(Math.abs(lhs - rhs)).toBeLessThan(1e-10);
        }
        checked++;
      }
    }
    expect(checked).toBe(gates.length * 15);
  });
});

const ALL: GateName[] = ['x', 'y', 'z', 'h', 's', 'sdg', 'sx', 'rx', 'ry', 'rz', 'rzz', 'cx', 'cz'];

function randomCircuit(r: () => number, n: number, m: number): Gate[] {
  const gs: Gate[] = [];
  for (let i = 0; i < m; i++) {
    const name = ALL[Math.floor(r() * ALL.length)];
    const a = Math.floor(r() * n);
    let b = Math.floor(r() * (n - 1));
    if (b >= a) b++;
    const t = r() < 0.2 ? (Math.floor(r() * 8) - 4) * (Math.PI / 2) : (r() - 0.5) * 7;
    if (name === 'rzz' || name === 'cx' || name === 'cz') gs.push(name === 'rzz' ? g2(name, a, b, t) : g2(name, a, b));
    else if (name === 'rx' || name === 'ry' || name === 'rz') gs.push(g1(name, a, t));
    else gs.push(g1(name, a));
  }
  return gs;
}

function randomFactors(r: () => number, n: number): PauliFactor[] {
  const f: PauliFactor[] = [];
  for (let q = 0; q < n; q++) {
    const k = Math.floor(r() * 4);
    if (k) f.push({ qubit: q, op: OPS[k - 1] });
  }
  if (f.length === 0) f.push({ qubit: Math.floor(r() * n), op: OPS[Math.floor(r() * 3)] });
  return f;
}

describe('random circuits against quantum-circuit', () => {
  it('2 to 8 qubits, whole gate set, random Pauli observables: value to 1e-10', () => {
    const r = rng(12345);
    let cases = 0;
    for (let n = 2; n <= 8; n++) {
      for (let rep = 0; rep < 6; rep++) {
        const gates = randomCircuit(r, n, 10 + 5 * n);
        const terms = Array.from({ length: 1 + Math.floor(r() * 3) }, () => ({ coef: r() * 2 - 1, factors: randomFactors(r, n) }));
        const res = propagate(circ(n, gates), { id: 'r', terms });
        const ref = terms.reduce((acc, t) => acc + t.coef * qcExpectation(n, gates, t.factors), 0);
        expect(Math.abs(res.value - ref)).toBeLessThan(1e-10);
        expect(res.exact).toBe(true);
        cases++;
      }
    }
    expect(cases).toBe(42);
  });

  it('multi-word strings: 6 active qubits spread over a 130-qubit register (word boundaries) match quantum-circuit on 6', () => {
    const r = rng(4242);
    const place = [0, 31, 32, 63, 64, 129]; // 5 words of 32 bits
    for (let rep = 0; rep < 12; rep++) {
      const small = randomCircuit(r, 6, 40);
      // add runs of diagonal Cliffords so fused blocks cross words too
      for (let k = 0; k < 6; k++) small.splice(Math.floor(r() * small.length), 0, g2('rzz', k % 6, (k + 1 + rep) % 6 === k % 6 ? (k + 2) % 6 : (k + 1 + rep) % 6, -Math.PI / 2), g2('cz', (k + 3) % 6, (k + 4) % 6));
      const big = small.map((g) => ({ ...g, qubits: g.qubits.map((q) => place[q]) }));
      const f = randomFactors(r, 6);
      const res = propagate(circ(130, big), obs(f.map((x) => ({ qubit: place[x.qubit], op: x.op }))));
      expect(Math.abs(res.value - qcExpectation(6, small, f))).toBeLessThan(1e-10); // quantum-circuit
    }
  });

  it('102-qubit heavy-hex kicked Ising near a word boundary: equals quantum-circuit on the light-cone qubits', () => {
    const hh = heavyHex(6, 14);
    const values: number[] = [];
    for (const [t, f] of [[3, [{ qubit: 31, op: 'Z' }]], [2, [{ qubit: 32, op: 'Y' }]], [2, [{ qubit: 32, op: 'X' }]], [2, [{ qubit: 63, op: 'Y' }, { qubit: 64, op: 'Z' }]]] as [number, PauliFactor[]][]) {
      const c = kickedIsing(hh.n, hh.edges, t, Math.PI / 16);
      const full = propagate(c, obs(f));
      expect(full.exact).toBe(true);
      // the cone by PHYSICS.md (ball of radius t - 1 around Z sites, t around X/Y sites), by BFS here
      const radius = (op: string) => (op === 'Z' ? t - 1 : t);
      const inCone = new Set<number>();
      for (const x of f) {
        let frontier = [x.qubit];
        inCone.add(x.qubit);
        for (let k = 0; k < radius(x.op); k++) {
          const next: number[] = [];
          for (const u of frontier) for (const [a, b] of hh.edges) {
            const v = a === u ? b : b === u ? a : -1;
            if (v >= 0 && !inCone.has(v)) { inCone.add(v); next.push(v); }
          }
          frontier = next;
        }
      }
      const qs = [...inCone].sort((a, b) => a - b);
      expect(qs.length).toBeLessThanOrEqual(11);
      const loc = new Map(qs.map((q, i) => [q, i]));
      // every gate whose qubits all lie in the ball, re-indexed (gates leaving the ball cannot matter)
      const sub = c.gates.filter((g) => g.qubits.every((q) => loc.has(q))).map((g) => ({ ...g, qubits: g.qubits.map((q) => loc.get(q)!) }));
      const ref = qcExpectation(qs.length, sub, f.map((x) => ({ qubit: loc.get(x.qubit)!, op: x.op })));
      expect(Math.abs(full.value - ref)).toBeLessThan(1e-10); // quantum-circuit
      values.push(full.value);
    }
    expect(values.filter((v) => Math.abs(v) > 1e-3).length).toBeGreaterThanOrEqual(2); // not all trivial zeros
  });

  it('kicked Ising on an 8-ring and a 7-chain at generic angles matches quantum-circuit', () => {
    for (const [n, edges] of [[8, ring(8)], [7, chain(7)]] as const) {
      const c = kickedIsing(n, edges as [number, number][], 3, 0.41, 0.83);
      for (const f of [[{ qubit: 3, op: 'Z' }], [{ qubit: 2, op: 'X' }], [{ qubit: 1, op: 'Y' }, { qubit: 2, op: 'Z' }]] as PauliFactor[][]) {
        const res = propagate(c, obs(f));
        expect(Math.abs(res.value - qcExpectation(n, c.gates, f))).toBeLessThan(1e-10);
      }
    }
  });
});

describe('Clifford points of the kicked-Ising family at 200 qubits (PHYSICS.md / common practice: Clifford circuits are efficiently simulable)', () => {
  const n = 200;
  const E = ring(n);
  it('thetaH = 0: Z strings give 1, strings with X or Y give 0 (PHYSICS.md)', () => {
    const c = kickedIsing(n, E, 6, 0);
    for (const f of [[{ qubit: 17, op: 'Z' }], [{ qubit: 3, op: 'Z' }, { qubit: 150, op: 'Z' }]] as PauliFactor[][]) {
      const r = propagate(c, obs(f));
      expect(r.value).toBe(1); // PHYSICS.md
      expect(r.peakTerms).toBe(1);
    }
    const rx = propagate(c, obs([{ qubit: 40, op: 'X' }, { qubit: 41, op: 'Z' }]));
    expect(rx.value).toBe(0); // PHYSICS.md
    expect(rx.peakTerms).toBe(1);
  });
  it('thetaH = pi/2: <Z_q> = 0 for t >= 1, every Pauli value in {-1, 0, 1} (PHYSICS.md)', () => {
    for (const t of [1, 2, 5, 9]) {
      const c = kickedIsing(n, E, t, Math.PI / 2);
      const r = propagate(c, obs([{ qubit: 99, op: 'Z' }]));
      expect(r.value).toBe(0); // PHYSICS.md
      expect(r.peakTerms).toBe(1);
      const r2 = propagate(c, obs([{ qubit: 10, op: 'X' }, { qubit: 11, op: 'Y' }, { qubit: 12, op: 'Z' }]));
      expect([-1, 0, 1]).toContain(r2.value); // PHYSICS.md
      expect(r2.peakTerms).toBe(1);
    }
  });
  it('thetaH = pi: <Z_q> = (-1)^t (PHYSICS.md)', () => {
    for (const t of [1, 2, 3, 8]) {
      const r = propagate(kickedIsing(n, E, t, Math.PI), obs([{ qubit: 123, op: 'Z' }]));
      expect(r.value).toBe((-1) ** t); // PHYSICS.md
      expect(r.peakTerms).toBe(1);
    }
  });
  it('random Clifford circuits on 200 qubits (h, s, sdg, sx, x, y, z, cx, cz, Clifford-angle rotations) stay at one string per term', () => {
    const r = rng(8);
    const cl = ['x', 'y', 'z', 'h', 's', 'sdg', 'sx', 'cx', 'cz', 'rx', 'ry', 'rz', 'rzz'] as const;
    for (let rep = 0; rep < 5; rep++) {
      const gates: Gate[] = [];
      for (let k = 0; k < 3000; k++) {
        const name = cl[Math.floor(r() * cl.length)];
        const a = Math.floor(r() * n);
        const b = (a + 1 + Math.floor(r() * 3)) % n;
        const t = (Math.floor(r() * 8) - 4) * (Math.PI / 2);
        gates.push(name === 'cx' || name === 'cz' ? g2(name, a, b) : name === 'rzz' ? g2(name, a, b, t)
          : name === 'rx' || name === 'ry' || name === 'rz' ? g1(name, a, t) : g1(name, a));
      }
      const res = propagate(circ(n, gates), { id: 'two', terms: [
        { coef: 0.5, factors: [{ qubit: 100, op: 'Z' }] },
        { coef: 0.25, factors: [{ qubit: 7, op: 'X' }, { qubit: 8, op: 'Y' }] },
      ] });
      expect(res.peakTerms).toBe(2); // common practice: Clifford circuits are efficiently simulable
      expect(res.updates).toBe(0);
      // each Pauli value is -1, 0 or 1 (stabilizer states; PHYSICS.md Clifford points)
      const allowed = [0, 0.5, -0.5, 0.25, -0.25, 0.75, -0.75];
      expect(allowed.some((v) => Math.abs(res.value - v) < 1e-15)).toBe(true);
    }
  });

  it('heavy-hex-like patch of ~200 qubits at thetaH = pi/2, 10 steps stays at one string', () => {
    const hh = heavyHex(8, 22);
    expect(hh.n).toBeGreaterThan(190);
    const r = propagate(kickedIsing(hh.n, hh.edges, 10, Math.PI / 2), obs([{ qubit: 70, op: 'Z' }]));
    expect(r.value).toBe(0); // PHYSICS.md
    expect(r.peakTerms).toBe(1);
    expect(r.updates).toBe(0);
  });
});

describe('symmetries (PHYSICS.md)', () => {
  const hh = heavyHex(2, 5); // 10 + 2 bridges = 12 qubits
  it('<P>(-thetaH) = (-1)^{#X+#Y} <P>(thetaH) and <P>(thetaH + pi) = (-1)^{t(#Y+#Z)} <P>(thetaH)', () => {
    const r = rng(99);
    for (let rep = 0; rep < 6; rep++) {
      const th = 0.2 + r();
      const t = 3;
      const f = randomFactors(r, hh.n).slice(0, 4);
      const nxy = f.filter((x) => x.op !== 'Z').length;
      const nyz = f.filter((x) => x.op !== 'X').length;
      const v = propagate(kickedIsing(hh.n, hh.edges, t, th), obs(f)).value;
      const vm = propagate(kickedIsing(hh.n, hh.edges, t, -th), obs(f)).value;
      const vp = propagate(kickedIsing(hh.n, hh.edges, t, th + Math.PI), obs(f)).value;
      expect(Math.abs(vm - (-1) ** nxy * v)).toBeLessThan(1e-12); // PHYSICS.md
      expect(Math.abs(vp - (-1) ** (t * nyz) * v)).toBeLessThan(1e-12); // PHYSICS.md
    }
    // not vacuous: a Z value at generic angle after 3 steps is far from 0 and from +-1
    const v0 = propagate(kickedIsing(hh.n, hh.edges, 3, 0.5), obs([{ qubit: 2, op: 'Z' }])).value;
    expect(Math.abs(v0)).toBeGreaterThan(1e-3);
    expect(Math.abs(v0)).toBeLessThan(0.999);
  });
});

describe('truncation', () => {
  const c = kickedIsing(16, ring(16), 6, 0.6);
  const o = obs([{ qubit: 5, op: 'Z' }]);
  const exact = propagate(c, o);
  it('the exact run drops nothing', () => {
    expect(exact.exact).toBe(true);
    expect(exact.droppedWeight).toBe(0);
    expect(exact.updates).toBeGreaterThan(0);
  });
  it.each([
    ['delta 1e-2', { delta: 1e-2 }],
    ['delta 1e-3', { delta: 1e-3 }],
    ['maxWeight 4', { maxWeight: 4 }],
    ['maxXY 2', { maxXY: 2 }],
    ['maxTerms 40', { maxTerms: 40 }],
    ['combined', { delta: 1e-3, maxWeight: 6, maxTerms: 200 }],
  ])('%s: |value - exact| <= dropped weight (triangle inequality)', (_name, opts) => {
    const r = propagate(c, o, opts);
    expect(r.exact).toBe(false);
    expect(r.droppedTerms).toBeGreaterThan(0);
    expect(r.droppedWeight).toBeGreaterThan(0);
    expect(Math.abs(r.value - exact.value)).toBeLessThanOrEqual(r.droppedWeight + 1e-12);
    if ('maxTerms' in opts) expect(r.peakTerms).toBeLessThanOrEqual(2 * (opts.maxTerms as number));
    expect(r.terms).toBeLessThanOrEqual(exact.peakTerms);
  });
  it('maxTerms keeps at most the budget after every gate, and the largest', () => {
    const r = propagate(c, o, { maxTerms: 25, returnTerms: true });
    expect(r.terms).toBeLessThanOrEqual(25);
    // ten distinct strings with |c| = 1..10 (signs alternate), budget 4: keep 7..10, drop 1+...+6 = 21
    const terms = Array.from({ length: 10 }, (_, k) => ({ coef: (k % 2 ? -1 : 1) * (k + 1), factors: [{ qubit: k, op: 'Z' as const }] }));
    const kept = propagate(circ(10, []), { id: 't', terms }, { maxTerms: 4, returnTerms: true });
    expect(kept.finalTerms!.map((t) => Math.abs(t.coef)).sort((a, b) => a - b)).toEqual([7, 8, 9, 10]);
    expect(kept.droppedWeight).toBe(21);
    expect(kept.droppedTerms).toBe(6);
    // after a gate: RX on qubit 9 splits the largest term into cos and sin parts; the budget holds after it
    const t2 = propagate(circ(10, [g1('rx', 9, 0.3)]), { id: 't', terms }, { maxTerms: 4, returnTerms: true });
    expect(t2.terms).toBe(4);
    const mags = t2.finalTerms!.map((t) => Math.abs(t.coef)).sort((a, b) => a - b);
    // candidates after the gate: 7, 8, 9, 10 cos 0.3 = 9.553, 10 sin 0.3 = 2.955: keep the 4 largest
    expect(mags[0]).toBe(7);
    expect(mags[3]).toBeCloseTo(10 * Math.cos(0.3), 14);
    expect(t2.droppedWeight).toBeCloseTo(21 + 10 * Math.sin(0.3), 12);
  });
  it('a generous threshold changes nothing and stays exact', () => {
    const r = propagate(c, o, { delta: 1e-300 });
    expect(r.exact).toBe(true);
    expect(r.value).toBe(exact.value);
  });
});

describe('bookkeeping', () => {
  it('progress is reported after every gate (or fused block of diagonal Cliffords), increasing to total', () => {
    const c = kickedIsing(6, ring(6), 2, 0.3);
    const seen: [number, number][] = [];
    propagate(c, obs([{ qubit: 0, op: 'Z' }]), { onProgress: (d, t) => seen.push([d, t]) });
    // 2 steps: 6 RX each (one report per rotation) and one fused block of 6 RZZ(-pi/2) each
    expect(seen.length).toBe(2 * (6 + 1));
    for (let k = 1; k < seen.length; k++) expect(seen[k][0]).toBeGreaterThan(seen[k - 1][0]);
    expect(seen[seen.length - 1]).toEqual([c.gates.length, c.gates.length]);
    const seen2: number[] = [];
    propagate(kickedIsing(6, ring(6), 2, 0.3, 0.9), obs([{ qubit: 0, op: 'Z' }]), { onProgress: (d) => seen2.push(d) });
    expect(seen2.length).toBe(c.gates.length); // generic thetaJ: every gate is a rotation
  });

  it('fused diagonal Clifford blocks agree with gate-by-gate application (CZ, S, Z, Sdg, RZ and RZZ at Clifford angles, then H)', () => {
    const r = rng(31);
    for (let rep = 0; rep < 40; rep++) {
      const n = 5;
      const gates: Gate[] = [];
      for (let k = 0; k < 12; k++) {
        const a = Math.floor(r() * n);
        const b = (a + 1 + Math.floor(r() * (n - 1))) % n;
        const kind = Math.floor(r() * 6);
        const q = (Math.floor(r() * 8) - 4) * (Math.PI / 2);
        gates.push(
          kind === 0 ? g2('cz', a, b) : kind === 1 ? g1('s', a) : kind === 2 ? g1('sdg', a) : kind === 3 ? g1('z', a)
            : kind === 4 ? g1('rz', a, q) : g2('rzz', a, b, q),
        );
        if (r() < 0.15) gates.push(g1('rx', a, 0.4 + r())); // breaks runs
      }
      const prep = randomCircuit(r, n, 15);
      const f = randomFactors(r, n);
      const fused = propagate(circ(n, [...prep, ...gates]), obs(f)).value;
      // interleave identities-in-disguise (rx by 0 is Clifford but not diagonal) to force gate-by-gate
      const split: Gate[] = [];
      for (const g of gates) split.push(g, g1('rx', 0, 0));
      const single = propagate(circ(n, [...prep, ...split]), obs(f)).value;
      expect(Math.abs(fused - single)).toBeLessThan(1e-12);
      expect(Math.abs(fused - qcExpectation(n, [...prep, ...gates], f))).toBeLessThan(1e-10); // quantum-circuit
    }
  });
  it('updates count the terms present at each non-Clifford rotation', () => {
    // one qubit, RX(a) then RX(b): going backwards, 1 term at the first rotation met, 2 at the second
    const r = propagate(circ(1, [g1('rx', 0, 0.3), g1('rx', 0, 0.4)]), obs([{ qubit: 0, op: 'Z' }]));
    expect(r.updates).toBe(3);
    expect(r.rotations).toBe(2);
    expect(r.value).toBeCloseTo(Math.cos(0.7), 14); // analytic: RX angles add
  });
  it('duplicate strings in the observable are merged, coefficients added', () => {
    const r = propagate(circ(2, []), {
      id: 'd',
      terms: [
        { coef: 0.5, factors: [{ qubit: 0, op: 'Z' }] },
        { coef: 0.25, factors: [{ qubit: 0, op: 'Z' }] },
        { coef: 2, factors: [{ qubit: 1, op: 'X' }] },
      ],
    });
    expect(r.terms).toBe(2);
    expect(r.value).toBe(0.75); // <Z> = 1, <X> = 0 in |0> (textbook)
  });
});
