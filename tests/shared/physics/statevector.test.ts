import { describe, expect, it } from 'vitest';
// @ts-expect-error quantum-circuit ships no type declarations (its API is typed locally below)
import QuantumCircuitUntyped from 'quantum-circuit';
import type { CompiledCircuit, Gate, GateName, ObservableSpec, PauliFactor } from '../../../shared/physics/circuit';
import {
  DEFAULT_MAX_QUBITS,
  QubitLimitError,
  Statevector,
  statevectorBytes,
  statevectorExpectation,
  wasmKernelsAvailable,
} from '../../../shared/physics/statevector';

interface QCInstance {
  appendGate(name: string, wires: number | number[], options?: { params: Record<string, number | undefined> }): void;
  run(): void;
  stateAsSimpleArray(): { re: number; im: number }[];
}
const QuantumCircuit = QuantumCircuitUntyped as new (n: number) => QCInstance;

// ---------------------------------------------------------------------------------------------
// Local helpers (deliberately independent of shared/physics/lattices.ts and kicked-ising.ts)

/** Deterministic PRNG (mulberry32, common practice). */
function rng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const ONE_Q: GateName[] = ['x', 'y', 'z', 'h', 's', 'sdg', 'sx', 'rx', 'ry', 'rz'];
const TWO_Q: GateName[] = ['rzz', 'cx', 'cz'];
const PARAM: Record<string, boolean> = { rx: true, ry: true, rz: true, rzz: true };

function randomCircuit(n: number, nGates: number, seed: number): CompiledCircuit {
  const r = rng(seed);
  const gates: Gate[] = [];
  for (let k = 0; k < nGates; k++) {
    const two = n >= 2 && r() < 0.4;
    const name = two ? TWO_Q[Math.floor(r() * TWO_Q.length)] : ONE_Q[Math.floor(r() * ONE_Q.length)];
    const a = Math.floor(r() * n);
    let qubits = [a];
    if (two) {
      let b = Math.floor(r() * (n - 1));
      if (b >= a) b++;
      qubits = [a, b];
    }
    const g: Gate = { name, qubits };
    if (PARAM[name]) g.params = [(r() * 2 - 1) * 2 * Math.PI];
    gates.push(g);
  }
  return { nQubits: n, gates, layers: [] };
}

/** Kicked-Ising chain: per step RX(thetaH) on every qubit, then RZZ(thetaJ) on (i, i+1). */
function kickedIsingChain(n: number, thetaJ: number, thetaH: number, steps: number, withLayers: boolean): CompiledCircuit {
  const gates: Gate[] = [];
  const layers: CompiledCircuit['layers'] = [];
  for (let s = 0; s < steps; s++) {
    let start = gates.length;
    for (let q = 0; q < n; q++) gates.push({ name: 'rx', qubits: [q], params: [thetaH] });
    layers.push({ kind: 'rx', start, end: gates.length });
    // two colour layers (even edges, odd edges)
    for (const parity of [0, 1]) {
      start = gates.length;
      for (let q = parity; q + 1 < n; q += 2) gates.push({ name: 'rzz', qubits: [q, q + 1], params: [thetaJ] });
      if (gates.length > start) layers.push({ kind: 'rzz', start, end: gates.length });
    }
  }
  return { nQubits: n, gates, layers: withLayers ? layers : [] };
}

/** The same circuit in the quantum-circuit npm package (sx is its 'srn', rzz its 'zz'). */
function toQC(c: CompiledCircuit, extra: Gate[] = []): QCInstance {
  const qc = new QuantumCircuit(c.nQubits);
  for (const g of [...c.gates, ...extra]) {
    const wires = g.qubits.length === 1 ? g.qubits[0] : [...g.qubits];
    const t = g.params?.[0];
    switch (g.name) {
      case 'sx': qc.appendGate('srn', wires); break;
      case 'rx': case 'ry': qc.appendGate(g.name, wires, { params: { theta: t } }); break;
      case 'rz': qc.appendGate('rz', wires, { params: { phi: t } }); break;
      case 'rzz': qc.appendGate('zz', wires, { params: { theta: t } }); break;
      default: qc.appendGate(g.name, wires);
    }
  }
  qc.run();
  return qc;
}

/** Amplitudes of a quantum-circuit run (its wire w is bit w of the index: checked below). */
function qcAmps(qc: QCInstance): { re: number; im: number }[] {
  return qc.stateAsSimpleArray().map((z) => ({ re: z.re ?? 0, im: z.im ?? 0 }));
}

/**
 * <P> from the quantum-circuit package alone: rotate X -> Z with H and Y -> Z with Sdg then H,
 * and take the Z-string value from the probabilities |amplitude|^2 of that second run.
 */
function qcPauli(c: CompiledCircuit, factors: PauliFactor[]): number {
  const extra: Gate[] = [];
  for (const f of factors) {
    if (f.op === 'X') extra.push({ name: 'h', qubits: [f.qubit] });
    if (f.op === 'Y') extra.push({ name: 'sdg', qubits: [f.qubit] }, { name: 'h', qubits: [f.qubit] });
  }
  const amps = qcAmps(toQC(c, extra));
  let mask = 0;
  for (const f of factors) mask |= 1 << f.qubit;
  let v = 0;
  amps.forEach((a, i) => {
    let p = i & mask, par = 0;
    while (p) { par ^= p & 1; p >>>= 1; }
    v += (par ? -1 : 1) * (a.re * a.re + a.im * a.im);
  });
  return v;
}

function randomPauli(n: number, r: () => number): PauliFactor[] {
  const f: PauliFactor[] = [];
  for (let q = 0; q < n; q++) {
    const u = r();
    if (u < 0.45) continue;
    f.push({ qubit: q, op: u < 0.63 ? 'X' : u < 0.81 ? 'Y' : 'Z' });
  }
  if (f.length === 0) f.push({ qubit: Math.floor(r() * n), op: 'Y' });
  return f;
}

/**
 * Plain per-gate dense reference simulator (common practice: textbook matrix-vector updates, no
 * fusion), used where quantum-circuit is too slow (more than 10 qubits). Checked against
 * quantum-circuit below.
 */
function naiveRun(c: CompiledCircuit): { re: Float64Array; im: Float64Array } {
  const N = 2 ** c.nQubits;
  const re = new Float64Array(N), im = new Float64Array(N);
  re[0] = 1;
  const s2 = Math.SQRT1_2;
  for (const g of c.gates) {
    const t = g.params?.[0] ?? 0;
    const ch = Math.cos(t / 2), sh = Math.sin(t / 2);
    if (g.qubits.length === 1) {
      // [[a, b], [c, d]] as [re, im] pairs
      const M: Record<string, number[][]> = {
        x: [[0, 0], [1, 0], [1, 0], [0, 0]],
        y: [[0, 0], [0, -1], [0, 1], [0, 0]],
        z: [[1, 0], [0, 0], [0, 0], [-1, 0]],
        h: [[s2, 0], [s2, 0], [s2, 0], [-s2, 0]],
        s: [[1, 0], [0, 0], [0, 0], [0, 1]],
        sdg: [[1, 0], [0, 0], [0, 0], [0, -1]],
        sx: [[0.5, 0.5], [0.5, -0.5], [0.5, -0.5], [0.5, 0.5]],
        rx: [[ch, 0], [0, -sh], [0, -sh], [ch, 0]],
        ry: [[ch, 0], [-sh, 0], [sh, 0], [ch, 0]],
        rz: [[ch, -sh], [0, 0], [0, 0], [ch, sh]],
      };
      const [a, b, cc, d] = M[g.name];
      const bit = 1 << g.qubits[0];
      for (let i = 0; i < N; i++) {
        if (i & bit) continue;
        const j = i | bit;
        const xr = re[i], xi = im[i], yr = re[j], yi = im[j];
        re[i] = a[0] * xr - a[1] * xi + b[0] * yr - b[1] * yi;
        im[i] = a[0] * xi + a[1] * xr + b[0] * yi + b[1] * yr;
        re[j] = cc[0] * xr - cc[1] * xi + d[0] * yr - d[1] * yi;
        im[j] = cc[0] * xi + cc[1] * xr + d[0] * yi + d[1] * yr;
      }
    } else {
      const [qa, qb] = g.qubits;
      const ba = 1 << qa, bb = 1 << qb;
      for (let i = 0; i < N; i++) {
        const A = (i & ba) !== 0, B = (i & bb) !== 0;
        if (g.name === 'cx') {
          if (A && !B) {
            const j = i | bb;
            [re[i], re[j]] = [re[j], re[i]];
            [im[i], im[j]] = [im[j], im[i]];
          }
        } else {
          const ang = g.name === 'cz' ? (A && B ? Math.PI : 0) : A === B ? -t / 2 : t / 2;
          const cr = Math.cos(ang), ci = Math.sin(ang);
          const xr = re[i], xi = im[i];
          re[i] = cr * xr - ci * xi;
          im[i] = cr * xi + ci * xr;
        }
      }
    }
  }
  return { re, im };
}

function maxAmpDiff(a: { re: ArrayLike<number>; im: ArrayLike<number> }, b: { re: ArrayLike<number>; im: ArrayLike<number> }): number {
  let m = 0;
  for (let i = 0; i < a.re.length; i++) m = Math.max(m, Math.abs(a.re[i] - b.re[i]), Math.abs(a.im[i] - b.im[i]));
  return m;
}

// ---------------------------------------------------------------------------------------------

describe('statevector vs the quantum-circuit npm package', () => {
  it('uses the same qubit ordering: qubit q is bit q of the index', () => {
    // X on qubit 0 of 3 qubits: quantum-circuit npm package puts amplitude 1 at index 1
    const c: CompiledCircuit = { nQubits: 3, gates: [{ name: 'x', qubits: [0] }], layers: [] };
    const ref = qcAmps(toQC(c));
    expect(ref[1].re).toBeCloseTo(1, 12); // quantum-circuit npm package
    const sv = Statevector.run(c);
    expect(sv.amplitude(1).re).toBe(1); // analytic: X|000> = |001> with qubit 0 as bit 0
    // cx control is the first qubit: X(0) then CX(0 -> 2) gives index 5 (quantum-circuit npm package)
    const c2: CompiledCircuit = { nQubits: 3, gates: [{ name: 'x', qubits: [0] }, { name: 'cx', qubits: [0, 2] }], layers: [] };
    expect(qcAmps(toQC(c2))[5].re).toBeCloseTo(1, 12); // quantum-circuit npm package
    expect(Statevector.run(c2).amplitude(5).re).toBeCloseTo(1, 15); // analytic
  });

  for (let n = 2; n <= 10; n++) {
    it(`random ${n}-qubit circuits over the whole gate set: amplitudes and Pauli values to 1e-10`, () => {
      for (let rep = 0; rep < 2; rep++) {
        const c = randomCircuit(n, 12 + 4 * n, 1000 * n + rep);
        const ref = qcAmps(toQC(c)); // quantum-circuit npm package (rounded to 14 decimals)
        const refSplit = { re: ref.map((z) => z.re), im: ref.map((z) => z.im) };
        const fused = Statevector.run(c);
        const plain = Statevector.run(c, { noFusion: true });
        const js = Statevector.run(c, { engine: 'js' });
        const jsPlain = Statevector.run(c, { engine: 'js', noFusion: true });
        expect(maxAmpDiff(fused.amplitudes(), refSplit)).toBeLessThan(1e-10);
        expect(maxAmpDiff(plain.amplitudes(), refSplit)).toBeLessThan(1e-10);
        expect(maxAmpDiff(js.amplitudes(), refSplit)).toBeLessThan(1e-10);
        expect(maxAmpDiff(jsPlain.amplitudes(), refSplit)).toBeLessThan(1e-10);
        expect(maxAmpDiff(naiveRun(c), refSplit)).toBeLessThan(1e-10); // validates the local reference
        const r = rng(77 * n + rep);
        const terms = [0, 1, 2].map(() => ({ coef: r() * 2 - 1, factors: randomPauli(n, r) }));
        const obs: ObservableSpec = { id: 'random', terms };
        let want = 0;
        const vals = fused.termExpectations(obs);
        terms.forEach((t, k) => {
          const w = qcPauli(c, t.factors); // quantum-circuit npm package (basis change + probabilities)
          expect(Math.abs(vals[k] - w)).toBeLessThan(1e-10);
          want += t.coef * w;
        });
        expect(Math.abs(fused.expectation(obs) - want)).toBeLessThan(1e-10);
        expect(Math.abs(statevectorExpectation(c, obs).value - want)).toBeLessThan(1e-10);
      }
    });
  }

  it('8-qubit kicked-Ising chain (layered and flat) matches quantum-circuit', () => {
    for (const thetaH of [0.3, 1.1]) {
      const flat = kickedIsingChain(8, -Math.PI / 2, thetaH, 3, false);
      const layered = kickedIsingChain(8, 0.7, thetaH, 3, true);
      for (const c of [flat, layered]) {
        const ref = qcAmps(toQC(c)); // quantum-circuit npm package
        const d = maxAmpDiff(Statevector.run(c).amplitudes(), { re: ref.map((z) => z.re), im: ref.map((z) => z.im) });
        expect(d).toBeLessThan(1e-10);
        const f: PauliFactor[] = [{ qubit: 3, op: 'X' }, { qubit: 4, op: 'Y' }];
        expect(Math.abs(Statevector.run(c).pauliExpectation(f) - qcPauli(c, f))).toBeLessThan(1e-10); // quantum-circuit npm package
      }
    }
  });
});

describe('statevector analytic values', () => {
  it('one qubit: <Z> after RX(t) is cos t, <Y> is -sin t, <X> is 0', () => {
    for (const t of [0, 0.1, 0.7, Math.PI / 2, 2.5, Math.PI, -1.3]) {
      const sv = Statevector.run({ nQubits: 1, gates: [{ name: 'rx', qubits: [0], params: [t] }], layers: [] });
      expect(sv.pauliExpectation([{ qubit: 0, op: 'Z' }])).toBeCloseTo(Math.cos(t), 14); // analytic
      expect(sv.pauliExpectation([{ qubit: 0, op: 'Y' }])).toBeCloseTo(-Math.sin(t), 14); // analytic
      expect(sv.pauliExpectation([{ qubit: 0, op: 'X' }])).toBeCloseTo(0, 14); // analytic
    }
  });

  it('SX = e^{i pi/4} RX(pi/2) (circuit.ts convention)', () => {
    const a = Statevector.run({ nQubits: 1, gates: [{ name: 'sx', qubits: [0] }], layers: [] }).amplitudes();
    const b = Statevector.run({ nQubits: 1, gates: [{ name: 'rx', qubits: [0], params: [Math.PI / 2] }], layers: [] }).amplitudes();
    const pr = Math.SQRT1_2, pi = Math.SQRT1_2; // e^{i pi/4}, analytic
    for (let i = 0; i < 2; i++) {
      expect(a.re[i]).toBeCloseTo(pr * b.re[i] - pi * b.im[i], 14); // analytic
      expect(a.im[i]).toBeCloseTo(pr * b.im[i] + pi * b.re[i], 14); // analytic
    }
  });

  it('Bell state from H, CX: <ZZ> = <XX> = 1, <YY> = -1, <Z> = 0', () => {
    const sv = Statevector.run({ nQubits: 2, gates: [{ name: 'h', qubits: [0] }, { name: 'cx', qubits: [0, 1] }], layers: [] });
    expect(sv.pauliExpectation([{ qubit: 0, op: 'Z' }, { qubit: 1, op: 'Z' }])).toBeCloseTo(1, 14); // analytic
    expect(sv.pauliExpectation([{ qubit: 0, op: 'X' }, { qubit: 1, op: 'X' }])).toBeCloseTo(1, 14); // analytic
    expect(sv.pauliExpectation([{ qubit: 0, op: 'Y' }, { qubit: 1, op: 'Y' }])).toBeCloseTo(-1, 14); // analytic
    expect(sv.pauliExpectation([{ qubit: 1, op: 'Z' }])).toBeCloseTo(0, 14); // analytic
  });

  it('kicked Ising at thetaH = pi/2: <Z_q> = 0 for t >= 1; at thetaH = pi: <Z_q> = (-1)^t', () => {
    for (let t = 1; t <= 4; t++) {
      const a = Statevector.run(kickedIsingChain(9, -Math.PI / 2, Math.PI / 2, t, true));
      const b = Statevector.run(kickedIsingChain(9, -Math.PI / 2, Math.PI, t, false));
      for (let q = 0; q < 9; q++) {
        expect(Math.abs(a.pauliExpectation([{ qubit: q, op: 'Z' }]))).toBeLessThan(1e-12); // PHYSICS.md
        expect(b.pauliExpectation([{ qubit: q, op: 'Z' }])).toBeCloseTo((-1) ** t, 12); // PHYSICS.md
      }
    }
  });
});

describe('statevector fusion paths on wider states (vs the local per-gate reference)', () => {
  it('14 and 18 qubits, random gates and long-range rzz/cz (high-qubit groups, diagonal cross tables)', () => {
    for (const [n, seed] of [[14, 5], [18, 6]] as const) {
      const c = randomCircuit(n, 120, seed);
      // many long-range diagonal gates in a row: more than 6 distinct high qubits crossing the split
      for (let k = 0; k < n - 1; k++) c.gates.push({ name: k % 3 ? 'rzz' : 'cz', qubits: [k % 5, n - 1 - (k % (n - 6))], params: [0.37 * k + 0.1] });
      c.gates.push(...randomCircuit(n, 40, seed + 100).gates);
      const want = naiveRun(c); // common practice (local plain reference, checked vs quantum-circuit above)
      expect(maxAmpDiff(Statevector.run(c).amplitudes(), want)).toBeLessThan(1e-10);
      expect(maxAmpDiff(Statevector.run(c, { engine: 'js' }).amplitudes(), want)).toBeLessThan(1e-10);
    }
  });

  it('16-qubit kicked-Ising chain, flat and layered, equals the plain reference', () => {
    for (const withLayers of [false, true]) {
      const c = kickedIsingChain(16, 0.45, 0.9, 3, withLayers);
      const want = naiveRun(c); // common practice
      expect(maxAmpDiff(Statevector.run(c).amplitudes(), want)).toBeLessThan(1e-10);
      expect(maxAmpDiff(Statevector.run(c, { engine: 'js' }).amplitudes(), want)).toBeLessThan(1e-10);
      // thetaH near pi: RX-form with |cos| < 1/2 takes the general JS kernel
      const c2 = kickedIsingChain(15, 0.45, 2.9, 2, withLayers);
      expect(maxAmpDiff(Statevector.run(c2, { engine: 'js' }).amplitudes(), naiveRun(c2))).toBeLessThan(1e-10); // common practice
    }
  });

  it('keeps the norm', () => {
    const sv = Statevector.run(randomCircuit(15, 200, 9));
    expect(sv.norm2()).toBeCloseTo(1, 12); // analytic: unitary evolution
  });
});

describe('statevector engines', () => {
  it('uses the WebAssembly SIMD kernels on Node 20, and the JS kernels on request', () => {
    expect(wasmKernelsAvailable()).toBe(true); // common practice: Node >= 16 ships wasm SIMD
    expect(new Statevector(4).engine).toBe('wasm');
    expect(new Statevector(4, { engine: 'js' }).engine).toBe('js');
  });
});

describe('statevector limits and progress', () => {
  it('throws a QubitLimitError naming the size and the limit, before allocating', () => {
    expect(DEFAULT_MAX_QUBITS).toBe(26);
    expect(statevectorBytes(26)).toBe(2 ** 30); // PHYSICS.md: 2^26 amplitudes is 1 GiB in complex128
    expect(statevectorBytes(30)).toBe(16 * 2 ** 30); // PHYSICS.md: 2^30 is 16 GiB
    let err: unknown;
    try {
      new Statevector(40);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(QubitLimitError);
    const qe = err as QubitLimitError;
    expect(qe.nQubits).toBe(40);
    expect(qe.limit).toBe(26);
    expect(qe.bytes).toBe(16 * 2 ** 40);
    expect(qe.message).toMatch(/40 qubits/);
    expect(qe.message).toMatch(/limit of 26/);
    expect(qe.message).toMatch(/16384 GiB/);
    // configurable limit
    const c = randomCircuit(6, 10, 1);
    expect(() => Statevector.run(c, { maxQubits: 5 })).toThrow(QubitLimitError);
    expect(() => Statevector.run(c, { maxQubits: 5 })).toThrow(/6 qubits exceeds the limit of 5/);
    expect(Statevector.run(c, { maxQubits: 6 }).nQubits).toBe(6);
  });

  it('rejects gates on qubits outside the register', () => {
    expect(() => Statevector.run({ nQubits: 3, gates: [{ name: 'h', qubits: [3] }], layers: [] })).toThrow(/outside/);
    expect(() => Statevector.run({ nQubits: 3, gates: [{ name: 'rx', qubits: [0] }], layers: [] })).toThrow(/angle/);
  });

  it('reports progress monotonically up to (total, total)', () => {
    const c = kickedIsingChain(10, 0.3, 0.4, 4, true);
    const seen: [number, number][] = [];
    Statevector.run(c, { onProgress: (d, t) => seen.push([d, t]) });
    expect(seen.length).toBeGreaterThan(3); // one report per fused pass at least
    for (let i = 1; i < seen.length; i++) expect(seen[i][0]).toBeGreaterThanOrEqual(seen[i - 1][0]);
    expect(seen[seen.length - 1]).toEqual([c.gates.length, c.gates.length]);
    expect(seen.every(([, t]) => t === c.gates.length)).toBe(true);
  });
});
