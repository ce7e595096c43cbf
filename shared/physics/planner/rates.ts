/**
 * The planner's rate constants: single-core throughputs of this repository's engines, each tied to
 * the benchmark that measures it. Each of those benchmarks prints its measured figure next to the
 * constant and fails (exit 1, so `npm run bench` fails) when they differ by more than
 * RATE_TOLERANCE either way: a change of engine speed must come with a change here.
 *
 * The machine is shared (2 cores, several processes), so measurements vary by about 2x with the
 * load; each constant sits inside the range measured under ordinary load.
 */

/** Largest accepted ratio between a constant and its benchmark's measurement, either way. */
export const RATE_TOLERANCE = 3;

/**
 * Exact Pauli propagation: term-gate updates per second, where a term-gate update is one Pauli
 * term held at one kept gate of the cone (the unit of the planner's work bound, pauli-propagation.ts).
 * Measured by bench/pauli-propagation.bench.ts ("planner calibration" line): the 102-qubit cone of
 * a heavy-hex kicked-Ising circuit (20 steps, delta 1e-5) propagated step by step, terms held at
 * every gate / wall time: 2.1e7 at load 15 on 2 cores (2026-12-05), about 3x that per CPU second.
 * 7.9e7 on a quiet machine (load 1, 2026-12-05, bench --short). 4e7 sits in the middle (within 2x
 * of both), set with engine 0.3.0 (it moves one fixture target from the light-cone statevector to
 * propagation; the golden files were rewritten with that version).
 */
export const PROPAGATION_RATE = 4e7;

/**
 * Statevector (full and light-cone): amplitude-gate updates per second (2^n amplitudes x gates).
 * Measured by bench/statevector.bench.ts: a layered kicked-Ising step on 24 qubits (24 RX + 23 RZZ)
 * on the WebAssembly kernel, 2^24 x 47 / the step's median time: 6.9e8 at load 15 (2026-12-05);
 * 3.4e9 on an idle core at 26 qubits (issue 15).
 */
export const STATEVECTOR_RATE = 1e9;

/**
 * Tensor-network contraction: real flops per second (8 per complex multiply-add). Measured by
 * bench/tensor-network.bench.ts: the median of the contraction rates on its five networks: 5.0e8
 * at load 15 (2026-12-05; 0.3 to 1.2 GFlop/s per network, numpy with OpenBLAS 0.07 to 0.96 on the
 * same networks and paths); 0.8 to 1.4 GFlop/s at lower load; with the WebAssembly GEMM kernels of
 * branch h-tnsimd: median 6.2e8, 0.1 to 2.2 GFlop/s per network (2026-12-05, under load).
 */
export const TN_RATE = 7e8;

/**
 * Free-fermion solver: multiply-adds per second of freeFermionCost's operation count. Measured by
 * bench/free-fermion.bench.ts: chains of 120 to 1,000 sites, operations / wall time, the median
 * of four cases: 4.0e8 to 4.5e8 at load 15 (2026-12-05); 1.06e9 at load 1 (bench --short). 6e8
 * sits in the middle (within 2x of both).
 */
export const FREE_FERMION_RATE = 6e8;

/** Fixed start-up cost per run (restriction, allocation), statevector methods; an estimate, not measured. */
export const STATEVECTOR_OVERHEAD_S = 1e-3;
/** The same for the other methods. */
export const OTHER_OVERHEAD_S = 1e-4;
