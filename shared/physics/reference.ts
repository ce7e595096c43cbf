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
import { freeFermionSites, Planner, type ExactMethod, type MethodEstimate, type PlannerOptions, type TargetPlan } from './planner';
import { statevectorExpectation } from './statevector';

export const ENGINE_VERSION = 'parallax-engine 0.1.0';

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
    this.planner = new Planner(challenge, options);
  }

  plan(target: Target): TargetPlan {
    return this.planner.plan(target);
  }

  /** Plan (unless a plan is given) and compute one target. */
  run(target: Target, plan: TargetPlan = this.planner.plan(target)): ReferenceResult {
    const feasible = plan.estimates.filter((e) => e.feasible).sort((a, b) => a.seconds - b.seconds);
    if (!feasible.length) return { value: null, reason: plan.reason ?? 'no exact method is feasible', engineVersion: ENGINE_VERSION };
    const inst = this.planner.instance(target.instanceId);
    const obs = this.planner.observable(target.observableId);
    const failures: string[] = [];
    for (const est of feasible) {
      const t0 = now();
      try {
        const r = this.runMethod(est, inst, obs);
        if (r.ok) {
          return {
            value: r.value, method: est.method, size: r.size, unit: est.unit, wallMs: now() - t0, engineVersion: ENGINE_VERSION,
            detail: this.detail(est.method, r, plan, obs),
          };
        }
        failures.push(`${est.method}: ${r.reason}`);
      } catch (e) {
        failures.push(`${est.method} failed: ${e instanceof Error ? e.message : String(e)}`);
      }
    }
    return { value: null, reason: failures.join('; '), engineVersion: ENGINE_VERSION };
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
  ): { ok: true; value: number; size: number; perTerm?: boolean } | { ok: false; reason: string } {
    const progress = this.options.onProgress;
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
            onProgress: progress && obs.terms.length === 1 ? (d, t) => progress(d / t) : undefined,
          });
          if (!r.exact) return { ok: false, reason: `term ${k} outgrew the term budget of ${budget} terms (value not exact)` };
          value += r.value;
          size += r.peakTerms;
          if (progress && obs.terms.length > 1) progress((k + 1) / obs.terms.length);
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
            onProgress: progress ? (d, t) => progress(d / t) : undefined,
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
          value += term.coef * lightConeStatevectorValue(one.circuit, one.observable, { maxQubits: limit }).value;
          progress?.((k + 1) / obs.terms.length);
        });
        return { ok: true, value, size: widest, perTerm: true };
      }
      case 'statevector': {
        const circ = this.circuit(inst);
        const r = statevectorExpectation(circ, obs, {
          maxQubits: this.planner.options.statevectorQubitLimit,
          onProgress: progress ? (d, t) => progress(d / t) : undefined,
        });
        return { ok: true, value: r.value, size: circ.nQubits };
      }
    }
  }

  private detail(method: ExactMethod, r: { size: number; perTerm?: boolean }, plan: TargetPlan, obs: ObservableSpec): string {
    const n = this.challenge.nQubits;
    const terms = obs.terms.length;
    const each = terms > 1 ? `, one run per term (${terms} terms)` : '';
    switch (method) {
      case 'pauli-propagation':
        return `exact Pauli propagation${plan.clifford ? ' at a Clifford point (no branching)' : ''}, no truncation, ${r.size} term${r.size === 1 ? '' : 's'} in all${each}`;
      case 'free-fermion':
        return `free-fermion (Majorana covariance) on sub-chains of up to ${r.size} of ${n} sites`;
      case 'light-cone-statevector':
        return `light-cone statevector on ${r.size} of ${n} qubits${r.perTerm ? each : ''}`;
      case 'statevector':
        return `full statevector on ${n} qubits`;
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

/** One-shot helper: plan and compute a single target. */
export function computeReference(challenge: ValidatedChallenge, target: Target, options: ReferenceOptions = {}): ReferenceResult {
  return new ReferenceRunner(challenge, options).run(target);
}
