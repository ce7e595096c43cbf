/** Memory limits of the statevector engine: bytes per state, the qubit limit and its error. */

export const BYTES_PER_AMPLITUDE = 16;
export const DEFAULT_MAX_QUBITS = 26;
/** Bitwise index arithmetic is 32-bit; no configuration may go beyond this. */
export const HARD_MAX_QUBITS = 30;

/** Bytes a complex128 statevector of n qubits needs (16 bytes per amplitude). */
export function statevectorBytes(nQubits: number): number {
  return BYTES_PER_AMPLITUDE * 2 ** nQubits;
}

function formatBytes(b: number): string {
  if (b >= 2 ** 30) return `${(b / 2 ** 30).toFixed(b >= 2 ** 34 ? 0 : 1)} GiB`;
  if (b >= 2 ** 20) return `${(b / 2 ** 20).toFixed(1)} MiB`;
  if (b >= 2 ** 10) return `${(b / 2 ** 10).toFixed(1)} KiB`;
  return `${b} B`;
}

/** Thrown (before any allocation) when a circuit is wider than the configured qubit limit. */
export class QubitLimitError extends Error {
  override readonly name = 'QubitLimitError';
  readonly nQubits: number;
  readonly limit: number;
  readonly bytes: number;
  constructor(nQubits: number, limit: number) {
    const bytes = statevectorBytes(nQubits);
    super(
      `statevector: ${nQubits} qubits exceeds the limit of ${limit} qubits ` +
        `(${nQubits} qubits need ${formatBytes(bytes)} at ${BYTES_PER_AMPLITUDE} bytes per amplitude; ` +
        `the limit allows ${formatBytes(statevectorBytes(limit))})`,
    );
    this.nQubits = nQubits;
    this.limit = limit;
    this.bytes = bytes;
  }
}

export type ProgressCallback = (gatesDone: number, gatesTotal: number) => void;

export interface StatevectorOptions {
  /** Largest qubit count accepted (default 26 = 1 GiB); at most HARD_MAX_QUBITS. */
  maxQubits?: number;
  /** Called after every fused pass with the number of circuit gates applied so far. */
  onProgress?: ProgressCallback;
  /** Disable fusion (one pass per gate); for tests and benchmarks. Default false. */
  noFusion?: boolean;
  /**
   * 'wasm' (default where WebAssembly SIMD is available and n <= WASM_MAX_QUBITS) or 'js'
   * (plain typed-array kernels; always available).
   */
  engine?: 'wasm' | 'js';
}

export function checkQubitLimit(nQubits: number, maxQubits: number = DEFAULT_MAX_QUBITS): void {
  if (!Number.isInteger(nQubits) || nQubits < 0) throw new RangeError(`statevector: bad qubit count ${nQubits}`);
  const limit = Math.min(maxQubits, HARD_MAX_QUBITS);
  if (nQubits > limit) throw new QubitLimitError(nQubits, limit);
}
