/** The planner's options, their defaults, and its policy thresholds (rates are in rates.ts). */
import { WASM_MAX_QUBITS } from '../statevector';
import { DEFAULT_TN_MEMORY_BYTES } from '../tensor-network/index';

export interface PlannerOptions {
  /** largest Pauli-term count accepted for exact propagation (default 1,000,000, ~100 MB) */
  termBudget?: number;
  /** largest light cone for the light-cone statevector (default 27 qubits = 2 GiB, where the WebAssembly kernel ends) */
  coneQubitLimit?: number;
  /** largest register for the full statevector (default 27) */
  statevectorQubitLimit?: number;
  /** largest estimated peak memory of one tensor-network slice in bytes (default 2 GiB); wider contractions are sliced */
  tnMemoryBytes?: number;
  /**
   * Run the contraction-order search to cost the tensor network (milliseconds to seconds per
   * distinct term and step count). Off by default, so a plan on a request path stays fast; the
   * ReferenceRunner (worker threads, npm run reference) turns it on.
   */
  tnSearch?: boolean;
  /** largest estimated time per target in seconds (default 600) */
  secondsBudget?: number;
  /**
   * threads that share the slices of one sliced contraction (default 1): a term of s slices is
   * costed at its contraction time / min(s, tnThreads)
   */
  tnThreads?: number;
}

/** The cone limits sit where the WebAssembly kernel ends: past it the plain JavaScript kernel is about 3.5x slower per amplitude. */
export const DEFAULT_PLANNER_OPTIONS: Required<PlannerOptions> = {
  termBudget: 1_000_000,
  coneQubitLimit: WASM_MAX_QUBITS,
  statevectorQubitLimit: WASM_MAX_QUBITS,
  tnMemoryBytes: DEFAULT_TN_MEMORY_BYTES,
  tnSearch: false,
  secondsBudget: 600,
  tnThreads: 1,
};

/** The given options over the defaults (undefined and unknown keys ignored). */
export function resolveOptions(options: PlannerOptions): Required<PlannerOptions> {
  const given = Object.fromEntries(Object.entries(options).filter(([k, v]) => v !== undefined && k in DEFAULT_PLANNER_OPTIONS));
  return { ...DEFAULT_PLANNER_OPTIONS, ...given };
}

/** Options of the order search shared by the planner's estimate and the runner (same plan both times). */
export function tnOptions(o: Required<PlannerOptions>): { memoryBytes: number } {
  return { memoryBytes: o.tnMemoryBytes };
}

/** Tensor-network estimates are computed only when no cheaper method is known to finish within this. */
export const TN_CONSIDER_SECONDS = 0.5;
/**
 * Largest light cone (gates of one term) whose network the order search takes on: the search costs
 * about a second per thousand tensors, and cones this deep have widths far past any memory budget.
 */
export const TN_MAX_CONE_GATES = 1000;
/** A propagation attempt past its term bound gets this share of the next method's time (at least 1 s). */
export const ATTEMPT_SHARE = 0.1;
