/**
 * Exact Pauli propagation (no truncation), one run per observable term on that term's cone: a
 * Clifford instance (every rotation angle a multiple of pi/2) never branches, so each run holds one
 * string at any size. Otherwise a term can at most double at each non-Clifford rotation inside its
 * light cone and never exceeds the 4^c strings on the c qubits its cone has reached so far (a bound
 * like 2^k, capped). Known to fit within the term budget; past it, attempted under the budget and
 * a time cap (the bound is loose: often 4x to hundreds of times high). Work ~ sum over the cone's
 * gates of the bound at that gate, at PROPAGATION_RATE term-gate updates/s.
 */
import type { ObservableSpec, PauliTerm } from '../circuit';
import type { ValidatedChallenge } from '../challenge';
import type { Instance } from '../compile';
import { isCliffordAngle } from '../light-cone';
import { termKey, type PlannerCones, type EstimateInput } from './cones';
import { OTHER_OVERHEAD_S, PROPAGATION_RATE } from './rates';
import type { MethodCost } from './types';

/** Is every rotation of the instance a multiple of pi/2? */
export function isCliffordInstance(challenge: ValidatedChallenge, inst: Instance): boolean {
  const c = challenge.spec.circuit;
  if (c.family === 'kicked-ising' && inst.params.family === 'kicked-ising') {
    return inst.params.steps === 0 || (isCliffordAngle(inst.params.thetaH) && isCliffordAngle(inst.params.thetaJ));
  }
  if (c.family === 'gates') return c.gates.every((g) => !g.params || g.params.every(isCliffordAngle));
  return false;
}

/** log2(2^a + 2^b) without overflow (-Infinity is log2 0). */
const log2Sum = (a: number, b: number) => (a === -Infinity ? b : b === -Infinity ? a : Math.max(a, b) + Math.log2(1 + 2 ** -Math.abs(a - b)));

export interface TermBound {
  /** log2 of the bound on the Pauli terms at the end */
  log2Terms: number;
  /** bound on the term-gate updates (terms held, summed over the kept gates) */
  work: number;
  /** a sum (each term runs on its own): the term with the largest bound */
  largestTerm?: { log2Terms: number; index: number };
}

export class PropagationEstimator {
  private readonly termCache = new Map<string, TermBound>();
  private readonly observableCache = new Map<string, TermBound>();

  constructor(private readonly cones: PlannerCones) {}

  estimate({ options: o, inst, obs, union }: EstimateInput): MethodCost {
    // one propagation per term on its own cone (reference.ts does the same), so the bounds add;
    // at a Clifford instance every term stays one string and the work is the cone's gate count
    const { log2Terms, work, largestTerm } = this.observableBound(inst, obs);
    const terms = 2 ** log2Terms;
    const seconds = OTHER_OVERHEAD_S + work / PROPAGATION_RATE;
    const base = { method: 'pauli-propagation', unit: 'terms', seconds } as const;
    if (terms > o.termBudget) {
      return { ...base, size: o.termBudget, attempt: true, why: { code: 'term-bound', log2Terms, budget: o.termBudget, nonClifford: union.nonClifford, ...(largestTerm ? { largestTerm } : {}) } };
    }
    if (seconds > o.secondsBudget) return { ...base, size: Math.round(terms), why: { code: 'over-time', method: 'pauli-propagation', seconds, budget: o.secondsBudget } };
    return { ...base, size: Math.round(terms) };
  }

  /** Sum of termBound over the observable's terms, cached per (steps, Clifford flags, observable). */
  observableBound(inst: Instance, obs: ObservableSpec): TermBound {
    const p = inst.params;
    const key =
      p.family === 'kicked-ising'
        ? `${p.steps}|${isCliffordAngle(p.thetaH) ? 1 : 0}${isCliffordAngle(p.thetaJ) ? 1 : 0}|${obs.id}`
        : `g|${obs.id}`;
    let b = this.observableCache.get(key);
    if (!b) {
      let log2Terms = -Infinity;
      let work = 0;
      let largest = { log2Terms: -Infinity, index: -1 };
      obs.terms.forEach((t, index) => {
        const x = this.termBound(inst, t);
        log2Terms = log2Sum(log2Terms, x.log2Terms);
        work += x.work;
        if (x.log2Terms > largest.log2Terms) largest = { log2Terms: x.log2Terms, index };
      });
      b = { log2Terms, work, ...(obs.terms.length > 1 ? { largestTerm: largest } : {}) };
      this.observableCache.set(key, b);
    }
    return b;
  }

  /**
   * Upper bound on the Pauli terms one term grows to, and on the term-gate updates, walking the
   * cone backwards: each non-Clifford rotation at most doubles the count, which never exceeds the
   * 4^c strings on the c qubits the cone has reached so far. Once the cone holds every gate before
   * (light-cone.ts's closed form), the remaining gates are charged the final bound.
   */
  termBound(inst: Instance, term: PauliTerm): TermBound {
    const key = termKey(term);
    if (this.cones.gatesCircuit) {
      let b = this.termCache.get(key);
      if (!b) {
        let log2T = 0;
        let work = 0;
        this.cones.countGates([term], {
          kept(non, qubits) {
            if (non) log2T = Math.min(log2T + 1, 2 * qubits);
            work += 2 ** log2T;
          },
          rest(gates, nonClifford, qubits) {
            log2T = Math.min(log2T + nonClifford, 2 * qubits);
            work += gates * 2 ** log2T;
          },
        });
        b = { log2Terms: log2T, work };
        this.termCache.set(key, b);
      }
      return b;
    }
    if (inst.params.family !== 'kicked-ising') throw new Error('instance family mismatch');
    const { steps, thetaH, thetaJ } = inst.params;
    const raw = this.cones.stepCone(steps, [term], key);
    const hNon = !isCliffordAngle(thetaH);
    const jNon = !isCliffordAngle(thetaJ);
    const b = raw.blocks;
    let log2T = 0;
    let work = 0;
    for (let i = 0; i < raw.blocksLen; i += 3) {
      const non = b[i] === 1 ? hNon : jNon;
      if (non) log2T = Math.min(log2T + b[i + 1], 2 * b[i + 2]);
      work += 2 ** log2T * b[i + 1];
    }
    return { log2Terms: log2T, work };
  }
}
