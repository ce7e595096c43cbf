/**
 * Exact reference values: run the method the planner chose for a target (falling back to the next
 * feasible method by estimated cost if the first one fails, e.g. propagation outgrowing its term
 * budget), and record its provenance: method, size, wall time, engine version.
 *
 * No framework or node: imports.
 */
import type { CompiledCircuit, ObservableSpec } from './circuit';
import type { ValidatedChallenge } from './challenge';
import { compileInstance, type Instance, type Target } from './compile';
import { freeFermionExpectation } from './free-fermion';
import { lightConeStatevectorValue } from './light-cone-statevector';
import { propagate } from './pauli-propagation';
import { freeFermionSites, METHOD_NAMES, Planner, tnOptions, ATTEMPT_SHARE, type ExactMethod, type MethodEstimate, type PlannerOptions, type TargetPlan } from './planner';
import { statevectorExpectation } from './statevector';
import { contractPlan, planTerm, type TnTermPlan } from './tensor-network/index';

/** 0.2.0: the tensor-network rung, cross-checks recorded with references, recalibrated planner. 0.3.0: elimination orders in the contraction-order search (far narrower trees on deep 2D cones), the WebAssembly GEMM kernel, sliced contractions on threads and as slice jobs; ten-minute default budget. 0.4.0: contractions costed from flops and pairwise steps (planner/rates.ts tnSeconds) and shared among the slice threads; plans past 2^34 flops cut into 8 or more slices (docs/decisions/0008). */
export const ENGINE_VERSION = 'parallax-engine 0.4.0';

/** Cross-check with a second exact method when the light cone has at most this many qubits. */
export const CROSS_CHECK_MAX_QUBITS = 20;
/** ... or when the second method is estimated to take at most this long (seconds). */
export const CROSS_CHECK_SECONDS = 5;

/** Thrown from a progress callback to stop a method that overran its time cap. */
export class OverrunError extends Error {
  constructor(readonly method: ExactMethod, readonly capSeconds: number) {
    super(`${METHOD_NAMES[method]} stopped after its cap of ${capSeconds.toPrecision(2)} s`);
  }
}

export interface CrossCheck {
  method: ExactMethod;
  value: number;
  absDiff: number;
  wallMs: number;
}

/** Run statistics of a method (tensor network: width, flops, slices). */
export interface RunStats {
  width?: number;
  flops?: number;
  slices?: number;
}

export interface ReferenceValue {
  value: number;
  method: ExactMethod;
  /** terms (propagation: peak terms held), cone qubits, chain sites or register qubits */
  size: number;
  unit: MethodEstimate['unit'];
  wallMs: number;
  engineVersion: string;
  /** one plain sentence of provenance, e.g. "light-cone statevector on 19 of 1017 qubits" */
  detail: string;
  /** tensor network: width (log2 of the largest intermediate per slice), total flops, slices */
  width?: number;
  flops?: number;
  slices?: number;
  /** a second exact method run on the same target, and the agreement */
  crossCheck?: CrossCheck;
}

export interface ReferenceMissing {
  value: null;
  /** plain sentence: why no exact method is feasible or why every attempt failed */
  reason: string;
  engineVersion: string;
}

export type ReferenceResult = ReferenceValue | ReferenceMissing;

export interface ReferenceOptions extends PlannerOptions {
  /** progress of the running method, 0..1 */
  onProgress?: (fraction: number) => void;
  /**
   * How the tensor network contracts one term's plan (default contractPlan, in this thread): the
   * server spreads a sliced plan's blocks over worker threads (server/jobs/slice-threads.ts). It
   * must call onStep often (the time cap throws from it).
   */
  contractTerm?: (plan: TnTermPlan, at: { term: number; terms: number; onStep: () => void }) => [number, number];
}

/** One term of an observable with its tensor-network plan (null for the identity). */
export interface TnTerm {
  coef: number;
  plan: TnTermPlan | null;
}

const now = () => (typeof performance !== 'undefined' ? performance.now() : Date.now());

/** Computes references for the targets of one challenge; reuses the planner's cone caches. */
export class ReferenceRunner {
  readonly planner: Planner;
  private circuits = new Map<string, CompiledCircuit>();

  constructor(
    readonly challenge: ValidatedChallenge,
    private readonly options: ReferenceOptions = {},
  ) {
    // the runner costs the tensor network with the order search (off by default in the planner)
    this.planner = new Planner(challenge, { tnSearch: true, ...options });
  }

  plan(target: Target): TargetPlan {
    return this.planner.plan(target);
  }

  /**
   * Plan (unless a plan is given) and compute one target: methods known to finish, cheapest first;
   * before them, when the cheapest is slow or there is none, exact Pauli propagation past its loose
   * bound is attempted under the term budget and a time cap. A method that overruns its cap is
   * stopped and the next one tried. Then, where a second exact method is cheap, it runs too and the
   * agreement is recorded (crossCheck).
   */
  run(target: Target, plan: TargetPlan = this.planner.plan(target)): ReferenceResult {
    const o = this.planner.options;
    const certain = plan.estimates.filter((e) => e.feasible).sort((a, b) => a.seconds - b.seconds);
    const attempts = plan.estimates.filter((e) => e.attempt);
    const order: { est: MethodEstimate; cap: number }[] = [];
    const cheapest = certain.length ? certain[0].seconds : Infinity;
    for (const est of attempts) {
      if (cheapest <= 1) continue;
      order.push({ est, cap: Math.min(o.secondsBudget, Math.max(1, ATTEMPT_SHARE * (Number.isFinite(cheapest) ? cheapest : o.secondsBudget))) });
    }
    certain.forEach((est, k) => {
      // the last method gets the whole budget; others are stopped well past their estimate
      const last = k === certain.length - 1;
      order.push({ est, cap: last ? 2 * o.secondsBudget : Math.min(2 * o.secondsBudget, Math.max(10, 4 * est.seconds)) });
    });
    if (!order.length) return { value: null, reason: plan.reason ?? 'no exact method is feasible', engineVersion: ENGINE_VERSION };
    const inst = this.planner.instance(target.instanceId);
    const obs = this.planner.observable(target.observableId);
    const failures: string[] = [];
    for (const { est, cap } of order) {
      const t0 = now();
      try {
        const r = this.runMethod(est, inst, obs, cap);
        if (r.ok) {
          const wallMs = now() - t0;
          const crossCheck = this.crossCheck(est.method, r.value, plan, inst, obs);
          const stats: RunStats = r.stats ?? {};
          return {
            value: r.value, method: est.method, size: r.size, unit: est.unit, wallMs, engineVersion: ENGINE_VERSION,
            detail: this.detail(est.method, r, plan, obs, crossCheck), ...stats, ...(crossCheck ? { crossCheck } : {}),
          };
        }
        failures.push(`${METHOD_NAMES[est.method]}: ${r.reason}`);
      } catch (e) {
        failures.push(`${METHOD_NAMES[est.method]}${e instanceof OverrunError ? ' overran' : ' failed'}: ${e instanceof Error ? e.message : String(e)}`);
      }
    }
    const why = plan.reason ? `${plan.reason}; ` : '';
    return { value: null, reason: `${why}${failures.join('; ')}`, engineVersion: ENGINE_VERSION };
  }

  /**
   * A second exact method for the same target, when one is cheap: the tensor network when the
   * chosen method was another and the cone has at most CROSS_CHECK_MAX_QUBITS qubits; otherwise
   * the cheapest other method known to finish within CROSS_CHECK_SECONDS; for a tensor-network
   * reference without one, exact propagation under a short cap (it finishes at Clifford points).
   */
  private crossCheck(method: ExactMethod, value: number, plan: TargetPlan, inst: Instance, obs: ObservableSpec): CrossCheck | undefined {
    const others = plan.estimates.filter((e) => e.feasible && e.method !== method && e.seconds <= CROSS_CHECK_SECONDS).sort((a, b) => a.seconds - b.seconds);
    let pick: Pick<MethodEstimate, 'method' | 'perTerm'> | undefined;
    let cap = CROSS_CHECK_SECONDS;
    if (method !== 'tensor-network' && plan.cone.qubits <= CROSS_CHECK_MAX_QUBITS) pick = { method: 'tensor-network' };
    else if (others.length) pick = others[0];
    else if (method === 'tensor-network' && plan.estimates.some((e) => e.method === 'pauli-propagation' && e.attempt)) {
      pick = { method: 'pauli-propagation' };
      cap = 2;
    }
    if (!pick) return undefined;
    const t0 = now();
    try {
      const r = this.runMethod(pick, inst, obs, cap);
      if (!r.ok) return undefined;
      return { method: pick.method, value: r.value, absDiff: Math.abs(r.value - value), wallMs: now() - t0 };
    } catch {
      return undefined;
    }
  }

  /**
   * Run one named method regardless of cost (for cross-checks). The light-cone statevector runs
   * once on the union cone, or once per term when `perTerm` is set or the union is wider than the
   * cone limit.
   */
  runMethod(
    est: Pick<MethodEstimate, 'method' | 'perTerm'>,
    inst: Instance,
    obs: ObservableSpec,
    capSeconds = Infinity,
  ): { ok: true; value: number; size: number; perTerm?: boolean; stats?: RunStats } | { ok: false; reason: string } {
    const userProgress = this.options.onProgress;
    const deadline = now() + capSeconds * 1000;
    const check = () => {
      if (now() > deadline) throw new OverrunError(est.method, capSeconds);
    };
    // every method reports progress often; the cap is checked there
    const progress = (f: number) => {
      check();
      userProgress?.(f);
    };
    const identityOnly = obs.terms.every((t) => t.factors.length === 0);
    if (identityOnly) {
      let v = 0;
      for (const t of obs.terms) v += t.coef;
      return { ok: true, value: v, size: obs.terms.length };
    }
    switch (est.method) {
      case 'pauli-propagation': {
        // one run per term on its own light cone (the engine's cost per gate is linear in the terms
        // held, so a sum over distant sites is far cheaper term by term); size = sum of the peaks
        const budget = this.planner.options.termBudget;
        let value = 0;
        let size = 0;
        for (let k = 0; k < obs.terms.length; k++) {
          const term = obs.terms[k];
          if (term.factors.length === 0) {
            value += term.coef;
            size += 1;
            continue;
          }
          const one: ObservableSpec = obs.terms.length === 1 ? obs : { id: `${obs.id}#${k}`, terms: [term] };
          const sub = this.planner.restrict(inst, one);
          const r = propagate(sub.circuit, sub.observable, {
            maxTerms: budget,
            onProgress: (d, t) => (obs.terms.length === 1 ? progress(d / t) : check()),
          });
          if (!r.exact) return { ok: false, reason: `term ${k + 1} outgrew the term budget of ${budget} terms (value not exact)` };
          value += r.value;
          size += r.peakTerms;
          if (obs.terms.length > 1) progress((k + 1) / obs.terms.length);
        }
        return { ok: true, value, size };
      }
      case 'free-fermion': {
        if (inst.params.family !== 'kicked-ising') return { ok: false, reason: 'not a kicked-ising instance' };
        if (this.challenge.spec.lattice.kind !== 'chain') return { ok: false, reason: 'not a chain' };
        const p = inst.params;
        const r = freeFermionExpectation({ n: this.challenge.nQubits, thetaJ: p.thetaJ, thetaH: p.thetaH, steps: p.steps }, obs);
        if (!r.ok) return { ok: false, reason: r.reason };
        return { ok: true, value: r.value, size: freeFermionSites(this.challenge.nQubits, p.steps, obs) };
      }
      case 'light-cone-statevector': {
        const limit = this.planner.options.coneQubitLimit;
        const sub = est.perTerm ? null : this.planner.restrict(inst, obs);
        if (sub && (sub.circuit.nQubits <= limit || obs.terms.length === 1)) {
          const r = lightConeStatevectorValue(sub.circuit, sub.observable, {
            maxQubits: limit,
            onProgress: (d, t) => progress(d / t),
          });
          return { ok: true, value: r.value, size: sub.circuit.nQubits };
        }
        // one run per term on its own cone
        let value = 0;
        let widest = 0;
        obs.terms.forEach((term, k) => {
          if (term.factors.length === 0) {
            value += term.coef;
            return;
          }
          const one = this.planner.restrict(inst, { id: `${obs.id}#${k}`, terms: [{ coef: 1, factors: term.factors }] });
          widest = Math.max(widest, one.circuit.nQubits);
          value += term.coef * lightConeStatevectorValue(one.circuit, one.observable, { maxQubits: limit, onProgress: () => check() }).value;
          progress((k + 1) / obs.terms.length);
        });
        return { ok: true, value, size: widest, perTerm: true };
      }
      case 'statevector': {
        const circ = this.circuit(inst);
        const r = statevectorExpectation(circ, obs, {
          maxQubits: this.planner.options.statevectorQubitLimit,
          onProgress: (d, t) => progress(d / t),
        });
        return { ok: true, value: r.value, size: circ.nQubits };
      }
      case 'tensor-network': {
        // term by term on each term's light cone, with the planner's search options (same plan)
        let value = 0;
        const stats = { width: 0, flops: 0, slices: 1 };
        let widestCone = 0;
        obs.terms.forEach((term, k) => {
          if (term.factors.length === 0) {
            value += term.coef;
            return;
          }
          const plan = this.tnPlan(inst, obs, k);
          check();
          const [re] = this.options.contractTerm ? this.options.contractTerm(plan, { term: k, terms: obs.terms.length, onStep: check }) : contractPlan(plan, { onStep: check });
          value += term.coef * re;
          stats.width = Math.max(stats.width, plan.width);
          stats.flops += plan.flops;
          stats.slices = Math.max(stats.slices, plan.slices);
          widestCone = Math.max(widestCone, plan.coneQubits);
          progress((k + 1) / obs.terms.length);
        });
        return { ok: true, value, size: stats.width, stats, perTerm: obs.terms.length > 1 };
      }
    }
  }

  /** The tensor-network plan of term k of an observable on its own light cone (the planner's search options). */
  tnPlan(inst: Instance, obs: ObservableSpec, k: number): TnTermPlan {
    const one = this.planner.restrict(inst, { id: `${obs.id}#${k}`, terms: [{ coef: 1, factors: obs.terms[k].factors }] });
    return planTerm(one.circuit, one.observable.terms[0].factors, tnOptions(this.planner.options));
  }

  /** Every term of a target's observable with its tensor-network plan, as the tensor-network method runs them. */
  tnTerms(target: Target): TnTerm[] {
    const inst = this.planner.instance(target.instanceId);
    const obs = this.planner.observable(target.observableId);
    return obs.terms.map((t, k) => ({ coef: t.coef, plan: t.factors.length ? this.tnPlan(inst, obs, k) : null }));
  }

  /** The provenance sentence of a tensor-network value computed elsewhere (as slice jobs), from its terms' plans. */
  tnDetail(target: Target, plan: TargetPlan, terms: TnTerm[]): string {
    const stats = tnStats(terms);
    return this.detail('tensor-network', { size: stats.width, stats, perTerm: terms.length > 1 }, plan, this.planner.observable(target.observableId));
  }

  private detail(method: ExactMethod, r: { size: number; perTerm?: boolean; stats?: RunStats }, plan: TargetPlan, obs: ObservableSpec, cc?: CrossCheck): string {
    const n = this.challenge.nQubits;
    const terms = obs.terms.length;
    const each = terms > 1 ? `, one run per term (${terms} terms)` : '';
    const check = cc ? `; cross-checked by ${METHOD_NAMES[cc.method]}, |diff| ${cc.absDiff.toExponential(0)}` : '';
    switch (method) {
      case 'pauli-propagation':
        return `exact Pauli propagation${plan.clifford ? ' at a Clifford point (no branching)' : ''}, no truncation, ${r.size} term${r.size === 1 ? '' : 's'} in all${each}${check}`;
      case 'free-fermion':
        return `free-fermion (Majorana covariance) on sub-chains of up to ${r.size} of ${n} sites${check}`;
      case 'light-cone-statevector':
        return `light-cone statevector on ${r.size} of ${n} qubits${r.perTerm ? each : ''}${check}`;
      case 'tensor-network': {
        const s = r.stats ?? {};
        return `tensor-network contraction of the light cone, width ${s.width}, 2^${Math.log2(Math.max(1, s.flops ?? 1)).toFixed(1)} flops${(s.slices ?? 1) > 1 ? `, ${s.slices} slices` : ''}${each}${check}`;
      }
      case 'statevector':
        return `full statevector on ${n} qubits${check}`;
    }
  }

  /** The full compiled circuit of an instance (cached). */
  circuit(inst: Instance): CompiledCircuit {
    let c = this.circuits.get(inst.id);
    if (!c) {
      c = compileInstance(this.challenge.spec, inst, this.planner.lattice);
      if (this.circuits.size > 16) this.circuits.clear();
      this.circuits.set(inst.id, c);
    }
    return c;
  }
}

/** Width (widest term), flops (all terms) and slices (most of one term) of a tensor-network run. */
export function tnStats(terms: readonly TnTerm[]): { width: number; flops: number; slices: number } {
  const s = { width: 0, flops: 0, slices: 1 };
  for (const t of terms) {
    if (!t.plan) continue;
    s.width = Math.max(s.width, t.plan.width);
    s.flops += t.plan.flops;
    s.slices = Math.max(s.slices, t.plan.slices);
  }
  return s;
}

/** One-shot helper: plan and compute a single target. */
export function computeReference(challenge: ValidatedChallenge, target: Target, options: ReferenceOptions = {}): ReferenceResult {
  return new ReferenceRunner(challenge, options).run(target);
}
