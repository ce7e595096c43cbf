/**
 * Light-cone statevector: one run on the observable's (support-based) union light cone of c <=
 * coneQubitLimit qubits, work ~ 2^c amplitudes x (gates in the cone + terms) at STATEVECTOR_RATE;
 * or, for a sum whose union is too wide or too slow, one run per term on that term's own cone
 * (the reference runner does the same), so the reasons quote the widest single-term cone too.
 */
import type { ObservableSpec } from '../circuit';
import type { Instance } from '../compile';
import { termKey, type PlannerCones, type EstimateInput } from './cones';
import { STATEVECTOR_OVERHEAD_S, STATEVECTOR_RATE } from './rates';
import type { MethodCost, Reason } from './types';

/** Estimated seconds of one statevector run on `qubits` qubits through `gates` gates and `terms` terms. */
export function statevectorSeconds(qubits: number, gates: number, terms: number): number {
  return STATEVECTOR_OVERHEAD_S + (2 ** qubits * Math.max(1, gates + terms)) / STATEVECTOR_RATE;
}

export interface PerTermCones {
  /** the widest single-term cone and its term index */
  maxQubits: number;
  widestIndex: number;
  /** estimated seconds of one run per term */
  seconds: number;
}

export class LightConeStatevectorEstimator {
  private readonly perTermCache = new Map<string, PerTermCones>();

  constructor(private readonly cones: PlannerCones) {}

  estimate({ options: o, inst, obs, union }: EstimateInput): MethodCost {
    const c = union.qubits;
    let seconds = c > o.coneQubitLimit ? Infinity : statevectorSeconds(c, union.gates, obs.terms.length);
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
    return { method: 'light-cone-statevector', size, unit: 'qubits', seconds, ...(why ? { why } : {}), ...(perTerm ? { perTerm } : {}) };
  }

  /** Widest single-term light cone (and its term index) and the estimated time of one statevector run per term. */
  perTermCones(inst: Instance, obs: ObservableSpec): PerTermCones {
    const p = inst.params;
    const key = p.family === 'kicked-ising' ? `${p.steps}|${obs.id}` : `g|${obs.id}`;
    let r = this.perTermCache.get(key);
    if (!r) {
      let maxQubits = 0;
      let widestIndex = -1;
      let seconds = 0;
      obs.terms.forEach((t, k) => {
        if (t.factors.length === 0) return;
        const cs = this.cones.coneStats(inst, [t], termKey(t));
        if (cs.qubits > maxQubits) {
          maxQubits = cs.qubits;
          widestIndex = k;
        }
        seconds += statevectorSeconds(cs.qubits, cs.gates, 1);
      });
      r = { maxQubits, widestIndex, seconds };
      this.perTermCache.set(key, r);
    }
    return r;
  }
}
