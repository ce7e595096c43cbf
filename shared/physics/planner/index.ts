/**
 * Reference planner: for every target, estimate the cost of each applicable exact method BEFORE
 * running any, then pick the cheapest feasible one, or record in a plain sentence why no exact
 * method is feasible.
 *
 * One estimator per method, each returning a cost or a structured reason (types.ts Reason):
 * pauli-propagation.ts (exact propagation; Clifford instances never branch), free-fermion.ts,
 * light-cone-statevector.ts (union cone or one run per term), statevector.ts (the whole register),
 * tensor-network.ts (the order search's width and flops). Their rates are in rates.ts, each tied to
 * a benchmark; reasons become sentences in reasons.ts only; every light cone comes from
 * shared/physics/light-cone.ts (cached per (steps, support) in cones.ts).
 *
 * The cheapest feasible estimate wins, except that a Clifford instance takes propagation whenever
 * it is feasible (its value is then a signed sum of coefficients, free of rotation rounding).
 *
 * No framework or node: imports.
 */
import type { CompiledCircuit, ObservableSpec, PauliTerm } from '../circuit';
import type { ValidatedChallenge } from '../challenge';
import { compileLattice, type CompiledLattice, type Instance, type Target } from '../compile';
import { PlannerCones, type EstimateInput } from './cones';
import { FreeFermionEstimator } from './free-fermion';
import { LightConeStatevectorEstimator, type PerTermCones } from './light-cone-statevector';
import { resolveOptions, type PlannerOptions } from './options';
import { isCliffordInstance, PropagationEstimator, type TermBound } from './pauli-propagation';
import { infeasibleSentence, reasonText } from './reasons';
import { estimateStatevector } from './statevector';
import { TensorNetworkEstimator, type TnObservableCost } from './tensor-network';
import { METHOD_ORDER, type ConeStats, type MethodCost, type MethodEstimate, type TargetPlan } from './types';

export type { ConeStats, ExactMethod, MethodCost, MethodEstimate, Reason, TargetPlan, TnEstimate, TnTermCost } from './types';
export { METHOD_ORDER } from './types';
export { ATTEMPT_SHARE, DEFAULT_PLANNER_OPTIONS, TN_CONSIDER_SECONDS, TN_MAX_CONE_GATES, tnOptions, type PlannerOptions } from './options';
export { OTHER_OVERHEAD_S, PROPAGATION_RATE, STATEVECTOR_OVERHEAD_S, STATEVECTOR_RATE, TN_GEMM_RATE, TN_STEP_RATE, tnSeconds, FREE_FERMION_RATE, RATE_TOLERANCE } from './rates';
export { fmtBytes, fmtInt, fmtSeconds, METHOD_NAMES, reasonText } from './reasons';
export { freeFermionSites } from './free-fermion';
export { isCliffordInstance } from './pauli-propagation';

/** A structured cost as a plan shows it: feasible when there is no reason, the reason as a sentence. */
function shown(c: MethodCost): MethodEstimate {
  const { method, size, unit, seconds, why, ...extra } = c;
  return { method, feasible: !why, size, unit, seconds, ...extra, ...(why ? { why, reason: reasonText(why) } : {}) };
}

/**
 * The planner for one validated challenge. Holds the lattice, the cone caches and the estimators;
 * plan() is pure given its inputs.
 */
export class Planner {
  readonly options: Required<PlannerOptions>;
  readonly lattice: CompiledLattice;
  private readonly cones: PlannerCones;
  private readonly instances: Map<string, Instance>;
  private readonly observables: Map<string, ObservableSpec>;
  private readonly propagation: PropagationEstimator;
  private readonly freeFermion = new FreeFermionEstimator();
  private readonly lightCone: LightConeStatevectorEstimator;
  private readonly tensorNetwork: TensorNetworkEstimator;

  constructor(
    readonly challenge: ValidatedChallenge,
    options: PlannerOptions = {},
  ) {
    this.options = resolveOptions(options);
    this.lattice = compileLattice(challenge.spec);
    this.cones = new PlannerCones(challenge, this.lattice);
    this.instances = new Map(challenge.instances.map((i) => [i.id, i]));
    this.observables = new Map(challenge.observables.map((o) => [o.id, o]));
    this.propagation = new PropagationEstimator(this.cones);
    this.lightCone = new LightConeStatevectorEstimator(this.cones);
    this.tensorNetwork = new TensorNetworkEstimator(this.cones, this.options);
  }

  instance(id: string): Instance {
    const i = this.instances.get(id);
    if (!i) throw new Error(`unknown instance ${id}`);
    return i;
  }

  observable(id: string): ObservableSpec {
    const o = this.observables.get(id);
    if (!o) throw new Error(`unknown observable ${id}`);
    return o;
  }

  /** Plan every target of the challenge, in enumeration order. */
  planAll(): TargetPlan[] {
    return this.challenge.targets.map((t) => this.plan(t));
  }

  plan(target: Target): TargetPlan {
    const inst = this.instance(target.instanceId);
    const obs = this.observable(target.observableId);
    const clifford = isCliffordInstance(this.challenge, inst);
    const union = this.cones.coneStats(inst, obs.terms, `obs:${target.observableId}`);
    const input: EstimateInput = { challenge: this.challenge, options: this.options, cones: this.cones, inst, obs, union };
    const propagation = shown(this.propagation.estimate(input));
    const estimates: MethodEstimate[] = [propagation, shown(this.freeFermion.estimate(input)), shown(this.lightCone.estimate(input)), shown(estimateStatevector(input))];
    // the tensor network is costed only when nothing cheaper is known to finish quickly
    let cheapest = Infinity;
    for (const e of estimates) if (e.feasible) cheapest = Math.min(cheapest, e.seconds);
    estimates.push(shown(this.tensorNetwork.estimate(input, cheapest)));
    estimates.sort((x, y) => METHOD_ORDER.indexOf(x.method) - METHOD_ORDER.indexOf(y.method));

    // Cheapest feasible method; at a Clifford instance propagation is taken whenever feasible: its
    // value is a signed sum of coefficients, with no rounding from rotations.
    let best: MethodEstimate | null = null;
    for (const e of estimates) if (e.feasible && (!best || e.seconds < best.seconds)) best = e;
    if (clifford && propagation.feasible) best = propagation;
    const ids = { targetId: target.id, instanceId: inst.id, observableId: obs.id };
    if (best) {
      return { ...ids, method: best.method, size: best.size, unit: best.unit, estimatedSeconds: best.seconds, reason: null, cone: union, clifford, estimates };
    }
    return { ...ids, method: null, size: null, unit: null, estimatedSeconds: null, reason: infeasibleSentence(estimates), cone: union, clifford, estimates };
  }

  /** Light-cone statistics of a set of terms (their union) in one instance; `key` names the set. */
  coneStats(inst: Instance, terms: readonly PauliTerm[], key: string): ConeStats {
    return this.cones.coneStats(inst, terms, key);
  }

  /** The light-cone sub-circuit of an observable, re-indexed 0..k-1 (light-cone.ts). */
  restrict(inst: Instance, obs: ObservableSpec): { circuit: CompiledCircuit; observable: ObservableSpec; qubits: number[] } {
    return this.cones.restrict(inst, obs);
  }

  /** Bound on the Pauli terms one term grows to, and on its term-gate updates. */
  termBound(inst: Instance, term: PauliTerm): TermBound {
    return this.propagation.termBound(inst, term);
  }

  /** The same summed over an observable's terms. */
  observableBound(inst: Instance, obs: ObservableSpec): TermBound {
    return this.propagation.observableBound(inst, obs);
  }

  /** Widest single-term light cone and the estimated time of one statevector run per term. */
  perTermCones(inst: Instance, obs: ObservableSpec): PerTermCones {
    return this.lightCone.perTermCones(inst, obs);
  }

  /** Tensor-network cost of an observable, term by term (runs the order search). */
  tnCost(inst: Instance, obs: ObservableSpec): TnObservableCost {
    return this.tensorNetwork.cost(inst, obs);
  }
}

/** Plan every target of a validated challenge. */
export function planChallenge(challenge: ValidatedChallenge, options: PlannerOptions = {}): TargetPlan[] {
  return new Planner(challenge, options).planAll();
}
