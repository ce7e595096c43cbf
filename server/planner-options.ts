/**
 * The one translation of the configured reference budget (REFERENCE_SECONDS_BUDGET,
 * REFERENCE_CONE_QUBITS) into planner options. The public /plan, the authoring preview and the
 * reference job all plan with it, so the plan never promises an exact method that the reference
 * job will not run.
 */
import type { PlannerOptions } from '@shared/physics/planner';
import { WASM_MAX_QUBITS } from '@shared/physics/statevector';

export interface ReferenceBudget {
  secondsPerTarget: number;
  coneQubitLimit: number;
  /** memory budget of one tensor-network slice (the planner's default when unset) */
  tnMemoryBytes?: number;
  /** threads that share a sliced contraction's slices (REFERENCE_THREADS); 1 when unset */
  tnThreads?: number;
}
/** The defaults of server/config.ts (a worker started without a budget uses them too). */
/** the cone limit is where the fast (WebAssembly) statevector kernel ends (WASM_MAX_QUBITS, 27); ten minutes per target, so that weight-17 observables of a 100+-qubit heavy-hex patch at 5 steps (minutes each by contraction) get exact values */
export const DEFAULT_REFERENCE_BUDGET: ReferenceBudget = { secondsPerTarget: 600, coneQubitLimit: WASM_MAX_QUBITS };

export function plannerOptions(b: ReferenceBudget = DEFAULT_REFERENCE_BUDGET): PlannerOptions {
  return { secondsBudget: b.secondsPerTarget, coneQubitLimit: b.coneQubitLimit, statevectorQubitLimit: b.coneQubitLimit, ...(b.tnMemoryBytes ? { tnMemoryBytes: b.tnMemoryBytes } : {}), ...(b.tnThreads ? { tnThreads: b.tnThreads } : {}) };
}
