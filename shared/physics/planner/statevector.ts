/** Full statevector: the whole register, n <= statevectorQubitLimit; work ~ 2^n x (gates + terms) at STATEVECTOR_RATE. */
import { statevectorSeconds } from './light-cone-statevector';
import type { EstimateInput } from './cones';
import type { MethodCost } from './types';

export function estimateStatevector({ challenge, options: o, cones, inst, obs }: EstimateInput): MethodCost {
  const n = challenge.nQubits;
  const base = { method: 'statevector', size: n, unit: 'qubits' } as const;
  if (n > o.statevectorQubitLimit) return { ...base, seconds: Infinity, why: { code: 'register-limit', qubits: n, limit: o.statevectorQubitLimit } };
  const seconds = statevectorSeconds(n, cones.totalGates(inst), obs.terms.length);
  if (seconds > o.secondsBudget) return { ...base, seconds, why: { code: 'over-time', method: 'statevector', seconds, budget: o.secondsBudget, qubits: n } };
  return { ...base, seconds };
}
