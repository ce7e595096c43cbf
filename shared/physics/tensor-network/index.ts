/**
 * Exact expectation values <0...0| U^dag O U |0...0> by tensor-network contraction (the third rung
 * of the exact methods, after the statevector and the light-cone statevector; PHYSICS.md "Exact
 * tensor-network contraction").
 *
 * For each Pauli term of O: restrict the circuit to the term's backward light cone (light-cone.ts),
 * build the closed network (network.ts: diagonal gates on shared wire indices, rank
 * simplification), search a contraction order (path.ts: seeded greedy restarts plus subtree
 * reconfiguration), choose sliced indices so the widest intermediate fits the memory budget, and
 * contract. Everything about the cost (width, flops, memory, slices) is known from `planTerm`
 * before any contraction runs. Slices are independent: `contractSlice(plan, i)` computes slice i of
 * plan.slices and the value is the sum over i, so slices can run on worker threads or as separate
 * jobs (the plan is plain data: arrays and typed arrays, structured-clone safe).
 *
 * No framework or node: imports.
 */
import type { CompiledCircuit, ObservableSpec, PauliFactor } from '../circuit';
import { lightCone } from '../light-cone';
import { contractPair, pairLayout, sliceTensor, type Tensor } from './kernels';
import { buildNetwork, simplifyNetwork } from './network';
import { chooseSlices, MAX_SLICED, sliceForParallel, searchOrder, treeCost, type ContractionTree, type SearchOptions, type TreeCost } from './path';

export { contractPair, gemmSplit, pairLayout, permuteSplit, type Tensor } from './kernels';
export { buildNetwork, simplifyNetwork, type Network } from './network';
export { chooseSlices, MAX_SLICED, eliminationTree, sliceForParallel, greedyTree, reconfigure, rng, searchOrder, treeCost, type ContractionTree, type EliminationParams, type TreeCost } from './path';


/**
 * A contraction of more than PARALLEL_FLOPS flops (about half a minute on one core) is cut into at
 * least PARALLEL_SLICES slices when that adds at most PARALLEL_OVERHEAD of work, so slice threads
 * and slice jobs can share it. The rule does not depend on the machine: a plan (and so the summation
 * order of a reference) is the same for every thread count.
 */
export const PARALLEL_FLOPS = 2 ** 34;
export const PARALLEL_SLICES = 8;
export const PARALLEL_OVERHEAD = 1.15;

/** Default memory budget for one contraction: 2 GiB (width about 26 after the scratch copies). */
export const DEFAULT_TN_MEMORY_BYTES = 2 * 1024 ** 3;

export interface TnOptions extends SearchOptions {
  /** largest estimated peak bytes of one slice (default DEFAULT_TN_MEMORY_BYTES) */
  memoryBytes?: number;
}

export interface TnTermPlan {
  /** leaf tensors after light-cone restriction and rank simplification */
  leaves: Tensor[];
  nLegs: number;
  /** SSA contraction steps: step s contracts ids [a, b] into id leaves.length + s */
  pairs: [number, number][];
  /** legs summed at each step (hyperedges close only when their last holder is reached) */
  sumLegs: number[][];
  /** sliced legs; slice i fixes sliced[j] to bit j of i */
  sliced: number[];
  slices: number;
  /** width per slice, total flops over all slices, peak bytes of one slice */
  width: number;
  flops: number;
  memoryBytes: number;
  /** pairwise steps over all slices (the planner's cost model) */
  steps: number;
  /** the scalar collected during simplification */
  scalar: [number, number];
  /** light-cone qubits of the term */
  coneQubits: number;
  /** best width over the plain greedy restarts (for the bench's order-search check) */
  greedyWidth: number;
}

function memoryWidth(bytes: number): number {
  // a step holds two inputs, the output (interleaved) and split copies: about 6 x 16 x 2^width bytes
  return Math.max(1, Math.floor(Math.log2(bytes / 96)));
}

/** Plan one Pauli string on a circuit (the circuit is restricted to its light cone first). */
export function planTerm(circuit: CompiledCircuit, factors: readonly PauliFactor[], opts: TnOptions = {}): TnTermPlan {
  const lc = lightCone(circuit, factors);
  const local = factors.map((f) => ({ qubit: lc.toLocal[f.qubit], op: f.op }));
  return planNetwork(lc.circuit, local, opts);
}

/** Plan a Pauli string on a circuit already restricted to its light cone. */
export function planNetwork(circuit: CompiledCircuit, factors: readonly PauliFactor[], opts: TnOptions = {}): TnTermPlan {
  const net = simplifyNetwork(buildNetwork(circuit, factors));
  const leaves = net.tensors;
  const legs = leaves.map((t) => t.legs);
  const maxWidth = memoryWidth(opts.memoryBytes ?? DEFAULT_TN_MEMORY_BYTES);
  let pairs: [number, number][] = [];
  let cost: TreeCost = { width: 0, flops: 0, memoryBytes: 0 };
  let sliced: number[] = [];
  let greedyWidth = 0;
  if (leaves.length > 1) {
    // restarts: 64 on small networks, fewer on large ones (the search is about linear in both)
    const restarts = opts.restarts ?? Math.max(8, Math.min(64, Math.round(20000 / leaves.length)));
    // slicing past MAX_SLICED indices is hopeless (each doubles the work): such plans stay wide,
    // their memory estimate then exceeds the budget and the planner refuses them
    const sliceTo = (tree: ContractionTree, c: TreeCost) => {
      const cut = c.width - maxWidth <= MAX_SLICED ? chooseSlices(legs, net.nLegs, tree, maxWidth, MAX_SLICED) : [];
      return { tree, sliced: cut, cost: cut.length ? treeCost(legs, net.nLegs, tree, cut) : c };
    };
    const s = searchOrder(legs, net.nLegs, { targetWidth: maxWidth, ...opts, restarts });
    let pick = sliceTo(s.tree, s.cost);
    if (s.cost.width > maxWidth && s.cost.width - maxWidth <= MAX_SLICED) {
      // the search steered by the memory width can settle on a tree that slices badly; a search for
      // the fewest flops whatever the width, sliced afterwards, is sometimes far cheaper (the braid's
      // 8-step energy term: 2^48.5 flops over 8192 slices steered, 2^39.6 over 16 this way)
      const free = searchOrder(legs, net.nLegs, { ...opts, restarts, targetWidth: Number.MAX_SAFE_INTEGER });
      const alt = sliceTo(free.tree, free.cost);
      const fits = (x: typeof pick) => x.cost.width <= maxWidth;
      if ((fits(alt) && !fits(pick)) || (fits(alt) === fits(pick) && alt.cost.flops < pick.cost.flops)) pick = alt;
    }
    pairs = pick.tree.pairs;
    greedyWidth = s.bestRestartWidth;
    sliced = pick.sliced;
    cost = pick.cost;
    if (cost.flops > PARALLEL_FLOPS && sliced.length < MAX_SLICED && cost.width <= maxWidth) {
      sliced = sliceForParallel(legs, net.nLegs, pick.tree, sliced, PARALLEL_SLICES, PARALLEL_OVERHEAD);
      cost = treeCost(legs, net.nLegs, pick.tree, sliced);
    }
  } else if (leaves.length === 1) {
    cost = { width: leaves[0].legs.length, flops: 0, memoryBytes: 16 * 2 ** leaves[0].legs.length };
  }
  // legs summed at each step: count holders inside each subtree
  const total = new Int32Array(net.nLegs);
  for (const l of legs) for (const x of l) total[x]++;
  const counts: Map<number, number>[] = legs.map((l) => new Map(l.map((x) => [x, 1])));
  const sumLegs: number[][] = [];
  for (const [a, b] of pairs) {
    const m = new Map(counts[a]);
    for (const [x, c] of counts[b]) m.set(x, (m.get(x) ?? 0) + c);
    const sum: number[] = [];
    for (const [x, c] of m) if (c === total[x]) { sum.push(x); m.delete(x); }
    counts.push(m);
    sumLegs.push(sum);
  }
  return {
    leaves, nLegs: net.nLegs, pairs, sumLegs, sliced, slices: 2 ** sliced.length,
    width: cost.width, flops: cost.flops, memoryBytes: cost.memoryBytes, steps: cost.steps ?? 0, scalar: net.scalar,
    coneQubits: circuit.nQubits, greedyWidth,
  };
}

/** Contract slice i of plan.slices; returns [re, im] (the scalar factor included). */
export interface ContractOptions {
  /** called before every pairwise step (throw from it to stop the contraction) */
  onStep?: () => void;
}

export function contractSlice(plan: TnTermPlan, i: number, opts: ContractOptions = {}): [number, number] {
  if (!Number.isInteger(i) || i < 0 || i >= plan.slices) throw new RangeError(`slice ${i} out of range 0..${plan.slices - 1}`);
  const fixed = new Map<number, number>();
  plan.sliced.forEach((leg, j) => fixed.set(leg, (i >> j) & 1));
  const ts: (Tensor | null)[] = plan.leaves.map((t) => (fixed.size ? sliceTensor(t, fixed) : t));
  plan.pairs.forEach(([a, b], s) => {
    opts.onStep?.();
    const A = ts[a] as Tensor, B = ts[b] as Tensor;
    const sum = new Set(plan.sumLegs[s]);
    ts[a] = null;
    ts[b] = null;
    ts.push(contractPair(A, B, pairLayout(A.legs, B.legs, (l) => sum.has(l))));
  });
  const last = ts[ts.length - 1] as Tensor | null;
  if (!last || last.legs.length !== 0) {
    if (plan.leaves.length === 0) return [plan.scalar[0], plan.scalar[1]];
    throw new Error('tensor network: the contraction did not close to a scalar');
  }
  const [sr, si] = plan.scalar;
  const r = last.data[0], m = last.data[1];
  return [sr * r - si * m, sr * m + si * r];
}

/** Slices are summed in at most this many fixed blocks of consecutive slices (sliceBlocks). */
export const SLICE_BLOCKS = 64;

/**
 * The fixed blocks [start, end) in which the slices of a plan are summed: the partial sum of each
 * block runs in slice order, and the total adds the block partials in block order. The blocks
 * depend on the slice count only, never on how many threads or jobs compute them, so a plan's value
 * is the same number (bit for bit) however its blocks are spread.
 */
export function sliceBlocks(slices: number): [number, number][] {
  const size = Math.max(1, Math.ceil(slices / SLICE_BLOCKS));
  const out: [number, number][] = [];
  for (let s = 0; s < slices; s += size) out.push([s, Math.min(slices, s + size)]);
  return out;
}

/** Contract slices start..end-1 of a plan and sum them in slice order. */
export function contractSliceRange(plan: TnTermPlan, start: number, end: number, opts: ContractOptions = {}): [number, number] {
  if (plan.leaves.length === 0) return start === 0 && end > 0 ? [plan.scalar[0], plan.scalar[1]] : [0, 0];
  let re = 0, im = 0;
  for (let i = start; i < end; i++) {
    const [a, b] = contractSlice(plan, i, opts);
    re += a;
    im += b;
  }
  return [re, im];
}

/** Adds block partials ([re0, im0, re1, im1, ...], in block order) into the value. */
export function sumBlocks(partials: ArrayLike<number>): [number, number] {
  let re = 0, im = 0;
  for (let b = 0; b + 1 < partials.length; b += 2) {
    re += partials[b];
    im += partials[b + 1];
  }
  return [re, im];
}

/** Contract every slice of a plan and sum, block by block (sliceBlocks). */
export function contractPlan(plan: TnTermPlan, opts: ContractOptions = {}): [number, number] {
  if (plan.leaves.length === 0) return [plan.scalar[0], plan.scalar[1]];
  const blocks = sliceBlocks(plan.slices);
  const partials = new Float64Array(2 * blocks.length);
  blocks.forEach(([s, e], b) => {
    const [re, im] = contractSliceRange(plan, s, e, opts);
    partials[2 * b] = re;
    partials[2 * b + 1] = im;
  });
  return sumBlocks(partials);
}

/** What a contraction cost: width (log2 of the largest intermediate), flops, slices, memory, cone and time. */
export interface TnCost {
  width: number;
  flops: number;
  slices: number;
  memoryBytes: number;
  coneQubits: number;
  wallMs: number;
}

export interface TnTermResult extends TnCost {
  value: number;
  /** imaginary part left over (rounding; a check) */
  imag: number;
}

/** The cost fields aggregate the terms: widest term, total flops, most slices, largest memory, widest cone. */
export interface TnResult extends TnCost {
  /** sum_k coef_k <P_k> */
  value: number;
  terms: TnTermResult[];
}

const now = () => (typeof performance !== 'undefined' ? performance.now() : Date.now());

/** Plans for every term of an observable (identity terms have no plan). */
export function planObservable(circuit: CompiledCircuit, obs: ObservableSpec, opts: TnOptions = {}): (TnTermPlan | null)[] {
  return obs.terms.map((t) => (t.factors.length === 0 ? null : planTerm(circuit, t.factors, opts)));
}

/** Exact <obs> by contraction, term by term. */
export function tensorNetworkExpectation(circuit: CompiledCircuit, obs: ObservableSpec, opts: TnOptions = {}, plans?: (TnTermPlan | null)[]): TnResult {
  const t0 = now();
  const terms: TnTermResult[] = [];
  let value = 0;
  obs.terms.forEach((t, k) => {
    const s = now();
    if (t.factors.length === 0) {
      value += t.coef;
      terms.push({ value: 1, imag: 0, width: 0, flops: 0, slices: 1, memoryBytes: 0, coneQubits: 0, wallMs: 0 });
      return;
    }
    const plan = plans?.[k] ?? planTerm(circuit, t.factors, opts);
    const [re, im] = contractPlan(plan);
    value += t.coef * re;
    terms.push({ value: re, imag: im, width: plan.width, flops: plan.flops, slices: plan.slices, memoryBytes: plan.memoryBytes, coneQubits: plan.coneQubits, wallMs: now() - s });
  });
  const agg = (f: (r: TnTermResult) => number) => terms.reduce((m, r) => Math.max(m, f(r)), 0);
  return {
    value, terms,
    width: agg((r) => r.width), flops: terms.reduce((a, r) => a + r.flops, 0), slices: agg((r) => r.slices),
    memoryBytes: agg((r) => r.memoryBytes), coneQubits: agg((r) => r.coneQubits), wallMs: now() - t0,
  };
}
