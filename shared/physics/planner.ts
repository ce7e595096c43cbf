/**
 * Reference planner: for every target, estimate the cost of each applicable exact method BEFORE
 * running any, then pick the cheapest feasible one, or record in a plain sentence why no exact
 * method is feasible.
 *
 * Methods and their cost models (estimates, not measurements; rates are stated constants):
 * - pauli-propagation (exact, no truncation), one run per observable term on that term's cone: a
 *   Clifford instance (every rotation angle a multiple of pi/2) never branches, so each run holds one
 *   string at any size. Otherwise a term can at most double at each non-Clifford rotation inside its
 *   light cone and never exceeds the 4^c strings on the c qubits its cone has reached so far (a
 *   bound like 2^k, capped). Accepted within the term budget. Work ~ sum over the cone's gates of
 *   the bound at that gate, at PROPAGATION_RATE term-gate updates/s.
 * - light-cone-statevector: the observable's (support-based) light cone has c <= coneQubitLimit
 *   qubits; work ~ 2^c amplitudes x gates in the cone at STATEVECTOR_RATE.
 * - free-fermion: chain lattice, kicked-ising family, observable a sum of Z_j, X_j, Z_j Z_j+1
 *   (free-fermion.ts decides); its own cost estimate.
 * - statevector: the whole register, n <= statevectorQubitLimit.
 * The cheapest feasible estimate wins, except that a Clifford instance takes propagation whenever
 * it is feasible (its value is then a signed sum of coefficients, free of rotation rounding).
 *
 * Light cones (PHYSICS.md): walking back from the support S, each whole RZZ block (all colour
 * layers of one step: they commute) grows S to S plus its graph neighbours; RX layers add nothing;
 * the last block grows only the X/Y sites (ZZ commutes with Z). So a Z site's cone is the graph
 * ball of radius t - 1 and an X or Y site's has radius t. For the gates family the cone is the
 * backward walk with light-cone.ts's rules (which also drop diagonal gates on Z-only sites), counted
 * here without building the sub-circuit; the runner restricts with light-cone.ts itself. The cones
 * are exact restrictions (the gates left out commute with the evolved observable) and upper
 * bounds on the true support. Cones are cached per (steps, support) so a 1,000-target plan takes milliseconds.
 *
 * No framework or node: imports.
 */
import type { CompiledCircuit, Gate, Layer, ObservableSpec, PauliTerm } from './circuit';
import type { ValidatedChallenge } from './challenge';
import { compileInstance, compileLattice, type CompiledLattice, type Instance, type Target } from './compile';
import { freeFermionCost, freeFermionUnsupportedReason } from './free-fermion';
import { lightCone } from './light-cone';
import { cliffordQuarterTurns } from './pauli-propagation';
import { WASM_MAX_QUBITS } from './statevector';
import { planTerm, DEFAULT_TN_MEMORY_BYTES } from './tensor-network/index';

export type ExactMethod = 'pauli-propagation' | 'free-fermion' | 'light-cone-statevector' | 'tensor-network' | 'statevector';

/** Preference order when estimated costs tie. */
export const METHOD_ORDER: readonly ExactMethod[] = ['pauli-propagation', 'free-fermion', 'light-cone-statevector', 'tensor-network', 'statevector'];

export interface PlannerOptions {
  /** largest Pauli-term count accepted for exact propagation (default 1,000,000, ~100 MB) */
  termBudget?: number;
  /** largest light cone for the light-cone statevector (default 27 qubits = 2 GiB, where the WebAssembly kernel ends) */
  coneQubitLimit?: number;
  /** largest register for the full statevector (default 27) */
  statevectorQubitLimit?: number;
  /** largest estimated peak memory of one tensor-network slice in bytes (default 2 GiB); wider contractions are sliced */
  tnMemoryBytes?: number;
  /**
   * Run the contraction-order search to cost the tensor network (milliseconds to seconds per
   * distinct term and step count). Off by default, so a plan on a request path stays fast; the
   * ReferenceRunner (worker threads, npm run reference) turns it on.
   */
  tnSearch?: boolean;
  /** largest estimated time per target in seconds (default 600) */
  secondsBudget?: number;
}

/**
 * Estimated throughputs of the engines in this repository (single core).
 * STATEVECTOR_RATE: the light-cone statevector on the WebAssembly kernel reaches 3.4e9
 * amplitude-gate updates/s at 26 qubits on an idle core (PHYSICS.md, measured); measured here
 * 5.1e8 at 24 qubits and 2.4e8 at 20 qubits with the machine's 2 cores at load 15; 1e9 sits between.
 * TN_RATE: real flops/s of the tensor-network kernels (8 per complex multiply-add), measured by
 * bench/tensor-network.bench.ts: 0.8 to 1.4 GFlop/s on its networks at that load (numpy with
 * OpenBLAS: 1 to 2.4 GFlop/s on the same networks and paths, one thread).
 */
export const PROPAGATION_RATE = 1e7; // term-gate updates per second
export const STATEVECTOR_RATE = 1e9; // amplitude-gate updates per second
export const TN_RATE = 7e8; // real flops per second
/** Tensor-network estimates are computed only when no cheaper method is known to finish within this. */
export const TN_CONSIDER_SECONDS = 0.5;
/**
 * Largest light cone (gates of one term) whose network the order search takes on: the search costs
 * about a second per thousand tensors, and cones this deep have widths far past any memory budget.
 */
export const TN_MAX_CONE_GATES = 1000;
/** A propagation attempt past its term bound gets this share of the next method's time (at least 1 s). */
export const ATTEMPT_SHARE = 0.1;
/** Fixed start-up cost per run (restriction, allocation): statevector methods, the others. */
export const STATEVECTOR_OVERHEAD_S = 1e-3;
export const OTHER_OVERHEAD_S = 1e-4;

export const DEFAULT_PLANNER_OPTIONS: Required<PlannerOptions> = {
  termBudget: 1_000_000,
  coneQubitLimit: WASM_MAX_QUBITS,
  statevectorQubitLimit: WASM_MAX_QUBITS,
  tnMemoryBytes: DEFAULT_TN_MEMORY_BYTES,
  tnSearch: false,
  secondsBudget: 600,
};

export interface MethodEstimate {
  method: ExactMethod;
  /** the method applies and its estimate is within every limit and the time budget */
  feasible: boolean;
  /** estimated size: Pauli terms, cone qubits, chain sites, register qubits or contraction width (see unit) */
  size: number;
  unit: 'terms' | 'qubits' | 'sites' | 'width';
  /** estimated wall time in seconds (Infinity when not applicable) */
  seconds: number;
  /** why not feasible (absent when feasible), as a sentence made by reasonText(why) */
  reason?: string;
  /** the same, structured: a code and its numbers */
  why?: Reason;
  /**
   * Not known to finish, but worth trying under a cap (exact Pauli propagation past its loose term
   * bound: run with the term budget and a time cap, abandoned when it overruns)
   */
  attempt?: boolean;
  /** tensor network: width (after slicing), total flops, slices, peak bytes, per term */
  tn?: { width: number; flops: number; slices: number; memoryBytes: number; terms: { index: number; width: number; flops: number; slices: number; coneQubits: number }[] };
  /** light-cone statevector: one run per term (size is then the widest term cone) */
  perTerm?: boolean;
}

export interface ConeStats {
  /** qubits in the light cone */
  qubits: number;
  /** gates inside the cone (the restricted circuit's size) */
  gates: number;
  /** non-Clifford rotations inside the cone */
  nonClifford: number;
}

export interface TargetPlan {
  targetId: string;
  instanceId: string;
  observableId: string;
  /** chosen method, or null when no exact method is feasible */
  method: ExactMethod | null;
  /** size of the chosen method's estimate (its unit in `unit`) */
  size: number | null;
  unit: MethodEstimate['unit'] | null;
  estimatedSeconds: number | null;
  /** plain sentence when method is null */
  reason: string | null;
  cone: ConeStats;
  clifford: boolean;
  /** every method's estimate, in METHOD_ORDER */
  estimates: MethodEstimate[];
}

/** Tensor-network cost of one term (from the order search, before any contraction). */
export interface TnTermCost {
  width: number;
  flops: number;
  slices: number;
  memoryBytes: number;
  coneQubits: number;
  searchSeconds: number;
}

/** Options of the order search shared by the planner's estimate and the runner (same plan both times). */
export function tnOptions(o: Required<PlannerOptions>): { memoryBytes: number } {
  return { memoryBytes: o.tnMemoryBytes };
}

const nowMs = () => (typeof performance !== 'undefined' ? performance.now() : Date.now());

/**
 * Why a method is not (known to be) feasible: a code and its numbers. reasonText turns one into a
 * sentence and infeasibleSentence joins them; no other place writes these sentences.
 */
export type Reason =
  | { code: 'term-bound'; log2Terms: number; budget: number; nonClifford: number }
  | { code: 'over-time'; method: ExactMethod; seconds: number; budget: number; qubits?: number; terms?: number }
  | { code: 'not-chain'; lattice: string }
  | { code: 'not-kicked-ising' }
  | { code: 'free-fermion-unsupported'; text: string }
  | { code: 'cone-limit'; qubits: number; limit: number; nonClifford: number; widestTerm?: { qubits: number; index: number } }
  | { code: 'register-limit'; qubits: number; limit: number }
  | { code: 'tn-not-needed'; seconds: number }
  | { code: 'tn-not-searched' }
  | { code: 'tn-network-too-large'; gates: number; limit: number }
  | { code: 'tn-over-memory'; width: number; bytes: number; budget: number; term: number; terms: number }
  | { code: 'tn-over-time'; seconds: number; budget: number; width: number; log2Flops: number; slices: number; term: number; terms: number };

export const METHOD_NAMES: Record<ExactMethod, string> = {
  'pauli-propagation': 'Pauli propagation',
  'free-fermion': 'free-fermion',
  'light-cone-statevector': 'light-cone statevector',
  'tensor-network': 'tensor-network contraction',
  statevector: 'statevector',
};

/** The one place where reasons become sentences. */
export function reasonText(r: Reason): string {
  switch (r.code) {
    case 'term-bound':
      return `Pauli propagation could need up to ${fmtPow2(r.log2Terms)} terms (budget ${fmtInt(r.budget)}) from ${fmtInt(r.nonClifford)} non-Clifford rotations in the light cone`;
    case 'over-time':
      return `${METHOD_NAMES[r.method]}${r.qubits !== undefined ? ` on ${fmtInt(r.qubits)} qubits` : ''}${r.terms ? ` per term (${r.terms} terms)` : ''} would take about ${fmtSeconds(r.seconds)} (budget ${fmtSeconds(r.budget)})`;
    case 'not-chain':
      return `free-fermion needs an open chain (the lattice is ${LATTICE_NAMES[r.lattice] ?? r.lattice})`;
    case 'not-kicked-ising':
      return 'free-fermion needs the kicked-ising family';
    case 'free-fermion-unsupported':
      return `free-fermion: ${r.text}`;
    case 'cone-limit':
      return `light cone has ${fmtInt(r.qubits)} qubits (limit ${r.limit}) and ${fmtInt(r.nonClifford)} non-Clifford rotations${r.widestTerm ? `, the widest single-term cone ${fmtInt(r.widestTerm.qubits)} qubits (term ${r.widestTerm.index + 1})` : ''}`;
    case 'register-limit':
      return `the register has ${fmtInt(r.qubits)} qubits (statevector limit ${r.limit})`;
    case 'tn-not-needed':
      return `tensor network not costed: a method known to finish in about ${fmtSeconds(r.seconds)} is cheaper`;
    case 'tn-not-searched':
      return 'tensor-network contraction not costed here: its order search runs with the reference computation';
    case 'tn-network-too-large':
      return `tensor network not searched: a term's light cone holds ${fmtInt(r.gates)} gates (limit ${fmtInt(r.limit)})`;
    case 'tn-over-memory':
      return `tensor-network contraction${r.term >= 0 ? ` of term ${r.term + 1} of ${r.terms}` : ''} has width ${r.width} even after slicing: about ${fmtBytes(r.bytes)} (budget ${fmtBytes(r.budget)})`;
    case 'tn-over-time':
      return `tensor-network contraction${r.term >= 0 ? ` of term ${r.term + 1} of ${r.terms}` : ''} has width ${r.width}${r.slices > 1 ? ` over ${fmtInt(r.slices)} slices` : ''} and 2^${r.log2Flops.toFixed(1)} flops: about ${fmtSeconds(r.seconds)} in all (budget ${fmtSeconds(r.budget)})`;
  }
}

interface Csr {
  n: number;
  offsets: Int32Array;
  nbrs: Int32Array;
}

function csr(n: number, edges: readonly (readonly [number, number])[]): Csr {
  const deg = new Int32Array(n + 1);
  for (const [a, b] of edges) {
    deg[a + 1]++;
    deg[b + 1]++;
  }
  for (let i = 0; i < n; i++) deg[i + 1] += deg[i];
  const fill = deg.slice(0, n);
  const nbrs = new Int32Array(2 * edges.length);
  for (const [a, b] of edges) {
    nbrs[fill[a]++] = b;
    nbrs[fill[b]++] = a;
  }
  return { n, offsets: deg, nbrs };
}

/** Cone statistics with the Clifford split still open (counts per gate kind). */
interface RawCone {
  qubits: number;
  rx: number;
  rzz: number;
  /** kicked-ising: backward blocks as (kind 0 = rzz / 1 = rx, gates in block, cone size after) */
  blocks?: number[];
  /** entries of `blocks` that belong to this step count (a prefix of a longer walk) */
  blocksLen?: number;
  /** gates-family only */
  gates?: number;
  nonClifford?: number;
  log2Terms?: number;
  work?: number;
}

function isCliffordAngle(t: number): boolean {
  return cliffordQuarterTurns(t) >= 0;
}

/** Is every rotation of the instance a multiple of pi/2? */
export function isCliffordInstance(challenge: ValidatedChallenge, inst: Instance): boolean {
  const c = challenge.spec.circuit;
  if (c.family === 'kicked-ising' && inst.params.family === 'kicked-ising') {
    return inst.params.steps === 0 || (isCliffordAngle(inst.params.thetaH) && isCliffordAngle(inst.params.thetaJ));
  }
  if (c.family === 'gates') return c.gates.every((g) => !g.params || g.params.every(isCliffordAngle));
  return false;
}

function gateIsNonClifford(g: Gate): boolean {
  return !!g.params && g.params.length > 0 && !isCliffordAngle(g.params[0]);
}

const log2Sum = (a: number, b: number) => (a === -Infinity ? b : b === -Infinity ? a : Math.max(a, b) + Math.log2(1 + 2 ** -Math.abs(a - b)));

/**
 * The planner for one validated challenge. Holds the lattice, the cone caches and (for the gates
 * family) the compiled circuit; plan() is pure given its inputs.
 */
export class Planner {
  readonly options: Required<PlannerOptions>;
  readonly lattice: CompiledLattice;
  private readonly graph: Csr;
  private readonly mark: Int32Array;
  private readonly xyMark: Int32Array;
  private stamp = 0;
  private readonly coneCache = new Map<string, RawCone>();
  private readonly instances: Map<string, Instance>;
  private readonly observables: Map<string, { spec: ObservableSpec; index: number }>;
  private gatesCircuit: CompiledCircuit | null = null;

  constructor(
    readonly challenge: ValidatedChallenge,
    options: PlannerOptions = {},
  ) {
    const given = Object.fromEntries(Object.entries(options).filter(([k, v]) => v !== undefined && k in DEFAULT_PLANNER_OPTIONS));
    this.options = { ...DEFAULT_PLANNER_OPTIONS, ...given };
    this.lattice = compileLattice(challenge.spec);
    this.graph = csr(this.lattice.graph.n, this.lattice.graph.edges);
    this.mark = new Int32Array(Math.max(challenge.nQubits, this.lattice.graph.n));
    this.xyMark = new Int32Array(this.mark.length);
    this.instances = new Map(challenge.instances.map((i) => [i.id, i]));
    this.observables = new Map(challenge.observables.map((o, index) => [o.id, { spec: o, index }]));
    if (challenge.spec.circuit.family === 'gates') this.gatesCircuit = compileInstance(challenge.spec, challenge.instances[0]);
  }

  instance(id: string): Instance {
    const i = this.instances.get(id);
    if (!i) throw new Error(`unknown instance ${id}`);
    return i;
  }

  observable(id: string): ObservableSpec {
    const o = this.observables.get(id);
    if (!o) throw new Error(`unknown observable ${id}`);
    return o.spec;
  }

  /** Plan every target of the challenge, in enumeration order. */
  planAll(): TargetPlan[] {
    return this.challenge.targets.map((t) => this.plan(t));
  }

  plan(target: Target): TargetPlan {
    const inst = this.instance(target.instanceId);
    const obs = this.observable(target.observableId);
    const o = this.options;
    const n = this.challenge.nQubits;
    const clifford = isCliffordInstance(this.challenge, inst);
    const union = this.coneStats(inst, obs.terms, `obs:${target.observableId}`);
    const totalGates = this.totalGates(inst);
    const estimates: MethodEstimate[] = [];

    const mk = (method: ExactMethod, size: number, unit: MethodEstimate['unit'], seconds: number, why?: Reason, extra: Partial<MethodEstimate> = {}): MethodEstimate => ({
      method, feasible: !why, size, unit, seconds, ...extra, ...(why ? { why, reason: reasonText(why) } : {}),
    });

    // Pauli propagation: known to fit when the term bound is within the budget; otherwise attempted
    // under the term budget and a time cap (the bound is loose: often 4x to hundreds of times high)
    let propagation: MethodEstimate;
    {
      // one propagation per term on its own cone (reference.ts does the same), so the bounds add;
      // at a Clifford instance every term stays one string and the work is the cone's gate count
      const { log2Terms, work } = this.observableBound(inst, obs);
      const terms = 2 ** log2Terms;
      const seconds = OTHER_OVERHEAD_S + work / PROPAGATION_RATE;
      if (terms > o.termBudget) {
        const why: Reason = { code: 'term-bound', log2Terms, budget: o.termBudget, nonClifford: union.nonClifford };
        propagation = mk('pauli-propagation', o.termBudget, 'terms', seconds, why, { attempt: true });
      } else if (seconds > o.secondsBudget) propagation = mk('pauli-propagation', Math.round(terms), 'terms', seconds, { code: 'over-time', method: 'pauli-propagation', seconds, budget: o.secondsBudget });
      else propagation = mk('pauli-propagation', Math.round(terms), 'terms', seconds);
      estimates.push(propagation);
    }

    // free-fermion
    {
      const spec = this.challenge.spec;
      let why: Reason | undefined;
      let seconds = Infinity;
      let size = 0;
      if (spec.lattice.kind !== 'chain') why = { code: 'not-chain', lattice: spec.lattice.kind };
      else if (spec.circuit.family !== 'kicked-ising' || inst.params.family !== 'kicked-ising') why = { code: 'not-kicked-ising' };
      else {
        const text = freeFermionUnsupportedReason(n, obs);
        if (text) why = { code: 'free-fermion-unsupported', text };
        else {
          const p = inst.params;
          // the cost depends on the chain, the steps and the observable, not on the angles
          const key = `${p.steps}|${obs.id}`;
          let cost = this.ffCostCache.get(key);
          if (cost === undefined) {
            cost = freeFermionCost({ n, thetaJ: p.thetaJ, thetaH: p.thetaH, steps: p.steps }, obs);
            this.ffCostCache.set(key, cost);
          }
          if (!cost) why = { code: 'free-fermion-unsupported', text: 'not supported for this instance' };
          else {
            seconds = OTHER_OVERHEAD_S + cost.seconds;
            size = freeFermionSites(n, p.steps, obs);
            if (seconds > o.secondsBudget) why = { code: 'over-time', method: 'free-fermion', seconds, budget: o.secondsBudget };
          }
        }
      }
      estimates.push(mk('free-fermion', size, 'sites', seconds, why));
    }

    // light-cone statevector: one run on the union cone, or one run per term when the union is
    // too wide (a magnetisation sum on a large lattice) and every single-term cone fits
    {
      const c = union.qubits;
      let seconds = c > o.coneQubitLimit ? Infinity : STATEVECTOR_OVERHEAD_S + (2 ** c * Math.max(1, union.gates + obs.terms.length)) / STATEVECTOR_RATE;
      let size = c;
      let perTerm = false;
      let widest = { qubits: c, index: -1 };
      if ((c > o.coneQubitLimit || seconds > o.secondsBudget) && obs.terms.length > 1) {
        const pt = this.perTermCones(inst, obs);
        widest = { qubits: pt.maxQubits, index: pt.widestIndex };
        if (pt.maxQubits <= o.coneQubitLimit && pt.seconds < seconds) {
          seconds = pt.seconds;
          size = pt.maxQubits;
          perTerm = true;
        }
      }
      let why: Reason | undefined;
      if (size > o.coneQubitLimit) {
        why = { code: 'cone-limit', qubits: c, limit: o.coneQubitLimit, nonClifford: union.nonClifford, ...(obs.terms.length > 1 ? { widestTerm: widest } : {}) };
      } else if (seconds > o.secondsBudget) {
        why = { code: 'over-time', method: 'light-cone-statevector', seconds, budget: o.secondsBudget, qubits: size, ...(perTerm ? { terms: obs.terms.length } : {}) };
      }
      estimates.push(mk('light-cone-statevector', size, 'qubits', seconds, why, perTerm ? { perTerm } : {}));
    }

    // full statevector
    {
      const seconds = n > o.statevectorQubitLimit ? Infinity : STATEVECTOR_OVERHEAD_S + (2 ** n * Math.max(1, totalGates + obs.terms.length)) / STATEVECTOR_RATE;
      let why: Reason | undefined;
      if (n > o.statevectorQubitLimit) why = { code: 'register-limit', qubits: n, limit: o.statevectorQubitLimit };
      else if (seconds > o.secondsBudget) why = { code: 'over-time', method: 'statevector', seconds, budget: o.secondsBudget, qubits: n };
      estimates.push(mk('statevector', n, 'qubits', seconds, why));
    }

    // tensor network, term by term: costed from the order search (width, flops) only when nothing
    // cheaper is known to finish quickly (the search itself takes milliseconds to seconds)
    {
      let cheapest = Infinity;
      for (const e of estimates) if (e.feasible) cheapest = Math.min(cheapest, e.seconds);
      let gates = 0;
      if (o.tnSearch && cheapest > TN_CONSIDER_SECONDS) {
        for (const t of obs.terms) if (t.factors.length) gates = Math.max(gates, this.coneStats(inst, [t], termKey(t)).gates);
      }
      if (cheapest <= TN_CONSIDER_SECONDS) {
        estimates.push(mk('tensor-network', 0, 'width', Infinity, { code: 'tn-not-needed', seconds: cheapest }));
      } else if (!o.tnSearch) {
        estimates.push(mk('tensor-network', 0, 'width', Infinity, { code: 'tn-not-searched' }));
      } else if (gates > TN_MAX_CONE_GATES) {
        estimates.push(mk('tensor-network', 0, 'width', Infinity, { code: 'tn-network-too-large', gates, limit: TN_MAX_CONE_GATES }));
      } else {
        const tn = this.tnCost(inst, obs);
        const seconds = tn.seconds;
        let why: Reason | undefined;
        const over = tn.terms.find((t) => t.memoryBytes > o.tnMemoryBytes);
        if (over) {
          why = { code: 'tn-over-memory', width: over.width, bytes: over.memoryBytes, budget: o.tnMemoryBytes, term: obs.terms.length > 1 ? over.index : -1, terms: obs.terms.length };
        } else if (seconds > o.secondsBudget) {
          const worst = tn.terms.reduce((m, t) => (t.flops > m.flops ? t : m), tn.terms[0]);
          why = { code: 'tn-over-time', seconds, budget: o.secondsBudget, width: worst.width, log2Flops: Math.log2(worst.flops), slices: worst.slices, term: obs.terms.length > 1 ? worst.index : -1, terms: obs.terms.length };
        }
        estimates.push(mk('tensor-network', tn.width, 'width', seconds, why, { tn: { width: tn.width, flops: tn.flops, slices: tn.slices, memoryBytes: tn.memoryBytes, terms: tn.terms } }));
      }
    }
    // keep METHOD_ORDER
    estimates.sort((x, y) => METHOD_ORDER.indexOf(x.method) - METHOD_ORDER.indexOf(y.method));

    // Cheapest feasible method; at a Clifford instance propagation is taken whenever feasible: its
    // value is a signed sum of coefficients, with no rounding from rotations.
    let best: MethodEstimate | null = null;
    for (const e of estimates) if (e.feasible && (!best || e.seconds < best.seconds)) best = e;
    if (clifford && propagation.feasible) best = propagation;
    const cone: ConeStats = union;
    if (best) {
      return {
        targetId: target.id, instanceId: inst.id, observableId: obs.id,
        method: best.method, size: best.size, unit: best.unit, estimatedSeconds: best.seconds, reason: null,
        cone, clifford, estimates,
      };
    }
    return {
      targetId: target.id, instanceId: inst.id, observableId: obs.id,
      method: null, size: null, unit: null, estimatedSeconds: null,
      reason: infeasibleSentence(estimates),
      cone, clifford, estimates,
    };
  }

  private totalGates(inst: Instance): number {
    if (this.gatesCircuit) return this.gatesCircuit.gates.length;
    if (inst.params.family !== 'kicked-ising') return 0;
    return inst.params.steps * (this.lattice.graph.n + this.lattice.graph.edges.length);
  }

  /** Light-cone statistics of a set of terms (their union) in one instance. */
  coneStats(inst: Instance, terms: readonly PauliTerm[], key: string): ConeStats {
    if (this.gatesCircuit) {
      const k = `G|${key}`;
      let raw = this.coneCache.get(k);
      if (!raw) {
        raw = this.gatesCone(this.gatesCircuit, terms);
        this.coneCache.set(k, raw);
      }
      return { qubits: raw.qubits, gates: raw.gates ?? 0, nonClifford: raw.nonClifford ?? 0 };
    }
    if (inst.params.family !== 'kicked-ising') throw new Error('instance family mismatch');
    const { steps, thetaH, thetaJ } = inst.params;
    const raw = this.kiRaw(steps, terms, key);
    const nonClifford = (isCliffordAngle(thetaH) ? 0 : raw.rx) + (isCliffordAngle(thetaJ) ? 0 : raw.rzz);
    return { qubits: raw.qubits, gates: raw.rx + raw.rzz, nonClifford: steps === 0 ? 0 : nonClifford };
  }

  private maxSteps = -1;

  /**
   * Cone of `terms` at `steps`, from one walk at the grid's largest step count: the backward walk
   * for t steps is the first 6t block entries of the walk for more steps (the last RZZ block, then
   * t RX layers with t - 1 RZZ blocks between them), so one BFS per support serves every t.
   */
  private kiRaw(steps: number, terms: readonly PauliTerm[], key: string): RawCone {
    if (this.maxSteps < 0) {
      const c = this.challenge.spec.circuit;
      this.maxSteps = c.family === 'kicked-ising' ? Math.max(...c.steps) : 0;
    }
    const T = Math.max(this.maxSteps, steps);
    const k = `k|${steps}|${key}`;
    let raw = this.coneCache.get(k);
    if (raw) return raw;
    const fk = `k|${T}|${key}`;
    let full = this.coneCache.get(fk);
    if (!full) {
      full = this.kickedIsingCone(T, terms, null);
      this.coneCache.set(fk, full);
    }
    if (steps === T) return full;
    if (steps === 0) {
      const q = new Set<number>();
      for (const t of terms) for (const f of t.factors) q.add(f.qubit);
      raw = { qubits: q.size, rx: 0, rzz: 0, blocks: [], blocksLen: 0 };
    } else {
      const b = full.blocks as number[];
      const len = 6 * steps;
      let rx = 0;
      let rzz = 0;
      for (let i = 0; i < len; i += 3) {
        if (b[i] === 1) rx += b[i + 1];
        else rzz += b[i + 1];
      }
      raw = { qubits: b[len - 1], rx, rzz, blocks: b, blocksLen: len };
    }
    this.coneCache.set(k, raw);
    return raw;
  }

  private readonly ffCostCache = new Map<string, ReturnType<typeof freeFermionCost>>();
  private readonly boundCache = new Map<string, { log2Terms: number; work: number }>();

  private readonly perTermCache = new Map<string, { maxQubits: number; widestIndex: number; seconds: number }>();

  /** Widest single-term light cone (and its term index) and the estimated time of one statevector run per term. */
  perTermCones(inst: Instance, obs: ObservableSpec): { maxQubits: number; widestIndex: number; seconds: number } {
    const p = inst.params;
    const key = p.family === 'kicked-ising' ? `${p.steps}|${obs.id}` : `g|${obs.id}`;
    let r = this.perTermCache.get(key);
    if (!r) {
      let maxQubits = 0;
      let widestIndex = -1;
      let seconds = 0;
      obs.terms.forEach((t, k) => {
        if (t.factors.length === 0) return;
        const cs = this.coneStats(inst, [t], termKey(t));
        if (cs.qubits > maxQubits) {
          maxQubits = cs.qubits;
          widestIndex = k;
        }
        seconds += STATEVECTOR_OVERHEAD_S + (2 ** cs.qubits * (cs.gates + 1)) / STATEVECTOR_RATE;
      });
      r = { maxQubits, widestIndex, seconds };
      this.perTermCache.set(key, r);
    }
    return r;
  }

  private readonly tnCache = new Map<string, TnTermCost>();

  /**
   * Tensor-network cost of an observable, term by term: the order search runs on each term's
   * light-cone network (the structure does not depend on the angles, so the result is cached per
   * (steps, term)); seconds = search time + flops / TN_RATE.
   */
  tnCost(inst: Instance, obs: ObservableSpec): { width: number; flops: number; slices: number; memoryBytes: number; seconds: number; terms: (TnTermCost & { index: number })[] } {
    const terms: (TnTermCost & { index: number })[] = [];
    let seconds = 0, width = 0, flops = 0, slices = 1, memoryBytes = 0;
    obs.terms.forEach((t, index) => {
      if (t.factors.length === 0) return;
      const p = inst.params;
      const key = `${p.family === 'kicked-ising' ? p.steps : 'g'}|${termKey(t)}`;
      let c = this.tnCache.get(key);
      if (!c) {
        const sub = this.restrict(inst, { id: `${obs.id}#${index}`, terms: [{ coef: 1, factors: t.factors }] });
        const t0 = nowMs();
        // one plain greedy run first: a network 1000 times over the time budget (or over the memory
        // budget even after slicing) stops there; otherwise the runner's own full search, so the
        // estimate is the plan that will run (same seed, same options)
        const quick = planTerm(sub.circuit, sub.observable.terms[0].factors, { ...tnOptions(this.options), restarts: 1, reconfigureK: 0 });
        const hopeless = quick.flops / TN_RATE > 1000 * this.options.secondsBudget || quick.memoryBytes > this.options.tnMemoryBytes;
        const plan = hopeless ? quick : planTerm(sub.circuit, sub.observable.terms[0].factors, tnOptions(this.options));
        c = { width: plan.width, flops: plan.flops, slices: plan.slices, memoryBytes: plan.memoryBytes, coneQubits: plan.coneQubits, searchSeconds: (nowMs() - t0) / 1000 };
        if (this.tnCache.size > 4096) this.tnCache.clear();
        this.tnCache.set(key, c);
      }
      terms.push({ ...c, index });
      seconds += OTHER_OVERHEAD_S + c.searchSeconds + c.flops / TN_RATE;
      width = Math.max(width, c.width);
      flops += c.flops;
      slices = Math.max(slices, c.slices);
      memoryBytes = Math.max(memoryBytes, c.memoryBytes);
    });
    return { width, flops, slices, memoryBytes, seconds, terms };
  }

  /** Sum of termBound over the observable's terms, cached per (steps, Clifford flags, observable). */
  observableBound(inst: Instance, obs: ObservableSpec): { log2Terms: number; work: number } {
    const p = inst.params;
    const key =
      p.family === 'kicked-ising'
        ? `${p.steps}|${isCliffordAngle(p.thetaH) ? 1 : 0}${isCliffordAngle(p.thetaJ) ? 1 : 0}|${obs.id}`
        : `g|${obs.id}`;
    let b = this.boundCache.get(key);
    if (!b) {
      let log2Terms = -Infinity;
      let work = 0;
      for (const t of obs.terms) {
        const x = this.termBound(inst, t);
        log2Terms = log2Sum(log2Terms, x.log2Terms);
        work += x.work;
      }
      b = { log2Terms, work };
      this.boundCache.set(key, b);
    }
    return b;
  }

  /**
   * Upper bound on the Pauli terms one term grows to, and on the term-gate updates, walking the
   * cone backwards: each non-Clifford rotation at most doubles the count, which never exceeds the
   * 4^c strings on the c qubits the cone has reached so far. Returns log2 of the final bound.
   */
  termBound(inst: Instance, term: PauliTerm): { log2Terms: number; work: number } {
    const key = termKey(term);
    if (this.gatesCircuit) {
      const k = `g|${key}`;
      let raw = this.coneCache.get(k);
      if (!raw) {
        raw = this.gatesCone(this.gatesCircuit, [term]);
        this.coneCache.set(k, raw);
      }
      return { log2Terms: raw.log2Terms ?? 0, work: raw.work ?? 0 };
    }
    if (inst.params.family !== 'kicked-ising') throw new Error('instance family mismatch');
    const { steps, thetaH, thetaJ } = inst.params;
    const raw = this.kiRaw(steps, [term], key);
    const hNon = !isCliffordAngle(thetaH);
    const jNon = !isCliffordAngle(thetaJ);
    const b = raw.blocks ?? [];
    const len = raw.blocksLen ?? b.length;
    let log2T = 0;
    let work = 0;
    for (let i = 0; i < len; i += 3) {
      const non = b[i] === 1 ? hNon : jNon;
      if (non) log2T = Math.min(log2T + b[i + 1], 2 * b[i + 2]);
      work += 2 ** log2T * b[i + 1];
    }
    return { log2Terms: log2T, work };
  }

  private nextStamp(): number {
    if (++this.stamp >= 0x7fffffff) {
      this.mark.fill(0);
      this.xyMark.fill(0);
      this.stamp = 1;
    }
    return this.stamp;
  }

  /**
   * Backward cone of `terms` through `steps` kicked-ising steps. With `collect`, also records the
   * kept gates per step (for the restricted sub-circuit): rx qubits and rzz edge indices.
   */
  private kickedIsingCone(steps: number, terms: readonly PauliTerm[], collect: { rx: number[][]; rzz: number[][] } | null): RawCone {
    const { offsets, nbrs } = this.graph;
    const mark = this.mark;
    const s = this.nextStamp();
    const members: number[] = [];
    const xy: number[] = [];
    const xyMark = this.xyMark;
    const sx = this.nextStamp();
    for (const t of terms) {
      for (const f of t.factors) {
        if (f.op !== 'Z' && xyMark[f.qubit] !== sx) {
          xyMark[f.qubit] = sx;
          xy.push(f.qubit);
        }
      }
    }
    const isXY = (v: number) => xyMark[v] === sx;
    let internal = 0;
    const add = (v: number) => {
      if (mark[v] === s) return;
      for (let e = offsets[v]; e < offsets[v + 1]; e++) if (mark[nbrs[e]] === s) internal++;
      mark[v] = s;
      members.push(v);
    };
    for (const t of terms) for (const f of t.factors) add(f.qubit);
    if (steps === 0) return { qubits: members.length, rx: 0, rzz: 0, blocks: [] };
    let rx = 0;
    let rzz = 0;
    const blocks: number[] = [];
    const edgesTouching = (set: readonly number[], inSet: (v: number) => boolean) => {
      let deg = 0;
      let inner = 0;
      for (const v of set) {
        deg += offsets[v + 1] - offsets[v];
        for (let e = offsets[v]; e < offsets[v + 1]; e++) if (inSet(nbrs[e])) inner++;
      }
      return deg - inner / 2;
    };
    // last RZZ block: only edges at X/Y sites act
    const last = edgesTouching(xy, isXY);
    rzz += last;
    if (collect) collect.rzz.push(this.edgesAt(xy, isXY));
    for (const v of xy) for (let e = offsets[v]; e < offsets[v + 1]; e++) add(nbrs[e]);
    blocks.push(0, last, members.length);
    let frontierStart = 0; // every member may still have neighbours outside
    for (let step = steps; step >= 1; step--) {
      rx += members.length;
      blocks.push(1, members.length, members.length);
      if (collect) collect.rx.push([...members]);
      if (step === 1) break;
      // RZZ block of step - 1: every edge touching the cone
      let deg = 0;
      for (const v of members) deg += offsets[v + 1] - offsets[v];
      const blockEdges = deg - internal;
      rzz += blockEdges;
      if (collect) collect.rzz.push(this.edgesAt(members, (v) => mark[v] === s));
      const end = members.length;
      for (let i = frontierStart; i < end; i++) {
        const v = members[i];
        for (let e = offsets[v]; e < offsets[v + 1]; e++) add(nbrs[e]);
      }
      frontierStart = end;
      if (members.length === this.graph.n) frontierStart = members.length;
      blocks.push(0, blockEdges, members.length);
    }
    return { qubits: members.length, rx, rzz, blocks };
  }

  /** Indices (into lattice.graph.edges) of edges with an endpoint in `set`. */
  private edgeIndex: Map<string, number> | null = null;
  private edgesAt(set: readonly number[], inSet: (v: number) => boolean): number[] {
    if (!this.edgeIndex) this.edgeIndex = new Map(this.lattice.graph.edges.map(([a, b], i) => [`${a},${b}`, i]));
    const out: number[] = [];
    const { offsets, nbrs } = this.graph;
    for (const v of set) {
      for (let e = offsets[v]; e < offsets[v + 1]; e++) {
        const w = nbrs[e];
        if (inSet(w) && w < v) continue; // counted from the smaller endpoint
        out.push(this.edgeIndex.get(v < w ? `${v},${w}` : `${w},${v}`) as number);
      }
    }
    return out;
  }

  private gateFlags: Uint8Array | null = null;
  private nonCliffPrefix: Int32Array | null = null;
  private inD: Uint8Array | null = null;

  /**
   * Backward walk with light-cone.ts's rules (counting only, no allocation): keep a gate unless it
   * touches no cone qubit, or is diagonal with every qubit still Z-commuting (D), or is a CX whose
   * target is outside the cone and whose control is in D. Also the term bound: each kept
   * non-Clifford rotation at most doubles the term count, capped at 4^(cone qubits so far).
   * Once the cone is the whole register and D is empty every earlier gate is kept, so the rest is
   * closed form (the work bound then uses the final term bound for the remaining gates).
   */
  private gatesCone(circ: CompiledCircuit, terms: readonly PauliTerm[]): RawCone {
    const G = circ.gates.length;
    const n = circ.nQubits;
    if (!this.gateFlags || !this.nonCliffPrefix || !this.inD) {
      // bit 1: diagonal, bit 2: non-Clifford rotation, bit 4: cx
      const flags = new Uint8Array(G);
      const pre = new Int32Array(G + 1);
      circ.gates.forEach((g, i) => {
        const diag = g.name === 'z' || g.name === 's' || g.name === 'sdg' || g.name === 'rz' || g.name === 'rzz' || g.name === 'cz';
        const non = (g.name === 'rx' || g.name === 'ry' || g.name === 'rz' || g.name === 'rzz') && gateIsNonClifford(g);
        flags[i] = (diag ? 1 : 0) | (non ? 2 : 0) | (g.name === 'cx' ? 4 : 0);
        pre[i + 1] = pre[i] + (non ? 1 : 0);
      });
      this.gateFlags = flags;
      this.nonCliffPrefix = pre;
      this.inD = new Uint8Array(n);
    }
    const flags = this.gateFlags;
    const pre = this.nonCliffPrefix;
    const inD = this.inD;
    inD.fill(1);
    let dCount = n;
    const s = this.nextStamp();
    const mark = this.mark;
    let qubits = 0;
    for (const t of terms) {
      for (const f of t.factors) {
        if (mark[f.qubit] !== s) {
          mark[f.qubit] = s;
          qubits++;
        }
        if (f.op !== 'Z' && inD[f.qubit]) {
          inD[f.qubit] = 0;
          dCount--;
        }
      }
    }
    let gates = 0;
    let nonClifford = 0;
    let log2T = 0;
    let work = 0;
    const gs = circ.gates;
    for (let i = G - 1; i >= 0; i--) {
      if (qubits === n && dCount === 0) {
        const rest = pre[i + 1];
        gates += i + 1;
        nonClifford += rest;
        log2T = Math.min(log2T + rest, 2 * n);
        work += (i + 1) * 2 ** log2T;
        break;
      }
      const q = gs[i].qubits;
      const a = q[0];
      const b = q.length === 2 ? q[1] : -1;
      const inA = mark[a] === s;
      const inB = b >= 0 && mark[b] === s;
      if (!inA && !inB) continue;
      const fl = flags[i];
      if (fl & 1) {
        if (inD[a] && (b < 0 || inD[b])) continue;
        if (!inA) {
          mark[a] = s;
          qubits++;
        }
        if (b >= 0 && !inB) {
          mark[b] = s;
          qubits++;
        }
      } else if (fl & 4) {
        // cx(a = control, b = target)
        if (!inB && inD[a]) continue;
        if (!inA) {
          mark[a] = s;
          qubits++;
        }
        if (!inB) {
          mark[b] = s;
          qubits++;
        }
        if (inD[b]) {
          inD[b] = 0;
          dCount--;
        }
      } else {
        if (!inA) {
          mark[a] = s;
          qubits++;
        }
        if (inD[a]) {
          inD[a] = 0;
          dCount--;
        }
        if (b >= 0) {
          if (!inB) {
            mark[b] = s;
            qubits++;
          }
          if (inD[b]) {
            inD[b] = 0;
            dCount--;
          }
        }
      }
      gates++;
      if (fl & 2) {
        nonClifford++;
        log2T = Math.min(log2T + 1, 2 * qubits);
      }
      work += 2 ** log2T;
    }
    return { qubits, rx: 0, rzz: 0, gates, nonClifford, log2Terms: log2T, work };
  }

  /**
   * The light-cone sub-circuit of an observable in an instance, on qubits re-indexed 0..k-1 (in
   * increasing original order), with the observable re-indexed the same way. Exact: the gates left
   * out commute with the Heisenberg-evolved observable.
   */
  restrict(inst: Instance, obs: ObservableSpec): { circuit: CompiledCircuit; observable: ObservableSpec; qubits: number[] } {
    let gates: Gate[];
    let used: number[];
    if (this.gatesCircuit) {
      // light-cone.ts: gate-by-gate backward walk that also drops diagonal gates on Z-only sites
      const lc = lightCone(this.gatesCircuit, obs);
      return { circuit: lc.circuit, observable: lc.observable as ObservableSpec, qubits: lc.qubits };
    } else {
      if (inst.params.family !== 'kicked-ising') throw new Error('instance family mismatch');
      const { steps, thetaH, thetaJ } = inst.params;
      const collect = { rx: [] as number[][], rzz: [] as number[][] };
      this.kickedIsingCone(steps, obs.terms, collect);
      // collect lists blocks backwards: rzz[0] is the last step's block, rx[0] the last RX layer
      const edges = this.lattice.graph.edges;
      const colourOf = this.colourOfEdge();
      const set = new Set<number>();
      for (const t of obs.terms) for (const f of t.factors) set.add(f.qubit);
      gates = [];
      for (let step = 1; step <= steps; step++) {
        const rxq = [...collect.rx[steps - step]].sort((a, b) => a - b);
        for (const q of rxq) {
          gates.push({ name: 'rx', qubits: [q], params: [thetaH] });
          set.add(q);
        }
        const block = collect.rzz[steps - step] ?? [];
        const byColour = new Map<number, number[]>();
        for (const e of block) {
          const c = colourOf[e];
          if (!byColour.has(c)) byColour.set(c, []);
          (byColour.get(c) as number[]).push(e);
        }
        for (const c of [...byColour.keys()].sort((a, b) => a - b)) {
          for (const e of (byColour.get(c) as number[]).sort((a, b) => a - b)) {
            const [a, b] = edges[e];
            gates.push({ name: 'rzz', qubits: [a, b], params: [thetaJ] });
            set.add(a);
            set.add(b);
          }
        }
      }
      used = [...set];
    }
    used.sort((a, b) => a - b);
    const index = new Map(used.map((q, i) => [q, i]));
    const mapped: Gate[] = gates.map((g) => ({ ...g, qubits: g.qubits.map((q) => index.get(q) as number) }));
    const observable: ObservableSpec = {
      id: obs.id,
      terms: obs.terms.map((t) => ({ coef: t.coef, factors: t.factors.map((f) => ({ qubit: index.get(f.qubit) as number, op: f.op })) })),
    };
    return { circuit: { nQubits: used.length, gates: mapped, layers: layersOf(mapped) }, observable, qubits: used };
  }

  private colour: Int32Array | null = null;
  private colourOfEdge(): Int32Array {
    if (!this.colour) {
      const idx = new Map(this.lattice.graph.edges.map(([a, b], i) => [`${a},${b}`, i]));
      this.colour = new Int32Array(this.lattice.graph.edges.length);
      this.lattice.colourLayers.forEach((layer, c) => {
        for (const [a, b] of layer) this.colour![idx.get(`${a},${b}`) as number] = c;
      });
    }
    return this.colour;
  }
}

/** Layers of a restricted gate list: runs of rx, then runs of rzz on disjoint qubits. */
function layersOf(gates: readonly Gate[]): Layer[] {
  const out: Layer[] = [];
  let start = 0;
  let busy = new Set<number>();
  for (let i = 0; i <= gates.length; i++) {
    const g = gates[i];
    const prev = gates[i - 1];
    const brk =
      i === gates.length ||
      (i > start && (g.name !== prev.name || g.qubits.some((q) => busy.has(q))));
    if (brk && i > start) {
      const name = prev.name;
      out.push({ kind: name === 'rx' ? 'rx' : name === 'rzz' ? 'rzz' : 'generic', start, end: i });
      start = i;
      busy = new Set();
    }
    if (g) for (const q of g.qubits) busy.add(q);
  }
  return out;
}

function termKey(t: PauliTerm): string {
  let s = '';
  for (const f of t.factors) s += `${f.op === 'Z' ? 'z' : 'x'}${f.qubit},`;
  return s;
}

function infeasibleSentence(est: MethodEstimate[]): string {
  const by = (m: ExactMethod) => est.find((e) => e.method === m) as MethodEstimate;
  const parts: string[] = [];
  const lc = by('light-cone-statevector').why;
  const pp = by('pauli-propagation');
  const coneWide = lc?.code === 'cone-limit';
  if (lc) parts.push(reasonText(lc));
  // the cone sentence already counts the non-Clifford rotations
  if (pp.why && !(coneWide && pp.why.code === 'term-bound')) parts.push(reasonText(pp.why));
  if (pp.attempt) parts.push(`exact Pauli propagation is attempted under the budget of ${fmtInt(pp.size)} terms`);
  const tn = by('tensor-network').why;
  if (tn && tn.code !== 'tn-not-needed') parts.push(reasonText(tn));
  const ff = by('free-fermion').why;
  if (ff) parts.push(ff.code === 'not-chain' ? 'not a chain' : reasonText(ff));
  const sv = by('statevector').why;
  if (sv && !(coneWide && sv.code === 'register-limit')) parts.push(reasonText(sv));
  return parts.join('; ');
}

const LATTICE_NAMES: Record<string, string> = {
  chain: 'a chain',
  ring: 'a ring',
  square: 'a square grid',
  'heavy-hex': 'a heavy-hex patch',
  edges: 'an explicit edge list',
};

/** Integer with thousands separators ("1,000,000"); toLocaleString is slow in a hot loop. */
export function fmtInt(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  const neg = x < 0;
  let d = String(Math.round(Math.abs(x)));
  if (d.includes('e')) return (neg ? '-' : '') + d;
  let out = '';
  while (d.length > 3) {
    out = ',' + d.slice(-3) + out;
    d = d.slice(0, -3);
  }
  return (neg ? '-' : '') + d + out;
}

function fmtPow2(log2: number): string {
  if (log2 <= 20) return fmtInt(2 ** log2);
  return `2^${Math.round(log2)}`;
}

export function fmtBytes(b: number): string {
  if (b < 1024 ** 2) return `${(b / 1024).toPrecision(2)} KiB`;
  if (b < 1024 ** 3) return `${(b / 1024 ** 2).toPrecision(2)} MiB`;
  if (b < 1024 ** 4) return `${(b / 1024 ** 3).toPrecision(2)} GiB`;
  return `2^${Math.log2(b).toFixed(0)} bytes`;
}

export function fmtSeconds(s: number): string {
  if (!Number.isFinite(s)) return 'forever';
  if (s < 1) return `${(s * 1000).toPrecision(2)} ms`;
  if (s < 120) return `${s.toPrecision(2)} s`;
  if (s < 7200) return `${(s / 60).toPrecision(2)} min`;
  if (s < 3 * 86400) return `${(s / 3600).toPrecision(2)} h`;
  return `${(s / 86400).toPrecision(2)} days`;
}

/**
 * Sites of the longest sub-chain the free-fermion solver works on: a term's causal cone is the
 * interval of radius t - 1 around Z sites (and Z_j Z_j+1) and t around X sites, clipped to the chain.
 */
export function freeFermionSites(n: number, steps: number, obs: ObservableSpec): number {
  let widest = 0;
  for (const t of obs.terms) {
    if (t.factors.length === 0) continue;
    const qs = t.factors.map((f) => f.qubit);
    const r = t.factors.some((f) => f.op !== 'Z') ? steps : Math.max(0, steps - 1);
    const lo = Math.max(0, Math.min(...qs) - r);
    const hi = Math.min(n - 1, Math.max(...qs) + r);
    widest = Math.max(widest, hi - lo + 1);
  }
  return widest;
}

/** Plan every target of a validated challenge. */
export function planChallenge(challenge: ValidatedChallenge, options: PlannerOptions = {}): TargetPlan[] {
  return new Planner(challenge, options).planAll();
}
