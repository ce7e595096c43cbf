/**
 * The one translation of the configured reference budget (REFERENCE_SECONDS_BUDGET,
 * REFERENCE_CONE_QUBITS) into planner options. The public /plan, the authoring preview and the
 * reference job all plan with it, so the plan never promises an exact method that the reference
 * job will not run.
 */
import type { PlannerOptions } from '@shared/physics/planner';

export interface ReferenceBudget { secondsPerTarget: number; coneQubitLimit: number }
/** The defaults of server/config.ts (a worker started without a budget uses them too). */
export const DEFAULT_REFERENCE_BUDGET: ReferenceBudget = { secondsPerTarget: 120, coneQubitLimit: 26 };

export function plannerOptions(b: ReferenceBudget = DEFAULT_REFERENCE_BUDGET): PlannerOptions {
  return { secondsBudget: b.secondsPerTarget, coneQubitLimit: b.coneQubitLimit, statevectorQubitLimit: b.coneQubitLimit };
}
