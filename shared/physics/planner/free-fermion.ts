/**
 * Free fermions: an open chain, the kicked-ising family, an observable that is a sum of Z_j, X_j
 * and Z_j Z_j+1 (free-fermion.ts decides); cost from freeFermionCost's operation count at
 * FREE_FERMION_RATE.
 */
import type { ObservableSpec } from '../circuit';
import { freeFermionCost, freeFermionUnsupportedReason } from '../free-fermion';
import { chainCone } from '../light-cone';
import { OTHER_OVERHEAD_S } from './rates';
import type { EstimateInput } from './cones';
import type { MethodCost, Reason } from './types';

/** Sites of the longest sub-chain the free-fermion solver works on (each term's causal cone, light-cone.ts's chainCone). */
export function freeFermionSites(n: number, steps: number, obs: ObservableSpec): number {
  let widest = 0;
  for (const t of obs.terms) {
    if (t.factors.length === 0) continue;
    const qs = t.factors.map((f) => f.qubit);
    const [lo, hi] = chainCone(n, steps, Math.min(...qs), Math.max(...qs), t.factors.some((f) => f.op !== 'Z'));
    widest = Math.max(widest, hi - lo + 1);
  }
  return widest;
}

export class FreeFermionEstimator {
  /** the cost depends on the chain, the steps and the observable, not on the angles */
  private readonly cache = new Map<string, ReturnType<typeof freeFermionCost>>();

  estimate({ challenge, options: o, inst, obs }: EstimateInput): MethodCost {
    const spec = challenge.spec;
    const n = challenge.nQubits;
    const none = (why: Reason): MethodCost => ({ method: 'free-fermion', size: 0, unit: 'sites', seconds: Infinity, why });
    if (spec.lattice.kind !== 'chain') return none({ code: 'not-chain', lattice: spec.lattice.kind });
    if (spec.circuit.family !== 'kicked-ising' || inst.params.family !== 'kicked-ising') return none({ code: 'not-kicked-ising' });
    const text = freeFermionUnsupportedReason(n, obs);
    if (text) return none({ code: 'free-fermion-unsupported', text });
    const p = inst.params;
    const key = `${p.steps}|${obs.id}`;
    let cost = this.cache.get(key);
    if (cost === undefined) {
      cost = freeFermionCost({ n, thetaJ: p.thetaJ, thetaH: p.thetaH, steps: p.steps }, obs);
      this.cache.set(key, cost);
    }
    if (!cost) return none({ code: 'free-fermion-no-cost' });
    const seconds = OTHER_OVERHEAD_S + cost.seconds; // operations / FREE_FERMION_RATE (free-fermion.ts)
    const size = freeFermionSites(n, p.steps, obs);
    if (seconds > o.secondsBudget) return { method: 'free-fermion', size, unit: 'sites', seconds, why: { code: 'over-time', method: 'free-fermion', seconds, budget: o.secondsBudget } };
    return { method: 'free-fermion', size, unit: 'sites', seconds };
  }
}
