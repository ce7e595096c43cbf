/**
 * Tensor-network contraction, term by term on each term's light-cone network: costed from the
 * order search (width, flops) only when nothing cheaper is known to finish quickly (the search
 * itself takes milliseconds to seconds); seconds = search time + the path's cost (tnSeconds: flops and pairwise steps), the contraction divided among the slice
 * threads (tnThreads) when the plan has several slices.
 */
import type { ObservableSpec } from '../circuit';
import type { Instance } from '../compile';
import { planTerm } from '../tensor-network/index';
import { termKey, type PlannerCones, type EstimateInput } from './cones';
import { TN_CONSIDER_SECONDS, TN_MAX_CONE_GATES, tnOptions, type PlannerOptions } from './options';
import { OTHER_OVERHEAD_S, tnSeconds } from './rates';
import type { MethodCost, Reason, TnTermCost } from './types';

const nowMs = () => (typeof performance !== 'undefined' ? performance.now() : Date.now());

export interface TnObservableCost {
  width: number;
  flops: number;
  slices: number;
  memoryBytes: number;
  seconds: number;
  terms: (TnTermCost & { index: number })[];
}

export class TensorNetworkEstimator {
  private readonly cache = new Map<string, TnTermCost>();

  constructor(
    private readonly cones: PlannerCones,
    private readonly options: Required<PlannerOptions>,
  ) {}

  /** `cheapest`: the estimated seconds of the cheapest method known to finish (Infinity if none). */
  estimate({ options: o, inst, obs }: EstimateInput, cheapest: number): MethodCost {
    const none = (why: Reason): MethodCost => ({ method: 'tensor-network', size: 0, unit: 'width', seconds: Infinity, why });
    if (cheapest <= TN_CONSIDER_SECONDS) return none({ code: 'tn-not-needed', seconds: cheapest });
    if (!o.tnSearch) return none({ code: 'tn-not-searched' });
    let gates = 0;
    for (const t of obs.terms) if (t.factors.length) gates = Math.max(gates, this.cones.coneStats(inst, [t], termKey(t)).gates);
    if (gates > TN_MAX_CONE_GATES) return none({ code: 'tn-network-too-large', gates, limit: TN_MAX_CONE_GATES });
    const tn = this.cost(inst, obs);
    const seconds = tn.seconds;
    let why: Reason | undefined;
    const over = tn.terms.find((t) => t.memoryBytes > o.tnMemoryBytes);
    if (over) {
      why = { code: 'tn-over-memory', width: over.width, bytes: over.memoryBytes, budget: o.tnMemoryBytes, term: obs.terms.length > 1 ? over.index : -1, terms: obs.terms.length };
    } else if (seconds > o.secondsBudget) {
      const worst = tn.terms.reduce((m, t) => (t.flops > m.flops ? t : m), tn.terms[0]);
      why = { code: 'tn-over-time', seconds, budget: o.secondsBudget, width: worst.width, log2Flops: Math.log2(worst.flops), slices: worst.slices, term: obs.terms.length > 1 ? worst.index : -1, terms: obs.terms.length };
    }
    return {
      method: 'tensor-network', size: tn.width, unit: 'width', seconds, ...(why ? { why } : {}),
      tn: { width: tn.width, flops: tn.flops, slices: tn.slices, memoryBytes: tn.memoryBytes, terms: tn.terms },
    };
  }

  /**
   * Tensor-network cost of an observable, term by term: the order search runs on each term's
   * light-cone network (the structure does not depend on the angles, so the result is cached per
   * (steps, term)).
   */
  cost(inst: Instance, obs: ObservableSpec): TnObservableCost {
    const o = this.options;
    const terms: (TnTermCost & { index: number })[] = [];
    let seconds = 0, width = 0, flops = 0, slices = 1, memoryBytes = 0;
    obs.terms.forEach((t, index) => {
      if (t.factors.length === 0) return;
      const p = inst.params;
      const key = `${p.family === 'kicked-ising' ? p.steps : 'g'}|${termKey(t)}`;
      let c = this.cache.get(key);
      if (!c) {
        const sub = this.cones.restrict(inst, { id: `${obs.id}#${index}`, terms: [{ coef: 1, factors: t.factors }] });
        const t0 = nowMs();
        // one plain greedy run first: a network 1000 times over the time budget (or over the memory
        // budget even after slicing) stops there; otherwise the runner's own full search, so the
        // estimate is the plan that will run (same seed, same options)
        const quick = planTerm(sub.circuit, sub.observable.terms[0].factors, { ...tnOptions(o), restarts: 1, reconfigureK: 0 });
        const hopeless = tnSeconds(quick) > 1000 * o.secondsBudget || quick.memoryBytes > o.tnMemoryBytes;
        const plan = hopeless ? quick : planTerm(sub.circuit, sub.observable.terms[0].factors, tnOptions(o));
        c = { width: plan.width, flops: plan.flops, steps: plan.steps, slices: plan.slices, memoryBytes: plan.memoryBytes, coneQubits: plan.coneQubits, searchSeconds: (nowMs() - t0) / 1000 };
        if (this.cache.size > 4096) this.cache.clear();
        this.cache.set(key, c);
      }
      terms.push({ ...c, index });
      seconds += OTHER_OVERHEAD_S + c.searchSeconds + tnSeconds(c) / Math.max(1, Math.min(c.slices, Math.floor(o.tnThreads)));
      width = Math.max(width, c.width);
      flops += c.flops;
      slices = Math.max(slices, c.slices);
      memoryBytes = Math.max(memoryBytes, c.memoryBytes);
    });
    return { width, flops, slices, memoryBytes, seconds, terms };
  }
}
