/**
 * Cross-checks of the exact engines against each other on random small instances (property tests,
 * fast-check with fixed seeds): full statevector (WebAssembly and JS kernels, fused and unfused),
 * exact Pauli propagation, the light-cone sub-circuit (light-cone.ts and the planner's own
 * restriction) on the statevector, the free-fermion solver on chains, every method through
 * ReferenceRunner.runMethod, and the npm package quantum-circuit as an outside reference.
 *
 * Instances go through the real pipeline (loadChallenge: lattice generator, edge colouring,
 * compilation) on every lattice kind: chain, ring, square, heavy-hex, explicit edges. thetaH is
 * drawn from the Clifford points k pi/2 and from generic angles; thetaJ is the default -pi/2, a
 * Clifford angle or generic. Observables have one to three terms with coefficients, X, Y and Z
 * factors. Source of every expected value: the other engines (agreement is the check), and for
 * the symmetries PHYSICS.md "Symmetries".
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { ObservableSpec } from '../../../shared/physics/circuit';
import { loadChallenge, type ChallengeSpec } from '../../../shared/physics/challenge';
import { freeFermionExpectation, freeFermionUnsupportedReason } from '../../../shared/physics/free-fermion';
import { lightCone } from '../../../shared/physics/light-cone';
import { lightConeStatevectorValue } from '../../../shared/physics/light-cone-statevector';
import { propagate } from '../../../shared/physics/pauli-propagation';
import { ReferenceRunner } from '../../../shared/physics/reference';
import { statevectorExpectation } from '../../../shared/physics/statevector';
import { latticeQubits, type LatticeSpec } from '../../../shared/physics/lattices';
import { qcExpectation } from './qc-reference';

const HALF_PI = Math.PI / 2;
const TOL = 1e-10;

const arbLattice: fc.Arbitrary<LatticeSpec> = fc.oneof(
  fc.integer({ min: 1, max: 8 }).map((n): LatticeSpec => ({ kind: 'chain', n })),
  fc.integer({ min: 3, max: 8 }).map((n): LatticeSpec => ({ kind: 'ring', n })),
  fc.record({ rows: fc.integer({ min: 1, max: 3 }), cols: fc.integer({ min: 1, max: 3 }) }).map((r): LatticeSpec => ({ kind: 'square', ...r })),
  fc.constant<LatticeSpec>({ kind: 'heavy-hex', rows: 1, cols: 1 }),
  fc
    .integer({ min: 2, max: 8 })
    .chain((n) =>
      fc
        .uniqueArray(fc.tuple(fc.integer({ min: 0, max: n - 1 }), fc.integer({ min: 0, max: n - 1 })).filter(([a, b]) => a !== b), {
          maxLength: 12,
          size: 'max',
          selector: ([a, b]) => `${Math.min(a, b)},${Math.max(a, b)}`,
        })
        .map((edges): LatticeSpec => ({ kind: 'edges', n, edges })),
    ),
);

/** Clifford points k pi/2 (k = -2..4) and generic angles, also beyond 2 pi. */
const arbThetaH = fc.oneof(
  fc.integer({ min: -2, max: 4 }).map((k) => k * HALF_PI),
  fc.double({ min: -4, max: 4, noNaN: true }).filter((t) => Math.abs(t) > 1e-3),
);
const arbThetaJ = fc.oneof(
  fc.constant(undefined),
  fc.integer({ min: -2, max: 2 }).map((k) => k * HALF_PI),
  fc.double({ min: -3, max: 3, noNaN: true }),
);

/** Pauli text for a random string on n qubits: 1 to 3 distinct qubits, ops X, Y, Z. */
const arbPauli = (n: number) =>
  fc
    .uniqueArray(fc.integer({ min: 0, max: n - 1 }), { minLength: 1, maxLength: Math.min(3, n), size: 'max' })
    .chain((qs) => fc.tuple(fc.constant(qs), fc.array(fc.constantFrom('X', 'Y', 'Z'), { minLength: qs.length, maxLength: qs.length })))
    .map(([qs, ops]) => qs.map((q, i) => `${ops[i]}${q}`).join(' '));

const arbObservable = (n: number) =>
  fc
    .uniqueArray(fc.tuple(arbPauli(n), fc.constantFrom(1, -1, 0.5, -0.25, 2.5, 1e-3)), { minLength: 1, maxLength: 3, size: 'max', selector: ([p]) => [...p.split(' ')].sort().join(' ') })
    .map((terms) => (terms.length === 1 && terms[0][1] === 1 ? { id: 'o', pauli: terms[0][0] } : { id: 'o', terms: terms.map(([pauli, coef]) => ({ coef, pauli })) }));

const arbCase = arbLattice.chain((lattice) => {
  const n = latticeQubits(lattice);
  return fc.record({
    lattice: fc.constant(lattice),
    steps: fc.integer({ min: 0, max: 3 }),
    thetaH: arbThetaH,
    thetaJ: arbThetaJ,
    observable: arbObservable(n),
  });
});

type Case = { lattice: LatticeSpec; steps: number; thetaH: number; thetaJ: number | undefined; observable: ChallengeSpec['observables'][number] };

function challengeOf(c: Case, thetaH = c.thetaH) {
  return loadChallenge({
    id: 'cross', version: 1, title: 'cross', description: '', lattice: c.lattice,
    circuit: { family: 'kicked-ising', steps: [c.steps], thetaH: [thetaH], ...(c.thetaJ === undefined ? {} : { thetaJ: c.thetaJ }) },
    observables: [c.observable],
  });
}

function countXY(obs: ObservableSpec, k: number): number {
  return obs.terms[k].factors.filter((f) => f.op !== 'Z').length;
}

describe('exact engines agree on random kicked-Ising instances (every lattice kind, Clifford and generic angles, X/Y/Z terms)', () => {
  it('statevector (wasm, js, unfused), propagation, light cones, runMethod and free fermions give one value', () => {
    fc.assert(
      fc.property(arbCase, (c) => {
        const ch = challengeOf(c);
        const runner = new ReferenceRunner(ch);
        const inst = ch.instances[0];
        const obs = ch.observables[0];
        const circ = runner.circuit(inst);
        const sv = statevectorExpectation(circ, obs);
        const ref = sv.value;
        expect(statevectorExpectation(circ, obs, { engine: 'js' }).value).toBeCloseTo(ref, 10);
        expect(statevectorExpectation(circ, obs, { noFusion: true }).value).toBeCloseTo(ref, 10);
        const pp = propagate(circ, obs);
        expect(pp.exact).toBe(true);
        expect(Math.abs(pp.value - ref)).toBeLessThan(TOL);
        const lc = lightCone(circ, obs);
        expect(Math.abs(lightConeStatevectorValue(lc.circuit, lc.observable as ObservableSpec).value - ref)).toBeLessThan(TOL);
        // the planner's counted cone (no sub-circuit built) is light-cone.ts's cone, and its
        // per-term bound on Pauli terms holds for the exact propagation of each term's cone
        const plan = runner.plan(ch.targets[0]);
        expect(plan.cone.qubits).toBe(lc.qubits.length);
        expect(plan.cone.gates).toBe(lc.keptGates.length);
        for (const t of obs.terms) {
          const sub = runner.planner.restrict(inst, { id: 't', terms: [t] });
          const bound = runner.planner.termBound(inst, t);
          expect(propagate(sub.circuit, sub.observable).peakTerms).toBeLessThanOrEqual(2 ** bound.log2Terms);
        }
        for (const method of ['pauli-propagation', 'light-cone-statevector', 'statevector'] as const) {
          for (const perTerm of [false, true]) {
            const r = runner.runMethod({ method, perTerm }, inst, obs);
            expect(r.ok).toBe(true);
            if (r.ok) expect(Math.abs(r.value - ref), `${method}${perTerm ? ' per term' : ''}`).toBeLessThan(TOL);
          }
        }
        // the runner's chosen method
        const chosen = runner.run(ch.targets[0]);
        expect(chosen.value).not.toBeNull();
        if (chosen.value !== null) expect(Math.abs(chosen.value - ref)).toBeLessThan(TOL);
        // free fermions on chains, for the observables it supports
        if (c.lattice.kind === 'chain' && freeFermionUnsupportedReason(ch.nQubits, obs) === null) {
          const p = inst.params;
          if (p.family !== 'kicked-ising') throw new Error('family');
          for (const lightConeOn of [true, false]) {
            const ff = freeFermionExpectation({ n: ch.nQubits, thetaJ: p.thetaJ, thetaH: p.thetaH, steps: p.steps }, obs, { lightCone: lightConeOn });
            expect(ff.ok).toBe(true);
            if (ff.ok) expect(Math.abs(ff.value - ref)).toBeLessThan(TOL);
          }
          const r = runner.runMethod({ method: 'free-fermion' }, inst, obs);
          expect(r.ok && Math.abs(r.value - ref) < TOL).toBe(true);
        }
        // |<O>| <= sum |coef|
        expect(Math.abs(ref)).toBeLessThanOrEqual(obs.terms.reduce((s, t) => s + Math.abs(t.coef), 0) + 1e-12);
      }),
      { seed: 20240601, numRuns: 80 },
    );
  });

  it('quantum-circuit (npm) agrees on instances of at most 8 qubits', () => {
    const small = arbCase.filter((c) => latticeQubits(c.lattice) <= 8);
    fc.assert(
      fc.property(small, (c) => {
        const ch = challengeOf(c);
        const runner = new ReferenceRunner(ch);
        const circ = runner.circuit(ch.instances[0]);
        const obs = ch.observables[0];
        const ours = statevectorExpectation(circ, obs).value;
        const theirs = qcExpectation(circ.nQubits, circ.gates, obs);
        expect(Math.abs(ours - theirs)).toBeLessThan(1e-9);
        expect(Math.abs(propagate(circ, obs).value - theirs)).toBeLessThan(1e-9);
      }),
      { seed: 777, numRuns: 40 },
    );
  });

  it('PHYSICS.md symmetries hold term by term: <P>(-thetaH) = (-1)^{#X+#Y} <P>(thetaH), <P>(thetaH + pi) = (-1)^{t(#Y+#Z)} <P>(thetaH)', () => {
    fc.assert(
      fc.property(arbCase, (c) => {
        const values = (thetaH: number) => {
          const ch = challengeOf(c, thetaH);
          const runner = new ReferenceRunner(ch);
          const circ = runner.circuit(ch.instances[0]);
          return { obs: ch.observables[0], v: statevectorExpectation(circ, ch.observables[0]).termValues };
        };
        const base = values(c.thetaH);
        const neg = values(-c.thetaH);
        const shifted = values(c.thetaH + Math.PI);
        base.v.forEach((v, k) => {
          const f = base.obs.terms[k].factors;
          const xy = countXY(base.obs, k);
          const yz = f.filter((x) => x.op !== 'X').length;
          expect(Math.abs(neg.v[k] - (-1) ** xy * v)).toBeLessThan(TOL);
          expect(Math.abs(shifted.v[k] - (-1) ** (c.steps * yz) * v)).toBeLessThan(TOL);
        });
      }),
      { seed: 99, numRuns: 60 },
    );
  });

  it('PHYSICS.md Clifford points: thetaH = 0 gives 1 for Z strings and 0 with X or Y; thetaH = pi/2 gives values in {-1, 0, 1} and <Z_q> = 0 for t >= 1; thetaH = pi gives <Z_q> = (-1)^t', () => {
    fc.assert(
      fc.property(arbLattice, fc.integer({ min: 0, max: 3 }), fc.nat(), (lattice, steps, pick) => {
        const n = latticeQubits(lattice);
        const q = pick % n;
        const strings = [`Z${q}`, `X${q}`, `Y${q}`, n > 1 ? `Z${q} Z${(q + 1) % n}` : `Z${q}`, n > 1 ? `X${q} Y${(q + 1) % n}` : `Y${q}`];
        for (const s of strings) {
          const c: Case = { lattice, steps, thetaH: 0, thetaJ: undefined, observable: { id: 'o', pauli: s } };
          const at = (thetaH: number) => {
            const ch = challengeOf(c, thetaH);
            const r = new ReferenceRunner(ch).run(ch.targets[0]);
            if (r.value === null) throw new Error(r.reason);
            return r.value;
          };
          const zOnly = !/[XY]/.test(s);
          expect(at(0)).toBe(zOnly ? 1 : 0);
          const v = at(HALF_PI);
          expect([-1, 0, 1].some((x) => Math.abs(v - x) < 1e-12)).toBe(true);
          if (s === `Z${q}` && steps >= 1) expect(Math.abs(v)).toBeLessThan(1e-12);
          if (s === `Z${q}`) expect(Math.abs(at(Math.PI) - (-1) ** steps)).toBeLessThan(1e-12);
        }
      }),
      { seed: 4242, numRuns: 40 },
    );
  });
});

const ONE_Q = ['x', 'y', 'z', 'h', 's', 'sdg', 'sx', 'rx', 'ry', 'rz'] as const;
const TWO_Q = ['rzz', 'cx', 'cz'] as const;
const ROT = new Set(['rx', 'ry', 'rz', 'rzz']);

/** A random gate of the whole gate set on n qubits; rotation angles at Clifford points or generic. */
const arbGate = (n: number) =>
  fc
    .tuple(
      n >= 2 ? fc.constantFrom<string>(...ONE_Q, ...TWO_Q) : fc.constantFrom<string>(...ONE_Q),
      fc.integer({ min: 0, max: n - 1 }),
      fc.integer({ min: 1, max: Math.max(1, n - 1) }),
      fc.oneof(fc.integer({ min: -4, max: 4 }).map((k) => k * HALF_PI), fc.double({ min: -7, max: 7, noNaN: true })),
    )
    .map(([name, a, d, t]) => {
      const qubits = (TWO_Q as readonly string[]).includes(name) ? [a, (a + d) % n] : [a];
      return ROT.has(name) ? { name, qubits, params: [t] } : { name, qubits };
    });

const arbGatesCase = fc.integer({ min: 1, max: 7 }).chain((n) =>
  fc.record({ n: fc.constant(n), gates: fc.array(arbGate(n), { minLength: 1, maxLength: 40, size: 'max' }), observable: arbObservable(n) }),
);

describe('exact engines agree on random gate lists (gates family, whole gate set)', () => {
  it('statevector variants, propagation, light cone, every runMethod and quantum-circuit give one value', () => {
    fc.assert(
      fc.property(arbGatesCase, ({ n, gates, observable }) => {
        const ch = loadChallenge({
          id: 'gates', version: 1, title: 'gates', description: '', lattice: { kind: 'edges', n, edges: [] },
          circuit: { family: 'gates', qubits: n, gates }, observables: [observable],
        } as unknown as ChallengeSpec);
        const runner = new ReferenceRunner(ch);
        const inst = ch.instances[0];
        const obs = ch.observables[0];
        const circ = runner.circuit(inst);
        const ref = qcExpectation(n, circ.gates, obs);
        const close = (v: number, what: string) => expect(Math.abs(v - ref), what).toBeLessThan(1e-9);
        close(statevectorExpectation(circ, obs).value, 'statevector');
        close(statevectorExpectation(circ, obs, { engine: 'js' }).value, 'statevector js');
        close(statevectorExpectation(circ, obs, { noFusion: true }).value, 'statevector unfused');
        close(statevectorExpectation({ ...circ, layers: [] }, obs).value, 'statevector without layer hints');
        const pp = propagate(circ, obs);
        expect(pp.exact).toBe(true);
        close(pp.value, 'propagation');
        const lc = lightCone(circ, obs);
        close(lightConeStatevectorValue(lc.circuit, lc.observable as ObservableSpec).value, 'light cone');
        for (const method of ['pauli-propagation', 'light-cone-statevector', 'statevector'] as const) {
          for (const perTerm of [false, true]) {
            const r = runner.runMethod({ method, perTerm }, inst, obs);
            expect(r.ok).toBe(true);
            if (r.ok) close(r.value, `${method}${perTerm ? ' per term' : ''}`);
          }
        }
        const chosen = runner.run(ch.targets[0]);
        expect(chosen.value).not.toBeNull();
        if (chosen.value !== null) close(chosen.value, 'chosen method');
      }),
      { seed: 31337, numRuns: 40 },
    );
  });
});

describe('multi-word registers (n > 32): qubits on both sides of the 32-bit word boundary', () => {
  const arbWide: fc.Arbitrary<LatticeSpec> = fc.oneof(
    fc.integer({ min: 33, max: 70 }).map((n): LatticeSpec => ({ kind: 'chain', n })),
    fc.integer({ min: 33, max: 70 }).map((n): LatticeSpec => ({ kind: 'ring', n })),
    fc.constant<LatticeSpec>({ kind: 'square', rows: 6, cols: 7 }),
    fc.constant<LatticeSpec>({ kind: 'heavy-hex', rows: 2, cols: 2 }),
    fc.integer({ min: 33, max: 64 }).chain((n) =>
      fc
        .uniqueArray(fc.tuple(fc.integer({ min: 0, max: n - 1 }), fc.integer({ min: 0, max: n - 1 })).filter(([a, b]) => a !== b), {
          minLength: 20, maxLength: 60, selector: ([a, b]) => `${Math.min(a, b)},${Math.max(a, b)}`,
        })
        .map((edges): LatticeSpec => ({ kind: 'edges', n, edges })),
    ),
  );
  const nearBoundary = fc.uniqueArray(fc.integer({ min: 29, max: 34 }), { minLength: 1, maxLength: 3 });
  it('propagation on the whole register equals the light-cone statevector and free fermions', () => {
    fc.assert(
      fc.property(arbWide, fc.integer({ min: 1, max: 2 }), arbThetaH, arbThetaJ, nearBoundary, fc.array(fc.constantFrom('X', 'Y', 'Z'), { minLength: 3, maxLength: 3 }), (lattice, steps, thetaH, thetaJ, qs, ops) => {
        const pauli = qs.map((q, i) => `${ops[i]}${q}`).join(' ');
        const c: Case = { lattice, steps, thetaH, thetaJ, observable: { id: 'o', terms: [{ coef: 0.75, pauli }, { coef: -0.5, pauli: `Z${qs[0]}` }] } };
        if (pauli === `Z${qs[0]}`) c.observable = { id: 'o', pauli };
        const ch = challengeOf(c);
        const runner = new ReferenceRunner(ch, { coneQubitLimit: 16 });
        const inst = ch.instances[0];
        const obs = ch.observables[0];
        // only cones the test can afford (the planner's own restriction, per term)
        fc.pre(obs.terms.every((t) => runner.planner.restrict(inst, { id: 't', terms: [t] }).circuit.nQubits <= 16));
        const pp = propagate(runner.circuit(inst), obs);
        expect(pp.exact).toBe(true);
        const lcsv = runner.runMethod({ method: 'light-cone-statevector', perTerm: true }, inst, obs);
        expect(lcsv.ok && Math.abs(lcsv.value - pp.value) < TOL).toBe(true);
        if (lattice.kind === 'chain' && freeFermionUnsupportedReason(ch.nQubits, obs) === null) {
          const ff = runner.runMethod({ method: 'free-fermion' }, inst, obs);
          expect(ff.ok && Math.abs(ff.value - pp.value) < TOL).toBe(true);
        }
      }),
      { seed: 5150, numRuns: 40 },
    );
  });
});

describe('free fermions on random chains (PHYSICS.md free-fermion section; the statevector is the check)', () => {
  it('sums of Z_j, X_j and Z_j Z_j+1 with coefficients, any angles, with and without the cone reduction', () => {
    const arbChain = fc.integer({ min: 1, max: 10 }).chain((n) =>
      fc.record({
        n: fc.constant(n),
        steps: fc.integer({ min: 0, max: 5 }),
        thetaH: fc.double({ min: -4, max: 4, noNaN: true }),
        thetaJ: fc.double({ min: -4, max: 4, noNaN: true }),
        terms: fc.uniqueArray(
          fc.tuple(fc.constantFrom('Z', 'X', 'ZZ'), fc.integer({ min: 0, max: n - 1 }), fc.double({ min: -2, max: 2, noNaN: true })).filter(([k, j]) => k !== 'ZZ' || j + 1 < n),
          { minLength: 1, maxLength: 4, size: 'max', selector: ([k, j]) => `${k}${j}` },
        ),
      }),
    );
    fc.assert(
      fc.property(arbChain, ({ n, steps, thetaH, thetaJ, terms }) => {
        const observable = { id: 'o', terms: terms.map(([k, j, coef]) => ({ coef, pauli: k === 'ZZ' ? `Z${j} Z${j + 1}` : `${k}${j}` })) };
        const ch = loadChallenge({
          id: 'ff', version: 1, title: 'ff', description: '', lattice: { kind: 'chain', n },
          circuit: { family: 'kicked-ising', steps: [steps], thetaH: [thetaH], thetaJ }, observables: [observable],
        });
        const obs = ch.observables[0];
        const circ = new ReferenceRunner(ch).circuit(ch.instances[0]);
        const sv = statevectorExpectation(circ, obs);
        for (const lightConeOn of [true, false]) {
          const ff = freeFermionExpectation({ n, thetaJ, thetaH, steps }, obs, { lightCone: lightConeOn });
          expect(ff.ok).toBe(true);
          if (!ff.ok) return;
          ff.termValues.forEach((v, k) => expect(Math.abs(v - sv.termValues[k])).toBeLessThan(1e-10));
          expect(Math.abs(ff.value - sv.value)).toBeLessThan(1e-10);
        }
      }),
      { seed: 1234, numRuns: 120 },
    );
  });
});
