import { describe, expect, it } from 'vitest';
import type { CompiledCircuit, Gate, ObservableSpec, PauliTerm } from '../../../shared/physics/circuit';
import {
  freeFermionCost,
  freeFermionExpectation,
  freeFermionUnsupportedReason,
  majoranaRotation,
  pfaffian,
} from '../../../shared/physics/free-fermion';
import { Statevector } from '../../../shared/physics/statevector';

// Local helpers (independent of shared/physics/lattices.ts and kicked-ising.ts)

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

/** Per step: RX(thetaH) on every qubit, then RZZ(thetaJ) on every edge (i, i+1) (PHYSICS.md). */
function chainCircuit(n: number, thetaJ: number, thetaH: number, steps: number): CompiledCircuit {
  const gates: Gate[] = [];
  for (let s = 0; s < steps; s++) {
    for (let q = 0; q < n; q++) gates.push({ name: 'rx', qubits: [q], params: [thetaH] });
    for (let q = 0; q + 1 < n; q++) gates.push({ name: 'rzz', qubits: [q, q + 1], params: [thetaJ] });
  }
  return { nQubits: n, gates, layers: [] };
}

const Z = (q: number): PauliTerm => ({ coef: 1, factors: [{ qubit: q, op: 'Z' }] });
const X = (q: number): PauliTerm => ({ coef: 1, factors: [{ qubit: q, op: 'X' }] });
const ZZ = (q: number): PauliTerm => ({ coef: 1, factors: [{ qubit: q, op: 'Z' }, { qubit: q + 1, op: 'Z' }] });

function allLocalTerms(n: number): ObservableSpec {
  const terms: PauliTerm[] = [];
  for (let q = 0; q < n; q++) terms.push(Z(q), X(q));
  for (let q = 0; q + 1 < n; q++) terms.push(ZZ(q));
  return { id: 'all-local', terms };
}

function meanMagnetisation(n: number): ObservableSpec {
  return { id: 'mean-z', terms: Array.from({ length: n }, (_, q) => ({ coef: 1 / n, factors: [{ qubit: q, op: 'Z' as const }] })) };
}

function ff(n: number, thetaJ: number, thetaH: number, steps: number, obs: ObservableSpec, lightCone = true) {
  const r = freeFermionExpectation({ n, thetaJ, thetaH, steps }, obs, { lightCone });
  if (!r.ok) throw new Error(r.reason);
  return r;
}

// ---------------------------------------------------------------------------------------------

describe('Pfaffian (Parlett-Reid)', () => {
  function randomAntisym(m: number, r: () => number): { re: Float64Array; im: Float64Array } {
    const re = new Float64Array(m * m), im = new Float64Array(m * m);
    for (let i = 0; i < m; i++) {
      for (let j = i + 1; j < m; j++) {
        const a = r() * 2 - 1, b = r() * 2 - 1;
        re[i * m + j] = a; im[i * m + j] = b;
        re[j * m + i] = -a; im[j * m + i] = -b;
      }
    }
    return { re, im };
  }
  /** Pf by expansion along the first row (common practice: Pf A = sum_j (-1)^j a_1j Pf A_{1j^}). */
  function pfExpand(re: number[][], im: number[][]): [number, number] {
    const m = re.length;
    if (m === 0) return [1, 0];
    let sr = 0, si = 0;
    for (let j = 1; j < m; j++) {
      const keep = [...Array(m).keys()].filter((k) => k !== 0 && k !== j);
      const [pr, pi] = pfExpand(keep.map((a) => keep.map((b) => re[a][b])), keep.map((a) => keep.map((b) => im[a][b])));
      const sgn = j % 2 === 1 ? 1 : -1;
      sr += sgn * (re[0][j] * pr - im[0][j] * pi);
      si += sgn * (re[0][j] * pi + im[0][j] * pr);
    }
    return [sr, si];
  }
  it('4x4 real: a12 a34 - a13 a24 + a14 a23 (analytic)', () => {
    const a = [0, 0.3, -1.2, 0.7, 2.1, -0.4]; // a12 a13 a14 a23 a24 a34
    const m = 4;
    const re = new Float64Array(16), im = new Float64Array(16);
    const set = (i: number, j: number, v: number) => { re[i * m + j] = v; re[j * m + i] = -v; };
    set(0, 1, a[0]); set(0, 2, a[1]); set(0, 3, a[2]); set(1, 2, a[3]); set(1, 3, a[4]); set(2, 3, a[5]);
    const want = a[0] * a[5] - a[1] * a[4] + a[2] * a[3]; // analytic
    const p = pfaffian(re, im, 4);
    expect(p.re).toBeCloseTo(want, 14);
    expect(p.im).toBeCloseTo(0, 14);
  });
  it('random complex 2..10: equals the expansion along the first row (common practice)', () => {
    const r = rng(3);
    for (const m of [2, 4, 6, 8, 10]) {
      const { re, im } = randomAntisym(m, r);
      const rows = (a: Float64Array) => Array.from({ length: m }, (_, i) => Array.from(a.subarray(i * m, i * m + m)));
      const [wr, wi] = pfExpand(rows(re), rows(im));
      const p = pfaffian(re.slice(), im.slice(), m);
      expect(Math.abs(p.re - wr) + Math.abs(p.im - wi)).toBeLessThan(1e-11 * Math.max(1, Math.hypot(wr, wi)));
    }
    expect(pfaffian(new Float64Array(9), new Float64Array(9), 3)).toEqual({ re: 0, im: 0 }); // analytic: odd size
  });
});

describe('Majorana rotation', () => {
  it('is orthogonal', () => {
    const n = 9, D = 18;
    const R = majoranaRotation(n, 0.7, 0.4, 5);
    let err = 0;
    for (let a = 0; a < D; a++) {
      for (let b = 0; b < D; b++) {
        let s = 0;
        for (let k = 0; k < D; k++) s += R[a * D + k] * R[b * D + k];
        err = Math.max(err, Math.abs(s - (a === b ? 1 : 0))); // analytic: products of Givens rotations
      }
    }
    expect(err).toBeLessThan(1e-13);
  });
});

describe('free fermions equal the statevector (chains of 2..12 qubits, steps 1..6)', () => {
  // (thetaH, thetaJ): thetaJ = -pi/2 is the Clifford default; the others are non-Clifford
  const angles: [number, number][] = [[0.3, -Math.PI / 2], [0.9, 0.7], [1.3, -0.45], [2.2, 1.9]];
  for (let n = 2; n <= 12; n++) {
    it(`n = ${n}: every Z_j, X_j, Z_j Z_j+1 and the mean magnetisation to 1e-10`, () => {
      const obs = allLocalTerms(n);
      const mz = meanMagnetisation(n);
      for (const [thetaH, thetaJ] of angles) {
        for (let steps = 1; steps <= 6; steps++) {
          const sv = Statevector.run(chainCircuit(n, thetaJ, thetaH, steps));
          const want = sv.termExpectations(obs); // own statevector engine, itself checked vs the quantum-circuit npm package
          for (const lightCone of [true, false]) {
            const got = ff(n, thetaJ, thetaH, steps, obs, lightCone).termValues;
            for (let k = 0; k < want.length; k++) expect(Math.abs(got[k] - want[k])).toBeLessThan(1e-10);
          }
          const m = ff(n, thetaJ, thetaH, steps, mz);
          expect(Math.abs(m.value - sv.expectation(mz))).toBeLessThan(1e-10); // own statevector engine
        }
      }
    });
  }

  it('weighted sums: value = sum coef * term value, identity terms count 1', () => {
    const obs: ObservableSpec = { id: 'h', terms: [{ coef: -1.5, factors: [{ qubit: 1, op: 'Z' }, { qubit: 2, op: 'Z' }] }, { coef: 0.25, factors: [{ qubit: 3, op: 'X' }] }, { coef: 2, factors: [] }] };
    const sv = Statevector.run(chainCircuit(6, 0.8, 0.6, 4));
    const r = ff(6, 0.8, 0.6, 4, obs);
    expect(Math.abs(r.value - sv.expectation(obs))).toBeLessThan(1e-10); // own statevector engine
    expect(r.termValues[2]).toBe(1); // analytic: <I> = 1
  });

  it('steps = 0: <Z_j> = 1, <X_j> = 0, <Z_j Z_j+1> = 1', () => {
    const r = ff(5, 0.8, 0.6, 0, allLocalTerms(5), false);
    const obs = allLocalTerms(5);
    obs.terms.forEach((t, k) => {
      const want = t.factors[0].op === 'X' ? 0 : 1; // analytic: |0...0>
      expect(r.termValues[k]).toBeCloseTo(want, 14);
    });
  });
});

describe('free fermions on a 200-site chain', () => {
  const n = 200;
  it('thetaH = pi/2 (thetaJ = -pi/2): <Z_q> = 0 for every site and t = 1..6', () => {
    const obs: ObservableSpec = { id: 'z-all', terms: Array.from({ length: n }, (_, q) => Z(q)) };
    for (let t = 1; t <= 6; t++) {
      const r = ff(n, -Math.PI / 2, Math.PI / 2, t, obs);
      for (const v of r.termValues) expect(Math.abs(v)).toBeLessThan(1e-12); // PHYSICS.md
    }
  });
  it('thetaH = pi: <Z_q> = (-1)^t for every site and t = 1..6', () => {
    const obs: ObservableSpec = { id: 'z-all', terms: Array.from({ length: n }, (_, q) => Z(q)) };
    for (let t = 1; t <= 6; t++) {
      for (const thetaJ of [-Math.PI / 2, 0.7]) {
        const r = ff(n, thetaJ, Math.PI, t, obs);
        // PHYSICS.md (thetaJ = -pi/2); analytic for thetaJ = 0.7 (RX(pi) flips every spin, RZZ only adds phases)
        for (const v of r.termValues) expect(v).toBeCloseTo((-1) ** t, 12);
        expect(ff(n, thetaJ, Math.PI, t, meanMagnetisation(n)).value).toBeCloseTo((-1) ** t, 12);
      }
    }
  });
  it('the whole-chain Pfaffian (no cone reduction) gives the same values, also at the far end', () => {
    const sites = [0, 1, 2, 57, 120, 198, 199];
    const obs: ObservableSpec = { id: 'mix', terms: [...sites.map(Z), X(0), X(100), X(199), ZZ(0), ZZ(100), ZZ(198)] };
    for (const [thetaH, thetaJ, t] of [[Math.PI / 2, -Math.PI / 2, 3], [Math.PI, 0.7, 3], [0.8, 0.55, 4]] as const) {
      const a = ff(n, thetaJ, thetaH, t, obs, true).termValues;
      const b = ff(n, thetaJ, thetaH, t, obs, false).termValues;
      for (let k = 0; k < a.length; k++) expect(Math.abs(a[k] - b[k])).toBeLessThan(1e-10); // PHYSICS.md: bulk = infinite-chain value inside the light cone
      if (thetaH === Math.PI / 2) for (let k = 0; k < sites.length; k++) expect(Math.abs(b[k])).toBeLessThan(1e-10); // PHYSICS.md
      if (thetaH === Math.PI) for (let k = 0; k < sites.length; k++) expect(b[k]).toBeCloseTo(-1, 10); // PHYSICS.md: (-1)^3
    }
  });
  it('bulk values equal those of a shorter chain while the light cone does not reach the ends', () => {
    for (let t = 1; t <= 6; t++) {
      const a = ff(n, 0.9, 0.7, t, { id: 'a', terms: [Z(100), X(100), ZZ(100)] }, false).termValues;
      const b = ff(30, 0.9, 0.7, t, { id: 'b', terms: [Z(15), X(15), ZZ(15)] }, false).termValues;
      for (let k = 0; k < 3; k++) expect(Math.abs(a[k] - b[k])).toBeLessThan(1e-10); // PHYSICS.md
    }
  });
  it('symmetries: <P>(-thetaH) = (-1)^{#X+#Y} <P>(thetaH), <P>(thetaH+pi) = (-1)^{t(#Y+#Z)} <P>(thetaH)', () => {
    const obs: ObservableSpec = { id: 's', terms: [Z(0), Z(37), X(5), X(80), ZZ(0), ZZ(50)] };
    const sX = [1, 1, -1, -1, 1, 1]; // (-1)^{#X + #Y}
    const nZ = [1, 1, 0, 0, 2, 2]; // #Y + #Z
    for (let t = 1; t <= 5; t++) {
      const base = ff(n, 0.6, 0.45, t, obs).termValues;
      const neg = ff(n, 0.6, -0.45, t, obs).termValues;
      const shift = ff(n, 0.6, 0.45 + Math.PI, t, obs).termValues;
      for (let k = 0; k < base.length; k++) {
        expect(Math.abs(neg[k] - sX[k] * base[k])).toBeLessThan(1e-12); // PHYSICS.md
        expect(Math.abs(shift[k] - (-1) ** (t * nZ[k]) * base[k])).toBeLessThan(1e-12); // PHYSICS.md
      }
    }
  });
});

describe('free-fermion input checks and cost', () => {
  it('rejects unsupported observables with a reason', () => {
    const bad = (terms: PauliTerm[]) => freeFermionExpectation({ n: 10, thetaJ: 0.3, thetaH: 0.2, steps: 2 }, { id: 'b', terms });
    const cases: [PauliTerm[], RegExp][] = [
      [[{ coef: 1, factors: [{ qubit: 2, op: 'Y' }] }], /single-site Y/],
      [[{ coef: 1, factors: [{ qubit: 2, op: 'Z' }, { qubit: 4, op: 'Z' }] }], /not a nearest-neighbour pair/],
      [[{ coef: 1, factors: [{ qubit: 2, op: 'X' }, { qubit: 3, op: 'X' }] }], /X2 X3 is not supported/],
      [[{ coef: 1, factors: [{ qubit: 12, op: 'Z' }] }], /outside the chain/],
      [[], /no terms/],
    ];
    for (const [terms, re] of cases) {
      const r = bad(terms);
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.reason).toMatch(re);
    }
    expect(freeFermionUnsupportedReason(10, meanMagnetisation(10))).toBeNull();
    const r = freeFermionExpectation({ n: 10, thetaJ: 0.3, thetaH: 0.2, steps: -1 }, meanMagnetisation(10));
    expect(r.ok).toBe(false);
  });
  it('cost estimate grows with steps, is null for unsupported input, and stays small for long chains', () => {
    const spec = { n: 1000, thetaJ: 0.3, thetaH: 0.2 };
    const c2 = freeFermionCost({ ...spec, steps: 2 }, meanMagnetisation(1000))!;
    const c6 = freeFermionCost({ ...spec, steps: 6 }, meanMagnetisation(1000))!;
    expect(c2.operations).toBeGreaterThan(0);
    expect(c6.operations).toBeGreaterThan(c2.operations);
    expect(c6.subproblems).toBeLessThan(20); // the bulk sites share one sub-problem
    const full = freeFermionCost({ ...spec, steps: 6 }, meanMagnetisation(1000), { lightCone: false })!;
    expect(full.operations).toBeGreaterThan(100 * c6.operations);
    expect(freeFermionCost({ ...spec, steps: 2 }, { id: 'y', terms: [{ coef: 1, factors: [{ qubit: 0, op: 'Y' }] }] })).toBeNull();
  });
});
