/**
 * Full statevector simulator for a CompiledCircuit (circuit.ts conventions): complex128, 16 bytes
 * per amplitude, interleaved (re, im, re, im, ...) in one Float64Array. Qubit q is bit q of the
 * basis-state index (little-endian: index = sum_q b_q 2^q). The state starts in |0...0>.
 *
 * Two kernel sets with one contract: WebAssembly SIMD (default; a tiny module assembled in
 * wasm-module.ts, the Float64Array is a view of its memory) and plain typed-array JS (fallback,
 * engine: 'js'). The modules, along the engine's seams:
 *   limits.ts        bytes per state, the qubit limit and its error
 *   matrices.ts      2x2 gate matrices, diagonal phase terms
 *   js-kernels.ts    the JS kernels and the fused pass (singles in few passes, one diagonal phase)
 *   wasm-module.ts   the hand-assembled WebAssembly SIMD module
 *   wasm-kernels.ts  the same fused pass on the module's memory
 *   diagonal-plan.ts the diagonal plan and phase tables both fused passes use (one copy)
 *   fusion.ts        greedy planning of a gate list into [singles, diagonal] pairs
 *   statevector.ts   the Statevector class and statevectorExpectation
 *
 * Fusion (the reason a 24-qubit kicked-Ising step costs a few state passes, not 47):
 *  - consecutive single-qubit gates on one qubit are multiplied into one 2x2 matrix;
 *  - a pending set of single-qubit matrices on distinct qubits is applied in few passes: the high
 *    qubits (q >= BLOCK_BITS) HIGH_GROUP at a time on 2^HIGH_GROUP runs of 2^RUN_BITS contiguous
 *    amplitudes (all in cache), then one pass over blocks of 2^BLOCK_BITS amplitudes applies all
 *    low-qubit gates and the diagonal phase;
 *  - all pending diagonal gates (rzz, cz, z, s, sdg, rz, any number, any qubits) are one phase per
 *    basis state (h, l) (high bits, low bits): exp(i phi_high(h)) * table[c(h)][l], where c(h)
 *    gathers the few high bits that diagonal gates crossing the low/high split touch;
 *  - cx(c, t) = H_t CZ(c, t) H_t, so it joins the same two fused kinds.
 * Gate lists are planned greedily, so a flat list gets the same fusion as a layered one; Layer
 * hints of kind 'rzz' are a fast path (the whole layer joins the diagonal set at once).
 *
 * No framework or node: imports (shared/ runs in the browser too).
 */
export { BYTES_PER_AMPLITUDE, DEFAULT_MAX_QUBITS, HARD_MAX_QUBITS, statevectorBytes, QubitLimitError, checkQubitLimit, type ProgressCallback, type StatevectorOptions } from './limits';
export { mat2Mul, gateMatrix, type Mat2, type DiagTerm } from './matrices';
export { _prefetchSink, BLOCK_BITS, HIGH_GROUP, RUN_BITS, applyFused, applySingles, applyDiagonal } from './js-kernels';
export { DIAG_MAX_CROSS } from './diagonal-plan';
export { WASM_MAX_QUBITS, wasmKernelsAvailable } from './wasm-module';
export { Statevector, statevectorExpectation } from './statevector';
