/** The planner's vocabulary: methods, estimates, plans and the structured reasons behind them. */

export type ExactMethod = 'pauli-propagation' | 'free-fermion' | 'light-cone-statevector' | 'tensor-network' | 'statevector';

/** Preference order when estimated costs tie. */
export const METHOD_ORDER: readonly ExactMethod[] = ['pauli-propagation', 'free-fermion', 'light-cone-statevector', 'tensor-network', 'statevector'];

/**
 * Why a method is not (known to be) feasible: a code and its numbers. reasons.ts turns one into a
 * sentence (reasonText) and joins a plan's reasons (infeasibleSentence); no other place writes them.
 */
export type Reason =
  | { code: 'term-bound'; log2Terms: number; budget: number; nonClifford: number; largestTerm?: { log2Terms: number; index: number } }
  | { code: 'over-time'; method: ExactMethod; seconds: number; budget: number; qubits?: number; terms?: number }
  | { code: 'not-chain'; lattice: string }
  | { code: 'not-kicked-ising' }
  /** `text`: the free-fermion engine's own sentence (freeFermionUnsupportedReason) */
  | { code: 'free-fermion-unsupported'; text: string }
  | { code: 'free-fermion-no-cost' }
  | { code: 'cone-limit'; qubits: number; limit: number; nonClifford: number; widestTerm?: { qubits: number; index: number } }
  | { code: 'register-limit'; qubits: number; limit: number }
  | { code: 'tn-not-needed'; seconds: number }
  | { code: 'tn-not-searched' }
  | { code: 'tn-network-too-large'; gates: number; limit: number }
  | { code: 'tn-over-memory'; width: number; bytes: number; budget: number; term: number; terms: number }
  | { code: 'tn-over-time'; seconds: number; budget: number; width: number; log2Flops: number; slices: number; term: number; terms: number };

/** Tensor-network figures of an estimate: width (after slicing), total flops, slices, peak bytes, per term. */
export interface TnEstimate {
  width: number;
  flops: number;
  slices: number;
  memoryBytes: number;
  /** per term: the path's figures (steps: the cost model's other part) and the order search's own time */
  terms: { index: number; width: number; flops: number; steps: number; slices: number; coneQubits: number; searchSeconds: number }[];
}

/** What one estimator returns: a cost, and `why` when the method is not (known to be) feasible. */
export interface MethodCost {
  method: ExactMethod;
  /** estimated size: Pauli terms, cone qubits, chain sites, register qubits or contraction width (see unit) */
  size: number;
  unit: 'terms' | 'qubits' | 'sites' | 'width';
  /** estimated wall time in seconds (Infinity when not applicable) */
  seconds: number;
  /** why not feasible (absent when feasible): a code and its numbers */
  why?: Reason;
  /**
   * Not known to finish, but worth trying under a cap (exact Pauli propagation past its loose term
   * bound: run with the term budget and a time cap, abandoned when it overruns)
   */
  attempt?: boolean;
  /** tensor network: width (after slicing), total flops, slices, peak bytes, per term */
  tn?: TnEstimate;
  /** light-cone statevector: one run per term (size is then the widest term cone) */
  perTerm?: boolean;
}

/** An estimate as a plan shows it: the cost, whether it is feasible, and the reason as a sentence. */
export interface MethodEstimate extends MethodCost {
  /** the method applies and its estimate is within every limit and the time budget */
  feasible: boolean;
  /** why not feasible (absent when feasible), as a sentence made by reasonText(why) */
  reason?: string;
}

export interface ConeStats {
  /** qubits in the light cone */
  qubits: number;
  /** gates inside the cone (the restricted circuit's size) */
  gates: number;
  /** non-Clifford rotations inside the cone */
  nonClifford: number;
}

export interface TargetPlan {
  targetId: string;
  instanceId: string;
  observableId: string;
  /** chosen method, or null when no exact method is feasible */
  method: ExactMethod | null;
  /** size of the chosen method's estimate (its unit in `unit`) */
  size: number | null;
  unit: MethodEstimate['unit'] | null;
  estimatedSeconds: number | null;
  /** plain sentence when method is null */
  reason: string | null;
  cone: ConeStats;
  clifford: boolean;
  /** every method's estimate, in METHOD_ORDER */
  estimates: MethodEstimate[];
}

/** Tensor-network cost of one term (from the order search, before any contraction). */
export interface TnTermCost {
  width: number;
  flops: number;
  /** pairwise steps over all slices (the cost model's other part) */
  steps: number;
  slices: number;
  memoryBytes: number;
  coneQubits: number;
  searchSeconds: number;
}
