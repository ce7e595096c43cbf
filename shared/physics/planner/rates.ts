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
 * Tensor-network contraction, a two-part cost model of a contraction path (tnSeconds): its flops
 * at TN_GEMM_RATE real flops per second (8 per complex multiply-add), plus its pairwise steps at
 * TN_STEP_RATE steps per second (a step's permutes, allocation and call). One flop rate alone was
 * wrong by 10x both ways: small networks are bound by the per-step work, wide ones run at the
 * WebAssembly GEMM's speed (a single constant of 7e8 flops/s, the median over small networks, put
 * a 2^39-flop contraction at 16 minutes; it runs in 90 s on one thread).
 * Measured by bench/tensor-network.bench.ts ("planner calibration"): both constants fitted by
 * least squares on relative error over kicked-Ising light-cone networks of 2^20 to 2^34 flops,
 * each contracted on one core. On 2026-12-05 at load 1: 4.3e9 flops/s and 1.9e5 steps/s, every
 * network above a millisecond within 0.37x to 1.32x of the fit. A third part for the elements
 * each step moves fitted no better (0.34x to 1.32x) and its rate wobbled 4x between runs (its
 * column is correlated with the flops), so it was dropped. The GEMM constant sits a little below
 * the quiet figure, for ordinary load (about half the speed at load 15).
 */
export const TN_GEMM_RATE = 4e9;
/** See TN_GEMM_RATE: pairwise steps per second (about 4 us each); fitted by bench/tensor-network.bench.ts with it. */
export const TN_STEP_RATE = 2.5e5;

/** Seconds of a contraction path on one core, from its flops and pairwise steps (TN_GEMM_RATE). */
export function tnSeconds(c: { flops: number; steps: number }): number {
  return c.flops / TN_GEMM_RATE + c.steps / TN_STEP_RATE;
}

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
