/**
 * Heisenberg-picture Pauli propagation (PHYSICS.md "Pauli propagation").
 *
 * The observable O = sum_k c_k P_k is pulled backwards through the circuit, O <- U^dag O U, gate by
 * gate from the last; the expectation in |0...0> is the sum of the coefficients of the strings
 * with x = 0.
 *
 * - A rotation U = exp(-i t G / 2) with t not a multiple of pi/2 maps a string P that
 *   anticommutes with G to cos t P + sin t (i G P); commuting strings are unchanged.
 * - Clifford gates (and rotations at multiples of pi/2, within 1e-12) map a string to one string
 *   with a sign; they never branch, so Clifford circuits stay at one string per term.
 * - Every Clifford gate's local map is derived at load time from the rotation rule itself (H is
 *   RY(pi/2) then X, CX is H_t CZ H_t, CZ is RZ_a(pi/2) RZ_b(pi/2) RZZ(-pi/2), up to phases), so
 *   there is a single primitive to get right; the tests check every rule against a statevector.
 *
 * Storage (structure of arrays, no per-term objects): all strings' words in one Uint32Array, term
 * i at [i*S, i*S + S) with S = 2W (W x words, then W z words); coefficients in a Float64Array; a
 * 32-bit Zobrist hash per term (XOR of a random key per set bit, so a gate that flips a few bits
 * updates it in O(1)); an open-addressing, linear-probing table of term indices keyed by the hash.
 * Rotations are done in place (no double buffer is needed): terms present before the gate are
 * scanned once; a term whose partner i G P is already present is updated together with it as a
 * pair (the partner is marked so it is not visited again), otherwise the partner is appended. Only
 * touched coefficients can fall below delta, so truncation checks just those; few removals are
 * swap-removals that keep the table valid, many are a compaction. Clifford gates rewrite strings
 * in place and only mark the table stale; it is rebuilt from the stored hashes before the next
 * rotation. A run of consecutive diagonal Cliffords (an RZZ(-pi/2) colour layer or several) is one
 * fused pass that visits, per string, only the gates at its X/Y sites.
 *
 * Memory: 2W words + 8 (coefficient) + 4 (hash) + 1 (mark) bytes per term of capacity, plus 4
 * bytes per table slot (2 to 4 slots per term of capacity); about 60 to 90 bytes per term at
 * 100 qubits.
 *
 * The modules, along the seams: options.ts (options, result, counters), algebra.ts (local Pauli
 * algebra and Clifford maps), sum.ts (the storage), scratch.ts, kernels.ts (Clifford, rotation and
 * fused diagonal passes), truncation.ts (threshold, weight, budget and the removals), engine.ts
 * (propagate).
 *
 * Plain TypeScript; performance.now() is the only host API used.
 */
export { cliffordQuarterTurns, type TruncationOptions, type PropagationOptions, type PropagationResult } from './options';
export { cliffordLocalMap } from './algebra';
export { PauliSum } from './sum';
export { propagate } from './engine';
