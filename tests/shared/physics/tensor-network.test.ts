/**
 * The tensor-network rung (shared/physics/tensor-network/) against outside and independent exact
 * values. Sources, beside each check:
 * - the npm package quantum-circuit (an outside statevector; qc-reference.ts) and the project's own
 *   statevector, on random circuits of the whole gate set;
 * - the light-cone statevector on kicked-Ising circuits on every lattice kind;
 * - exact Pauli propagation at Clifford points on a 106-qubit heavy-hex patch, and PHYSICS.md's
 *   closed forms there (<Z_q> = 0 at thetaH = pi/2, (-1)^t at thetaH = pi);
 * - the free-fermion solver (PHYSICS.md, Valiant / Terhal-DiVincenzo) on long chains;
 * - known contraction widths: a ring of matrices contracts with 2-leg intermediates, and a chain's
 *   width is bounded by a constant in its length at fixed depth (common practice: the
 *   contraction follows the chain like a matrix product).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { CompiledCircuit, Gate, GateName, ObservableSpec, PauliFactor } from '../../../shared/physics/circuit';
import { loadChallenge } from '../../../shared/physics/challenge';
import { freeFermionExpectation } from '../../../shared/physics/free-fermion';
import { kickedIsing } from '../../../shared/physics/kicked-ising';
import { buildLattice, edgeColouring, heavyHex, type LatticeSpec } from '../../../shared/physics/lattices';
import { graphBall, lightCone } from '../../../shared/physics/light-cone';
import { lightConeStatevectorValue } from '../../../shared/physics/light-cone-statevector';
import { propagate } from '../../../shared/physics/pauli-propagation';
import { Planner, reasonText } from '../../../shared/physics/planner';
import { ReferenceRunner, type ReferenceValue } from '../../../shared/physics/reference';
import { statevectorExpectation } from '../../../shared/physics/statevector';
import {
  chooseSlices, contractPlan, contractSlice, eliminationTree, greedyTree, planTerm, rng, searchOrder, sliceForParallel, tensorNetworkExpectation, treeCost,
  PARALLEL_FLOPS, PARALLEL_OVERHEAD, PARALLEL_SLICES,
} from '../../../shared/physics/tensor-network/index';
import { OTHER_OVERHEAD_S, tnSeconds } from '../../../shared/physics/planner';
import { qcExpectation } from './qc-reference';

const HALF_PI = Math.PI / 2;
const TOL = 1e-10;
const ALL_GATES: GateName[] = ['x', 'y', 'z', 'h', 's', 'sdg', 'sx', 'rx', 'ry', 'rz', 'rzz', 'cx', 'cz'];

function randomCircuit(n: number, nGates: number, seed: number): CompiledCircuit {
  const r = rng(seed);
  const gates: Gate[] = [];
  for (let i = 0; i < nGates; i++) {
    const name = ALL_GATES[Math.floor(r() * ALL_GATES.length)];
    const two = name === 'rzz' || name === 'cx' || name === 'cz';
    if (two && n < 2) continue;
    const a = Math.floor(r() * n);
    const b = (a + 1 + Math.floor(r() * (n - 1))) % n;
    const g: Gate = { name, qubits: two ? [a, b] : [a] };
    if (name === 'rx' || name === 'ry' || name === 'rz' || name === 'rzz') g.params = [r() * 8 - 4];
    gates.push(g);
  }
  return { nQubits: n, gates, layers: [] };
}

function randomObservable(n: number, seed: number): ObservableSpec {
  const r = rng(seed);
  const ops = ['X', 'Y', 'Z'] as const;
  const terms = [];
  for (let k = 0; k < 3; k++) {
    const qs = new Set<number>();
    const w = 1 + Math.floor(r() * Math.min(3, n));
    while (qs.size < w) qs.add(Math.floor(r() * n));
    terms.push({ coef: [1, -0.5, 2.5][k], factors: [...qs].map((q) => ({ qubit: q, op: ops[Math.floor(r() * 3)] })) });
  }
  return { id: 'o', terms };
}

describe('tensor-network contraction equals statevectors on random circuits of the whole gate set', () => {
  it('matches quantum-circuit (npm, outside reference) and the project statevector to 1e-10, up to 10 qubits', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 10 }), fc.integer({ min: 1, max: 1e9 }), (n, seed) => {
        const c = randomCircuit(n, 12 + 3 * n, seed);
        const obs = randomObservable(n, seed + 1);
        const tn = tensorNetworkExpectation(c, obs, { restarts: 8 }).value;
        expect(Math.abs(tn - qcExpectation(n, c.gates, obs))).toBeLessThan(TOL);
        expect(Math.abs(tn - statevectorExpectation(c, obs).value)).toBeLessThan(TOL);
      }),
      { numRuns: 12, seed: 15 },
    );
  });

  it('matches the project statevector at 11 and 12 qubits with deep circuits', () => {
    for (const [n, seed] of [[11, 3], [12, 4], [12, 5]]) {
      const c = randomCircuit(n, 120, seed);
      const obs = randomObservable(n, seed * 7);
      const tn = tensorNetworkExpectation(c, obs, { restarts: 8 });
      expect(Math.abs(tn.value - statevectorExpectation(c, obs).value)).toBeLessThan(TOL);
      for (const t of tn.terms) expect(Math.abs(t.imag)).toBeLessThan(1e-12); // Hermitian: real value
    }
  });
});

const kiCircuit = (spec: LatticeSpec, steps: number, thetaH: number, thetaJ = -HALF_PI) => {
  const g = buildLattice(spec);
  return { g, c: kickedIsing(g.n, edgeColouring(g.n, g.edges), { steps, thetaH, thetaJ }) };
};

describe('tensor-network contraction equals the light-cone statevector on every lattice kind', () => {
  const cases: [LatticeSpec, number, string][] = [
    [{ kind: 'chain', n: 30 }, 6, 'X10 Z11 Y12'],
    [{ kind: 'ring', n: 24 }, 5, 'Z0 Z23'],
    [{ kind: 'square', rows: 5, cols: 5 }, 2, 'X12 Z13'],
    [{ kind: 'heavy-hex', rows: 2, cols: 3 }, 3, 'Y5 Z30'],
    [{ kind: 'edges', n: 12, edges: [[0, 1], [1, 2], [2, 3], [3, 4], [4, 5], [5, 6], [6, 7], [7, 8], [8, 9], [9, 10], [10, 11], [0, 6], [3, 9]] }, 3, 'X0 Z6'],
  ];
  for (const [spec, steps, pauli] of cases) {
    it(`${spec.kind}, ${steps} steps, ${pauli}`, () => {
      const { c } = kiCircuit(spec, steps, 0.83, 0.41);
      const factors: PauliFactor[] = pauli.split(' ').map((s) => ({ op: s[0] as 'X' | 'Y' | 'Z', qubit: Number(s.slice(1)) }));
      const obs: ObservableSpec = { id: 'o', terms: [{ coef: 1, factors }] };
      const lc = lightCone(c, obs);
      expect(lc.qubits.length).toBeLessThanOrEqual(21);
      const want = lightConeStatevectorValue(lc.circuit, lc.observable as ObservableSpec).value;
      const plan = planTerm(c, factors);
      expect(plan.coneQubits).toBe(lc.qubits.length);
      const [re, im] = contractPlan(plan);
      expect(Math.abs(re - want)).toBeLessThan(TOL);
      expect(Math.abs(im)).toBeLessThan(1e-12);
    });
  }
});

describe('tensor-network contraction on a 106-qubit heavy-hex patch', () => {
  const g = heavyHex(3, 5);
  const ball = (q: number, w: number) => {
    let qs = [q];
    for (let r = 1; qs.length < w; r++) qs = graphBall(g.n, g.edges, [q], r);
    return qs.slice(0, w);
  };
  it('equals exact Pauli propagation at Clifford points, and PHYSICS.md closed forms', () => {
    expect(g.n).toBe(106);
    for (const [thetaH, steps] of [[HALF_PI, 4], [Math.PI, 3], [HALF_PI, 3]] as const) {
      const c = kickedIsing(g.n, edgeColouring(g.n, g.edges), { steps, thetaH, thetaJ: -HALF_PI });
      for (const [q, w, op] of [[20, 1, 'Z'], [33, 3, 'X'], [20, 6, 'Z'], [60, 4, 'Y']] as const) {
        const factors = ball(q, w).map((qubit) => ({ qubit, op }));
        const obs = { id: 'o', terms: [{ coef: 1, factors }] };
        const pp = propagate(c, obs);
        expect(pp.exact).toBe(true);
        const tn = tensorNetworkExpectation(c, obs, { restarts: 16 });
        expect(Math.abs(tn.value - pp.value)).toBeLessThan(TOL);
        expect([-1, 0, 1].some((v) => Math.abs(tn.value - v) < 1e-10)).toBe(true);
        if (w === 1 && op === 'Z') expect(tn.value).toBeCloseTo(thetaH === HALF_PI ? 0 : (-1) ** steps, 10);
      }
    }
  });

  it('contracts a weight-10 Z observable at 5 steps (light cone over 40 qubits) within seconds', () => {
    const c = kickedIsing(g.n, edgeColouring(g.n, g.edges), { steps: 5, thetaH: 0.7, thetaJ: -HALF_PI });
    const factors = ball(20, 10).map((qubit) => ({ qubit, op: 'Z' as const }));
    const plan = planTerm(c, factors);
    expect(plan.coneQubits).toBeGreaterThan(27); // beyond the statevector's limit
    expect(plan.width).toBeLessThanOrEqual(18);
    const [re, im] = contractPlan(plan);
    expect(Math.abs(re)).toBeLessThanOrEqual(1);
    expect(Math.abs(im)).toBeLessThan(1e-12);
    // the same value at the mirrored angle (PHYSICS.md symmetry: Z-only strings are even in thetaH)
    const cm = kickedIsing(g.n, edgeColouring(g.n, g.edges), { steps: 5, thetaH: -0.7, thetaJ: -HALF_PI });
    expect(Math.abs(contractPlan(planTerm(cm, factors))[0] - re)).toBeLessThan(TOL);
  });
});

describe('tensor-network contraction equals free fermions on long chains', () => {
  it('bulk Z, X and ZZ on a 300-site chain at 6 steps', () => {
    const n = 300;
    const { c } = kiCircuit({ kind: 'chain', n }, 6, 0.9, -0.35);
    for (const pauli of ['Z150', 'X77', 'Z200 Z201', 'Z3']) {
      const factors: PauliFactor[] = pauli.split(' ').map((s) => ({ op: s[0] as 'X' | 'Z', qubit: Number(s.slice(1)) }));
      const obs = { id: 'o', terms: [{ coef: 1, factors }] };
      const ff = freeFermionExpectation({ n, thetaJ: -0.35, thetaH: 0.9, steps: 6 }, obs);
      if (!ff.ok) throw new Error(ff.reason);
      expect(Math.abs(tensorNetworkExpectation(c, obs).value - ff.value), pauli).toBeLessThan(TOL);
    }
  });
});

describe('two independent exact methods beyond 26 qubits', () => {
  it('a 27-qubit light cone on an 80-site chain at 14 steps: contraction equals free fermions to 1e-10', () => {
    // the free-fermion solver (Majorana covariance; PHYSICS.md) shares no code with the
    // contraction; the cone is past the statevector's fast kernel. Measured: width 22, about 14 s
    // on a loaded core.
    const n = 80;
    const { c } = kiCircuit({ kind: 'chain', n }, 14, 0.9, -0.35);
    const factors: PauliFactor[] = [{ qubit: 40, op: 'Z' }];
    const obs: ObservableSpec = { id: 'o', terms: [{ coef: 1, factors }] };
    expect(lightCone(c, obs).qubits.length).toBe(27);
    const plan = planTerm(c, factors, { restarts: 8 });
    const ff = freeFermionExpectation({ n, thetaJ: -0.35, thetaH: 0.9, steps: 14 }, obs);
    if (!ff.ok) throw new Error('free fermions refused the chain');
    const [re, im] = contractPlan(plan);
    expect(Math.abs(re - ff.value)).toBeLessThan(TOL);
    expect(Math.abs(im)).toBeLessThan(1e-12);
    expect(Math.abs(re)).toBeGreaterThan(1e-3); // not a trivial zero
  }, 120_000);
});

describe('contraction widths of known networks', () => {
  it('a ring of 60 matrices contracts with intermediates of 2 legs (common practice: trace of a product)', () => {
    const leaves = Array.from({ length: 60 }, (_, i) => [i, (i + 1) % 60]);
    const s = searchOrder(leaves, 60, { restarts: 4 });
    expect(s.cost.width).toBe(2);
  });

  it("a chain's width stays bounded as the chain grows at fixed depth (all-Z string over the whole chain)", () => {
    const widths: number[] = [];
    for (const n of [12, 24, 48, 96]) {
      const { c } = kiCircuit({ kind: 'chain', n }, 3, 0.7, 0.4);
      const factors = Array.from({ length: n }, (_, qubit) => ({ qubit, op: 'Z' as const }));
      const plan = planTerm(c, factors, { restarts: 16 });
      widths.push(plan.width);
      if (n === 12) {
        const obs = { id: 'o', terms: [{ coef: 1, factors }] };
        expect(Math.abs(contractPlan(plan)[0] - statevectorExpectation(c, obs).value)).toBeLessThan(TOL);
      }
    }
    expect(Math.max(...widths)).toBeLessThanOrEqual(Math.min(...widths) + 2);
    expect(Math.max(...widths)).toBeLessThanOrEqual(10);
  });

  it('the order search is seeded (same seed, same tree) and beats or ties its own first greedy run', () => {
    const { c } = kiCircuit({ kind: 'heavy-hex', rows: 2, cols: 2 }, 4, 0.7);
    const a = planTerm(c, [{ qubit: 10, op: 'X' }], { seed: 9 });
    const b = planTerm(c, [{ qubit: 10, op: 'X' }], { seed: 9 });
    expect(a.pairs).toEqual(b.pairs);
    const legs = a.leaves.map((t) => t.legs);
    const first = treeCost(legs, a.nLegs, greedyTree(legs, a.nLegs, { alpha: 1, temperature: 0 }, rng(1)));
    expect(a.flops).toBeLessThanOrEqual(first.flops);
  });
});

describe('elimination orders (min-fill and min-degree on the index graph)', () => {
  it('every elimination tree is a full binary tree over the leaves, and the search is never wider than its own orders', () => {
    for (const [spec, steps, q] of [[{ kind: 'square', rows: 4, cols: 4 }, 4, 5], [{ kind: 'heavy-hex', rows: 2, cols: 2 }, 5, 10], [{ kind: 'chain', n: 20 }, 6, 9]] as const) {
      const { c } = kiCircuit(spec as LatticeSpec, steps, 0.61, 0.37);
      const plan = planTerm(c, [{ qubit: q, op: 'Z' }], { restarts: 8 });
      const legs = plan.leaves.map((t) => t.legs);
      for (const heuristic of ['min-fill', 'min-degree'] as const) {
        const t = eliminationTree(legs, plan.nLegs, { heuristic, temperature: 0 }, rng(3));
        expect(t).not.toBeNull();
        const tree = t as NonNullable<typeof t>;
        expect(tree.pairs.length).toBe(legs.length - 1);
        const used = new Set<number>();
        tree.pairs.forEach(([a, b], s) => {
          for (const x of [a, b]) {
            expect(x).toBeLessThan(legs.length + s); // only ids made before this step
            expect(used.has(x)).toBe(false); // each id consumed once
            used.add(x);
          }
        });
        expect(plan.width).toBeLessThanOrEqual(treeCost(legs, plan.nLegs, tree).width);
      }
      // and the chosen tree still gives the light-cone statevector's value
      const obs: ObservableSpec = { id: 'o', terms: [{ coef: 1, factors: [{ qubit: q, op: 'Z' }] }] };
      const lc = lightCone(c, obs);
      expect(Math.abs(contractPlan(plan)[0] - lightConeStatevectorValue(lc.circuit, lc.observable as ObservableSpec).value)).toBeLessThan(TOL);
    }
  });

  it('a deep two-dimensional light cone (square 6 x 6, 6 steps, 35 qubits) gets a far cheaper tree than pairwise greedy', () => {
    // common practice: contraction orders from tree decompositions of the line graph (Markov and
    // Shi 2008) beat pairwise greedy on deep circuits. Measured on this network (memory unlimited,
    // so the search minimises flops): greedy width 44, 2^65 flops; search width 30 to 33,
    // 2^39.4 to 2^42.8 flops for 8 to 64 restarts
    const { c } = kiCircuit({ kind: 'square', rows: 6, cols: 6 }, 6, 0.7, 0.4);
    const plan = planTerm(c, [{ qubit: 14, op: 'Z' }], { restarts: 16, memoryBytes: 2 ** 40 });
    expect(plan.coneQubits).toBe(35);
    const legs = plan.leaves.map((t) => t.legs);
    const greedy = treeCost(legs, plan.nLegs, greedyTree(legs, plan.nLegs, { alpha: 1, temperature: 0 }, rng(1)));
    expect(plan.width).toBeLessThanOrEqual(33);
    expect(plan.width).toBeLessThanOrEqual(greedy.width - 8);
    expect(Math.log2(plan.flops)).toBeLessThanOrEqual(Math.log2(greedy.flops) - 6);
    // past PARALLEL_FLOPS the plan is cut for the slice threads: at least PARALLEL_SLICES slices,
    // at most PARALLEL_OVERHEAD times the work of the same tree unsliced
    const unsliced = treeCost(legs, plan.nLegs, { nLeaves: legs.length, pairs: plan.pairs });
    expect(unsliced.flops).toBeGreaterThan(PARALLEL_FLOPS);
    expect(plan.slices).toBeGreaterThanOrEqual(PARALLEL_SLICES);
    expect(plan.flops).toBeLessThanOrEqual(PARALLEL_OVERHEAD * unsliced.flops);
  });
});

describe('slicing', () => {
  it('a memory budget forces sliced indices; slices are independent and sum to the unsliced value', () => {
    const { c } = kiCircuit({ kind: 'heavy-hex', rows: 2, cols: 2 }, 4, 0.77, 0.3);
    const factors: PauliFactor[] = [{ qubit: 10, op: 'X' }, { qubit: 11, op: 'Z' }];
    const full = planTerm(c, factors);
    const small = planTerm(c, factors, { memoryBytes: 96 * 2 ** (full.width - 3) });
    expect(small.slices).toBeGreaterThan(1);
    expect(small.width).toBeLessThanOrEqual(full.width - 3);
    let re = 0;
    for (let i = small.slices - 1; i >= 0; i--) re += contractSlice(small, i)[0]; // any order
    const want = contractPlan(full)[0];
    expect(Math.abs(re - want)).toBeLessThan(TOL);
    const lc = lightCone(c, { id: 'o', terms: [{ coef: 1, factors }] });
    expect(Math.abs(want - lightConeStatevectorValue(lc.circuit, lc.observable as ObservableSpec).value)).toBeLessThan(TOL);
    expect(() => contractSlice(small, small.slices)).toThrow(/out of range/);
  });

  it('under a memory budget the plan is never dearer than the fewest-flops tree sliced to the same width', () => {
    // the search steered by the memory width can settle on a tree that slices badly (measured on the
    // demo braid's 8-step energy term: 2^48.5 flops over 8192 slices, against 2^39.6 for the
    // memory-blind tree sliced afterwards); planTerm keeps the cheaper of the two
    for (const [spec, steps, q] of [[{ kind: 'heavy-hex', rows: 2, cols: 2 }, 4, 10], [{ kind: 'square', rows: 5, cols: 5 }, 4, 12]] as const) {
      const { c } = kiCircuit(spec as LatticeSpec, steps, 0.77, 0.3);
      const factors: PauliFactor[] = [{ qubit: q, op: 'X' }, { qubit: q + 1, op: 'Z' }];
      const full = planTerm(c, factors);
      const maxWidth = full.width - 3;
      const plan = planTerm(c, factors, { memoryBytes: 96 * 2 ** maxWidth });
      expect(plan.width).toBeLessThanOrEqual(maxWidth);
      const legs = plan.leaves.map((t) => t.legs);
      const free = searchOrder(legs, plan.nLegs, { restarts: Math.max(8, Math.min(64, Math.round(20000 / legs.length))), targetWidth: Number.MAX_SAFE_INTEGER });
      const freeSliced = treeCost(legs, plan.nLegs, free.tree, chooseSlices(legs, plan.nLegs, free.tree, maxWidth, 16));
      expect(plan.flops).toBeLessThanOrEqual(freeSliced.flops);
      let re = 0;
      for (let i = 0; i < plan.slices; i++) re += contractSlice(plan, i)[0];
      expect(Math.abs(re - contractPlan(full)[0])).toBeLessThan(TOL);
    }
  });

  it('slices for parallel work stay within the allowed extra flops and sum to the unsliced value', () => {
    const { c } = kiCircuit({ kind: 'square', rows: 4, cols: 4 }, 4, 0.77, 0.3);
    const full = planTerm(c, [{ qubit: 5, op: 'X' }, { qubit: 6, op: 'Y' }]);
    expect(full.slices).toBe(1);
    const legs = full.leaves.map((t) => t.legs);
    const tree = { nLeaves: legs.length, pairs: full.pairs };
    const base = treeCost(legs, full.nLegs, tree).flops;
    for (const overhead of [1, 1.15, 4]) {
      const sliced = sliceForParallel(legs, full.nLegs, tree, [], 8, overhead);
      expect(sliced.length).toBeLessThanOrEqual(3); // stops at 8 slices
      expect(new Set(sliced).size).toBe(sliced.length);
      expect(treeCost(legs, full.nLegs, tree, sliced).flops).toBeLessThanOrEqual(overhead * base);
      if (overhead === 4) expect(sliced.length).toBe(3);
      const plan = { ...full, sliced, slices: 2 ** sliced.length };
      let re = 0;
      for (let i = 0; i < plan.slices; i++) re += contractSlice(plan, i)[0];
      expect(Math.abs(re - contractPlan(full)[0])).toBeLessThan(TOL);
    }
  });
});

describe('planner and reference runner with the tensor-network rung', () => {
  const ki = (lattice: LatticeSpec, steps: number[], thetaH: number[], observables: { id: string; pauli?: string; terms?: { coef: number; pauli: string }[] }[]) =>
    loadChallenge({ id: 'tn', version: 1, title: 'tn', description: '', lattice, circuit: { family: 'kicked-ising', steps, thetaH }, observables });

  it('a cone beyond the statevector limit gets an exact value by contraction, with width, flops and slices', () => {
    const ch = ki({ kind: 'heavy-hex', rows: 3, cols: 5 }, [5], [0.7], [{ id: 'zs', pauli: 'Z20 Z5 Z25 Z26 Z6 Z47 Z21 Z4' }]);
    const runner = new ReferenceRunner(ch);
    const plan = runner.plan(ch.targets[0]);
    expect(plan.cone.qubits).toBeGreaterThan(27);
    expect(plan.method).toBe('tensor-network');
    const est = plan.estimates.find((e) => e.method === 'tensor-network');
    expect(est?.tn?.width).toBeGreaterThan(0);
    const lc = plan.estimates.find((e) => e.method === 'light-cone-statevector');
    expect(lc?.why?.code).toBe('cone-limit');
    expect(lc?.reason).toBe(reasonText(lc!.why!));
    const r = runner.run(ch.targets[0], plan) as ReferenceValue;
    expect(r.method).toBe('tensor-network');
    // the planner costed the very plan the runner contracts (same seeded search)
    expect(r.width).toBe(est?.tn?.width);
    expect(r.flops).toBe(est?.tn?.flops);
    expect(r.detail).toMatch(/^tensor-network contraction of the light cone, width \d+, 2\^[\d.]+ flops/);
  });

  it('a sliced term is costed at its contraction time shared by the slice threads; the plan itself does not depend on them', () => {
    const ch = ki({ kind: 'heavy-hex', rows: 3, cols: 5 }, [5], [0.7], [{ id: 'zs', pauli: 'Z20 Z5 Z25 Z26 Z6 Z47 Z21 Z4' }]);
    const width = new Planner(ch, { tnSearch: true }).plan(ch.targets[0]).estimates.find((e) => e.method === 'tensor-network')!.tn!.width;
    const est = (tnThreads: number) => {
      // a memory budget three below the unsliced width: 8 or more slices
      const p = new Planner(ch, { tnSearch: true, tnMemoryBytes: 96 * 2 ** (width - 3), tnThreads }).plan(ch.targets[0]);
      return p.estimates.find((e) => e.method === 'tensor-network')!;
    };
    const one = est(1), four = est(4);
    expect(one.tn!.slices).toBeGreaterThan(4);
    expect(four.tn!.flops).toBe(one.tn!.flops);
    expect(four.tn!.slices).toBe(one.tn!.slices);
    for (const [e, threads] of [[one, 1], [four, 4]] as const) {
      const want = e.tn!.terms.reduce((s, t) => s + OTHER_OVERHEAD_S + t.searchSeconds + tnSeconds(t) / Math.min(t.slices, threads), 0);
      expect(e.seconds).toBeCloseTo(want, 9);
    }
    // the contraction part shrinks four-fold (the search time is measured, so compare without it)
    const work = (e: typeof one) => e.seconds - e.tn!.terms.reduce((s, t) => s + OTHER_OVERHEAD_S + t.searchSeconds, 0);
    expect(work(four)).toBeCloseTo(work(one) / 4, 9);
  });

  it('small cones are cross-checked by a second exact method and the agreement recorded', () => {
    const ch = ki({ kind: 'square', rows: 4, cols: 4 }, [2], [0.6], [{ id: 'x5', pauli: 'X5 Z6' }]);
    const r = new ReferenceRunner(ch).run(ch.targets[0]) as ReferenceValue;
    expect(r.value).not.toBeNull();
    expect(r.crossCheck?.method).toBe('tensor-network');
    expect(r.crossCheck!.absDiff).toBeLessThan(TOL);
    expect(r.detail).toMatch(/cross-checked by tensor-network contraction, \|diff\| \d/);
  });

  it('a sum is quoted per term: the widest single-term cone names its term', () => {
    const ch = ki({ kind: 'heavy-hex', rows: 3, cols: 5 }, [9], [0.7], [{ id: 'sum', terms: [{ coef: 0.5, pauli: 'Z0' }, { coef: 0.5, pauli: 'X40' }] }]);
    const planner = new Planner(ch, { secondsBudget: 1 });
    const p = planner.plan(ch.targets[0]);
    const lc = p.estimates.find((e) => e.method === 'light-cone-statevector');
    expect(lc?.why?.code).toBe('cone-limit');
    expect(lc?.reason).toMatch(/the widest single-term cone \d+ qubits \(term 2\)/);
  });

  it('exact Pauli propagation past its loose bound is attempted under the term budget, not refused', () => {
    const ch = ki({ kind: 'square', rows: 4, cols: 4 }, [3], [0.6], [{ id: 'z5', pauli: 'Z5' }]);
    const planner = new Planner(ch, { termBudget: 100, secondsBudget: 1 });
    const p = planner.plan(ch.targets[0]);
    const pp = p.estimates.find((e) => e.method === 'pauli-propagation');
    expect(pp?.attempt).toBe(true);
    expect(pp?.why?.code).toBe('term-bound');
  });
});
