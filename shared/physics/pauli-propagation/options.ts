/** The options and result of a propagation, and the Clifford-angle test they depend on. */
import type { PauliTerm } from '../circuit';

export interface TruncationOptions {
  /** Drop terms with |c| < delta after every gate (0 or absent: no threshold). */
  delta?: number;
  /** Drop strings with more than this many non-identity factors. */
  maxWeight?: number;
  /** Drop strings with more than this many X or Y factors. */
  maxXY?: number;
  /** Keep at most this many terms (the largest |c|) after every gate. */
  maxTerms?: number;
}

export interface PropagationOptions extends TruncationOptions {
  /** Called after every gate with (gates done, total gates). */
  onProgress?: (done: number, total: number) => void;
  /** Also return the propagated observable (the final sum of strings). */
  returnTerms?: boolean;
}

export interface PropagationResult {
  /** <0...0| U^dag O U |0...0> for the kept terms. */
  value: number;
  /** Terms kept at the end. */
  terms: number;
  /** Largest number of terms held at once. */
  peakTerms: number;
  /** Number of terms dropped by truncation (over all gates). */
  droppedTerms: number;
  /** Sum of |c| over every dropped term: |value - exact| <= droppedWeight (triangle inequality). */
  droppedWeight: number;
  /** Term-gate updates: the number of terms present at each non-Clifford rotation, summed. */
  updates: number;
  /** Non-Clifford rotations processed. */
  rotations: number;
  /** Wall-clock time of the propagation in milliseconds. */
  wallMs: number;
  /** True iff nothing was dropped (the value is exact up to rounding). */
  exact: boolean;
  /** Bytes of term storage (strings, coefficients, hashes, table) at the peak. */
  peakStorageBytes: number;
  /** peakStorageBytes / peakTerms. */
  bytesPerTerm: number;
  /** The propagated observable, when requested. */
  finalTerms?: PauliTerm[];
}

const HALF_PI = Math.PI / 2;
const CLIFFORD_TOL = 1e-12;

/** k in 0..3 if t is k pi/2 (mod 2 pi) within 1e-12, else -1. */
export function cliffordQuarterTurns(t: number): number {
  const k = Math.round(t / HALF_PI);
  if (Math.abs(t - k * HALF_PI) > CLIFFORD_TOL) return -1;
  return ((k % 4) + 4) % 4;
}

/** What a propagation counts while it runs. */
export interface Stats {
  droppedTerms: number;
  droppedWeight: number;
  peakTerms: number;
  peakBytes: number;
}
