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
 * Plain TypeScript; performance.now() is the only host API used.
 */
import type { CompiledCircuit, Gate, ObservableSpec, PauliTerm } from './circuit';
import { pauliFromFactors, popcount32, wordsFor } from './pauli';

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

// ---------------------------------------------------------------------------------------------
// Local (one- or two-qubit) Pauli algebra on codes: bit 0 = x_a, bit 1 = z_a, bit 2 = x_b,
// bit 3 = z_b.

/** i^e with P(g) P(p) = i^e P(g ^ p), for local codes over nq qubits. */
function localProductPhase(g: number, p: number, nq: number): number {
  let e = 0;
  for (let q = 0; q < nq; q++) {
    const gx = (g >> (2 * q)) & 1, gz = (g >> (2 * q + 1)) & 1;
    const px = (p >> (2 * q)) & 1, pz = (p >> (2 * q + 1)) & 1;
    e += gx * gz + px * pz + 2 * gz * px - (gx ^ px) * (gz ^ pz);
  }
  return ((e % 4) + 4) % 4;
}

function localAnticommutes(g: number, p: number, nq: number): boolean {
  let par = 0;
  for (let q = 0; q < nq; q++) {
    const gx = (g >> (2 * q)) & 1, gz = (g >> (2 * q + 1)) & 1;
    const px = (p >> (2 * q)) & 1, pz = (p >> (2 * q + 1)) & 1;
    par ^= (gx & pz) ^ (gz & px);
  }
  return par === 1;
}

/** Sign s with i G P = s P(g ^ p), for anticommuting G, P (then i^{1+e} is real). */
function iGPSign(g: number, p: number, nq: number): number {
  const e = (1 + localProductPhase(g, p, nq)) % 4;
  if (e !== 0 && e !== 2) throw new Error('internal: i G P is not Hermitian');
  return e === 0 ? 1 : -1;
}

/** A signed local map on codes: code -> (to[code], sign[code]). */
interface LocalMap {
  to: number[];
  sign: number[];
}

function identityMap(nq: number): LocalMap {
  const m = 1 << (2 * nq);
  return { to: Array.from({ length: m }, (_, c) => c), sign: new Array<number>(m).fill(1) };
}

/** Heisenberg map of exp(-i k (pi/2) G / 2) on local codes. */
function cliffordRotationMap(g: number, k: number, nq: number): LocalMap {
  const m = identityMap(nq);
  for (let c = 0; c < m.to.length; c++) {
    if (!localAnticommutes(g, c, nq)) continue;
    if (k === 2) m.sign[c] = -1;
    else if (k === 1 || k === 3) {
      m.to[c] = c ^ g;
      m.sign[c] = iGPSign(g, c, nq) * (k === 3 ? -1 : 1);
    }
  }
  return m;
}

/** Heisenberg map of the time-ordered sequence [first, ..., last]: apply last's map first. */
function composeHeisenberg(seqTimeOrder: LocalMap[], nq: number): LocalMap {
  const out = identityMap(nq);
  for (let c = 0; c < out.to.length; c++) {
    let code = c;
    let s = 1;
    for (let i = seqTimeOrder.length - 1; i >= 0; i--) {
      s *= seqTimeOrder[i].sign[code];
      code = seqTimeOrder[i].to[code];
    }
    out.to[c] = code;
    out.sign[c] = s;
  }
  return out;
}

// Generators as local codes.
const GX = 0b01, GZ = 0b10, GY = 0b11;
const GZA = 0b0010, GZB = 0b1000;
const GZZ = GZA | GZB;
/** Promote a one-qubit code to qubit slot b of a two-qubit code. */
const onB = (g: number) => g << 2;

const R1 = (g: number, k: number) => cliffordRotationMap(g, k, 1);
const R2 = (g: number, k: number) => cliffordRotationMap(g, k, 2);

const CZ_SEQ = [R2(GZA, 1), R2(GZB, 1), R2(GZZ, 3)];
const H_T_SEQ = [R2(onB(GY), 1), R2(onB(GX), 2)];

/** Local Heisenberg maps of the fixed Clifford gates (a = first qubit, b = second). */
const CLIFFORD_MAPS: Partial<Record<string, LocalMap>> = {
  x: R1(GX, 2),
  y: R1(GY, 2),
  z: R1(GZ, 2),
  s: R1(GZ, 1),
  sdg: R1(GZ, 3),
  sx: R1(GX, 1),
  h: composeHeisenberg([R1(GY, 1), R1(GX, 2)], 1),
  cz: composeHeisenberg(CZ_SEQ, 2),
  cx: composeHeisenberg([...H_T_SEQ, ...CZ_SEQ, ...H_T_SEQ], 2),
};

const ROTATION_GEN: Partial<Record<string, number>> = { rx: GX, ry: GY, rz: GZ, rzz: GZZ };

/**
 * The Heisenberg map U^dag P U of a single Clifford gate (or rotation at a Clifford angle) on the
 * local code of P; for tests and tools. Returns null for a non-Clifford rotation.
 */
export function cliffordLocalMap(gate: Gate): LocalMap | null {
  const fixed = CLIFFORD_MAPS[gate.name];
  if (fixed) return fixed;
  const g = ROTATION_GEN[gate.name];
  if (g === undefined) throw new Error(`unknown gate ${gate.name}`);
  const k = cliffordQuarterTurns(angleOf(gate));
  if (k < 0) return null;
  return cliffordRotationMap(g, k, gate.name === 'rzz' ? 2 : 1);
}

function angleOf(g: Gate): number {
  const t = g.params?.[0];
  if (typeof t !== 'number' || !Number.isFinite(t)) throw new Error(`gate ${g.name} needs a finite angle`);
  return t;
}

// ---------------------------------------------------------------------------------------------
// Term storage.

function splitmix32(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x9e3779b9) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 16), 0x85ebca6b);
    t = Math.imul(t ^ (t >>> 13), 0xc2b2ae35);
    return (t ^ (t >>> 16)) >>> 0;
  };
}

const EMPTY = -1;
const GOLDEN = 0x9e3779b1;

/**
 * A sum of weighted Pauli strings in structure-of-arrays form, with a hash index. Exposed for the
 * engine and for tests; the hot loops live in `propagate` for speed.
 */
export class PauliSum {
  readonly n: number;
  readonly W: number;
  readonly S: number;
  count = 0;
  cap = 0;
  words: Uint32Array;
  coef: Float64Array;
  hash: Int32Array;
  mark: Uint8Array;
  slots: Int32Array;
  shift = 32;
  tableStale = false;
  /** Zobrist keys: kx[q], kz[q]. */
  readonly kx: Int32Array;
  readonly kz: Int32Array;

  constructor(n: number, initialCap = 16) {
    this.n = n;
    this.W = wordsFor(n);
    this.S = 2 * this.W;
    const rnd = splitmix32(0x5eed1234 ^ n);
    this.kx = new Int32Array(n);
    this.kz = new Int32Array(n);
    for (let q = 0; q < n; q++) {
      this.kx[q] = rnd() | 0;
      this.kz[q] = rnd() | 0;
    }
    this.words = new Uint32Array(0);
    this.coef = new Float64Array(0);
    this.hash = new Int32Array(0);
    this.mark = new Uint8Array(0);
    this.slots = new Int32Array(0);
    this.reserve(Math.max(16, initialCap));
  }

  storageBytes(): number {
    return this.cap * (this.S * 4 + 8 + 4 + 1) + this.slots.length * 4;
  }

  /** Ensure capacity >= need (grows by 1.5x); rebuilds the table when it grows. */
  reserve(need: number): void {
    if (need <= this.cap) return;
    const cap = Math.max(need, Math.ceil(this.cap * 1.5), 16);
    const S = this.S;
    const words = new Uint32Array(cap * S);
    words.set(this.words.subarray(0, this.count * S));
    const coef = new Float64Array(cap);
    coef.set(this.coef.subarray(0, this.count));
    const hash = new Int32Array(cap);
    hash.set(this.hash.subarray(0, this.count));
    const mark = new Uint8Array(cap);
    mark.set(this.mark.subarray(0, this.count));
    this.words = words;
    this.coef = coef;
    this.hash = hash;
    this.mark = mark;
    this.cap = cap;
    let size = 16;
    while (size < 2 * cap) size *= 2;
    if (size !== this.slots.length) {
      this.slots = new Int32Array(size);
      this.shift = 32 - Math.log2(size);
      this.tableStale = true;
    }
    if (this.tableStale) this.rebuildTable();
  }

  rebuildTable(): void {
    const slots = this.slots;
    slots.fill(EMPTY);
    const mask = slots.length - 1;
    const shift = this.shift;
    const hash = this.hash;
    for (let i = 0; i < this.count; i++) {
      let s = Math.imul(hash[i], GOLDEN) >>> shift;
      while (slots[s] !== EMPTY) s = (s + 1) & mask;
      slots[s] = i;
    }
    this.tableStale = false;
  }

  hashOfWords(off: number): number {
    const W = this.W, words = this.words;
    let h = 0;
    for (let k = 0; k < this.S; k++) {
      let v = words[off + k];
      const isZ = k >= W;
      const base = (isZ ? k - W : k) << 5;
      while (v !== 0) {
        const low = v & -v;
        const q = base + 31 - Math.clz32(low);
        h ^= isZ ? this.kz[q] : this.kx[q];
        v = (v ^ low) >>> 0;
      }
    }
    return h;
  }

  /** Index of the term equal to the words at srcOff (in `src`), or -1. Table must be fresh. */
  find(src: Uint32Array, srcOff: number, h: number): number {
    const slots = this.slots, mask = slots.length - 1, S = this.S, words = this.words;
    let s = Math.imul(h, GOLDEN) >>> this.shift;
    for (;;) {
      const j = slots[s];
      if (j === EMPTY) return -1;
      if (this.hash[j] === h) {
        const jb = j * S;
        let k = 0;
        while (k < S && words[jb + k] === src[srcOff + k]) k++;
        if (k === S) return j;
      }
      s = (s + 1) & mask;
    }
  }

  /** Add c to the string given by (x, z) words; merges duplicates. */
  add(x: Uint32Array, z: Uint32Array, c: number): void {
    if (this.tableStale) this.rebuildTable();
    const S = this.S, W = this.W;
    const tmp = new Uint32Array(S);
    tmp.set(x, 0);
    tmp.set(z, W);
    this.reserve(this.count + 1);
    const i = this.count;
    this.words.set(tmp, i * S);
    const h = this.hashOfWords(i * S);
    const j = this.find(tmp, 0, h);
    if (j >= 0) {
      this.coef[j] += c;
      return;
    }
    this.coef[i] = c;
    this.hash[i] = h;
    this.mark[i] = 0;
    this.count++;
    this.insertSlot(i);
  }

  insertSlot(i: number): void {
    const slots = this.slots, mask = slots.length - 1;
    let s = Math.imul(this.hash[i], GOLDEN) >>> this.shift;
    while (slots[s] !== EMPTY) s = (s + 1) & mask;
    slots[s] = i;
  }

  /** Keep only the terms with keep(i) true, preserving order; marks the table stale. */
  compact(drop: Uint8Array): void {
    const S = this.S, words = this.words, coef = this.coef, hash = this.hash;
    let w = 0;
    for (let i = 0; i < this.count; i++) {
      if (drop[i]) continue;
      if (w !== i) {
        const wb = w * S, ib = i * S;
        for (let k = 0; k < S; k++) words[wb + k] = words[ib + k];
        coef[w] = coef[i];
        hash[w] = hash[i];
      }
      w++;
    }
    this.count = w;
    this.tableStale = true;
  }

  /** Sum of the coefficients of strings with x = 0. */
  diagonalSum(): number {
    const S = this.S, W = this.W, words = this.words, coef = this.coef;
    let v = 0;
    for (let i = 0; i < this.count; i++) {
      const b = i * S;
      let any = 0;
      for (let k = 0; k < W; k++) any |= words[b + k];
      if (any === 0) v += coef[i];
    }
    return v;
  }

  weightOf(i: number): number {
    const b = i * this.S, W = this.W;
    let w = 0;
    for (let k = 0; k < W; k++) w += popcount32(this.words[b + k] | this.words[b + W + k]);
    return w;
  }

  xyOf(i: number): number {
    const b = i * this.S;
    let w = 0;
    for (let k = 0; k < this.W; k++) w += popcount32(this.words[b + k]);
    return w;
  }

  toTerms(): PauliTerm[] {
    const out: PauliTerm[] = [];
    const S = this.S, W = this.W;
    for (let i = 0; i < this.count; i++) {
      const b = i * S;
      const factors: PauliTerm['factors'] = [];
      for (let q = 0; q < this.n; q++) {
        const w = q >>> 5, bit = q & 31;
        const xb = (this.words[b + w] >>> bit) & 1;
        const zb = (this.words[b + W + w] >>> bit) & 1;
        if (xb || zb) factors.push({ qubit: q, op: xb ? (zb ? 'Y' : 'X') : 'Z' });
      }
      out.push({ coef: this.coef[i], factors });
    }
    return out;
  }
}

// ---------------------------------------------------------------------------------------------
// The engine.

interface Stats {
  droppedTerms: number;
  droppedWeight: number;
  peakTerms: number;
  peakBytes: number;
}

/** Propagate `observable` backwards through `circuit` and evaluate it in |0...0>. */
export function propagate(
  circuit: CompiledCircuit,
  observable: ObservableSpec,
  options: PropagationOptions = {},
): PropagationResult {
  const t0 = performance.now();
  const n = circuit.nQubits;
  validate(circuit);
  const delta = options.delta ?? 0;
  const maxWeight = options.maxWeight ?? Infinity;
  const maxXY = options.maxXY ?? Infinity;
  const maxTerms = options.maxTerms ?? Infinity;
  if (!(delta >= 0) || !(maxWeight >= 0) || !(maxXY >= 0) || !(maxTerms >= 1)) {
    throw new Error('bad truncation options');
  }
  const sum = new PauliSum(n, observable.terms.length);
  for (const t of observable.terms) {
    if (!Number.isFinite(t.coef)) throw new Error('observable coefficient must be finite');
    const p = pauliFromFactors(n, t.factors);
    sum.add(p.x, p.z, t.coef);
  }
  const st: Stats = { droppedTerms: 0, droppedWeight: 0, peakTerms: sum.count, peakBytes: sum.storageBytes() };
  const trunc = { delta, maxWeight, maxXY, maxTerms };
  truncateAll(sum, trunc, st);

  let updates = 0;
  let rotations = 0;
  const gates = circuit.gates;
  const total = gates.length;
  const scratch = new Scratch();
  for (let gi = total - 1; gi >= 0; ) {
    const g = gates[gi];
    // a run of >= 2 consecutive diagonal Cliffords is applied as one fused block
    let first = gi;
    const pieces: [number, number, number][] = [];
    for (let p = diagonalPieces(g); p && first >= 0; ) {
      pieces.push(...p);
      first--;
      p = first >= 0 ? diagonalPieces(gates[first]) : null;
    }
    first++;
    if (gi - first >= 1) {
      applyDiagBlock(sum, buildDiagBlock(n, pieces, sum.kz), trunc, st, scratch);
    } else {
      const map = cliffordLocalMap(g);
      if (map) {
        applyClifford(sum, g, map, trunc, st, scratch);
      } else {
        updates += sum.count;
        rotations++;
        applyRotation(sum, g, trunc, st, scratch);
      }
      first = gi;
    }
    if (sum.count > maxTerms) keepLargest(sum, maxTerms, st, scratch);
    if (sum.count > st.peakTerms) st.peakTerms = sum.count;
    const b = sum.storageBytes();
    if (b > st.peakBytes) st.peakBytes = b;
    options.onProgress?.(total - first, total);
    gi = first - 1;
  }
  const value = sum.diagonalSum();
  const res: PropagationResult = {
    value,
    terms: sum.count,
    peakTerms: st.peakTerms,
    droppedTerms: st.droppedTerms,
    droppedWeight: st.droppedWeight,
    updates,
    rotations,
    wallMs: performance.now() - t0,
    exact: st.droppedTerms === 0,
    peakStorageBytes: st.peakBytes,
    bytesPerTerm: st.peakBytes / Math.max(1, st.peakTerms),
  };
  if (options.returnTerms) res.finalTerms = sum.toTerms();
  return res;
}

function validate(c: CompiledCircuit): void {
  for (const g of c.gates) {
    const ar = g.name === 'rzz' || g.name === 'cx' || g.name === 'cz' ? 2 : 1;
    if (g.qubits.length !== ar) throw new Error(`gate ${g.name} needs ${ar} qubits`);
    for (const q of g.qubits) {
      if (!Number.isInteger(q) || q < 0 || q >= c.nQubits) throw new Error(`gate ${g.name}: qubit ${q} out of range`);
    }
    if (ar === 2 && g.qubits[0] === g.qubits[1]) throw new Error(`gate ${g.name} on one qubit twice`);
  }
}

/** Per rotation gate: for each local code, 0 = commutes, +1 / -1 = anticommutes with i G P = sign P ^ G. */
const ACT_TABLES: Partial<Record<string, Int32Array>> = {};
for (const [name, gen] of Object.entries(ROTATION_GEN)) {
  const nq = name === 'rzz' ? 2 : 1;
  const t = new Int32Array(1 << (2 * nq));
  for (let c = 0; c < t.length; c++) t[c] = localAnticommutes(gen!, c, nq) ? iGPSign(gen!, c, nq) : 0;
  ACT_TABLES[name] = t;
}

class Scratch {
  flip: Uint32Array = new Uint32Array(0);
  candIdx: Int32Array = new Int32Array(0);
  sel: Float64Array = new Float64Array(0);
  lastThr = 0;
  selBuf(n: number): Float64Array {
    if (this.sel.length < n) this.sel = new Float64Array(Math.ceil(n * 1.5));
    return this.sel;
  }
  /** A zeroed scratch word buffer of length S (callers re-zero it after use). */
  flipWords(S: number): Uint32Array {
    if (this.flip.length !== S) this.flip = new Uint32Array(S);
    return this.flip;
  }
  del: Int32Array = new Int32Array(1024);
  drop: Uint8Array = new Uint8Array(0);
  abs: Float64Array = new Float64Array(0);
  dropFlags(n: number): Uint8Array {
    if (this.drop.length < n) this.drop = new Uint8Array(Math.ceil(n * 1.5));
    else this.drop.fill(0, 0, n);
    return this.drop;
  }
}

interface Trunc {
  delta: number;
  maxWeight: number;
  maxXY: number;
  maxTerms: number;
}

function truncateAll(sum: PauliSum, tr: Trunc, st: Stats): void {
  const drop = new Uint8Array(sum.count);
  let any = false;
  for (let i = 0; i < sum.count; i++) {
    const c = sum.coef[i];
    if (Math.abs(c) < tr.delta || sum.weightOf(i) > tr.maxWeight || sum.xyOf(i) > tr.maxXY) {
      drop[i] = 1;
      any = true;
      st.droppedTerms++;
      st.droppedWeight += Math.abs(c);
    }
  }
  if (any) sum.compact(drop);
  if (sum.count > tr.maxTerms) keepLargest(sum, tr.maxTerms, st, new Scratch());
}

/** Local weight and X/Y count of a code over 2 qubit slots. */
const LOCAL_W = [0, 1, 1, 1, 1, 2, 2, 2, 1, 2, 2, 2, 1, 2, 2, 2];
const LOCAL_XY = [0, 1, 0, 1, 1, 2, 1, 2, 0, 1, 0, 1, 1, 2, 1, 2];

/** Apply a Clifford local map to every term in place. */
function applyClifford(sum: PauliSum, g: Gate, map: LocalMap, tr: Trunc, st: Stats, scratch: Scratch): void {
  const nq = g.qubits.length;
  const ncodes = 1 << (2 * nq);
  const to = new Int32Array(ncodes);
  const sg = new Float64Array(ncodes);
  let trivial = true;
  for (let c = 0; c < ncodes; c++) {
    to[c] = map.to[c];
    sg[c] = map.sign[c];
    if (to[c] !== c || sg[c] !== 1) trivial = false;
  }
  if (trivial || sum.count === 0) return;
  const a = g.qubits[0];
  const b = nq === 2 ? g.qubits[1] : a;
  const W = sum.W, S = sum.S;
  const wa = a >>> 5, ba = a & 31, wb = b >>> 5, bb = b & 31;
  // hash deltas per code change: keys of flipped bits
  const hd = new Int32Array(ncodes);
  for (let c = 0; c < ncodes; c++) {
    const d = c ^ to[c];
    let h = 0;
    if (d & 1) h ^= sum.kx[a];
    if (d & 2) h ^= sum.kz[a];
    if (d & 4) h ^= sum.kx[b];
    if (d & 8) h ^= sum.kz[b];
    hd[c] = h;
  }
  const checkW = tr.maxWeight < Infinity || tr.maxXY < Infinity;
  const words = sum.words, coef = sum.coef, hash = sum.hash;
  const N = sum.count;
  let drop: Uint8Array | null = null;
  let changed = false;
  const ma = 1 << ba, mb = 1 << bb;
  for (let i = 0; i < N; i++) {
    const base = i * S;
    const xa = base + wa, za = base + W + wa, xb = base + wb, zb = base + W + wb;
    let code = ((words[xa] >>> ba) & 1) | (((words[za] >>> ba) & 1) << 1);
    if (nq === 2) code |= (((words[xb] >>> bb) & 1) << 2) | (((words[zb] >>> bb) & 1) << 3);
    const nc = to[code];
    if (nc !== code) {
      const d = code ^ nc;
      if (d & 1) words[xa] ^= ma;
      if (d & 2) words[za] ^= ma;
      if (d & 4) words[xb] ^= mb;
      if (d & 8) words[zb] ^= mb;
      hash[i] ^= hd[code];
      changed = true;
      if (checkW && (LOCAL_W[nc] > LOCAL_W[code] || LOCAL_XY[nc] > LOCAL_XY[code])) {
        if (sum.weightOf(i) > tr.maxWeight || sum.xyOf(i) > tr.maxXY) {
          if (!drop) drop = scratch.dropFlags(N);
          drop[i] = 1;
          st.droppedTerms++;
          st.droppedWeight += Math.abs(coef[i]);
        }
      }
    }
    if (sg[code] < 0) coef[i] = -coef[i];
  }
  if (changed) sum.tableStale = true;
  if (drop) sum.compact(drop);
}

/** Apply a non-Clifford rotation exp(-i t G / 2) in place. */
function applyRotation(sum: PauliSum, g: Gate, tr: Trunc, st: Stats, scratch: Scratch): void {
  const gen = ROTATION_GEN[g.name]!;
  const nq = g.name === 'rzz' ? 2 : 1;
  const t = angleOf(g);
  const cs = Math.cos(t), sn = Math.sin(t);
  const act = ACT_TABLES[g.name]!;
  const a = g.qubits[0];
  const b = nq === 2 ? g.qubits[1] : a;
  const W = sum.W, S = sum.S;
  const wa = a >>> 5, ba = a & 31, wb = b >>> 5, bb = b & 31;
  // flip pattern of G over the S words, and its hash
  const flip = scratch.flipWords(S);
  let hG = 0;
  if (gen & 1) { flip[wa] ^= 1 << ba; hG ^= sum.kx[a]; }
  if (gen & 2) { flip[W + wa] ^= 1 << ba; hG ^= sum.kz[a]; }
  if (gen & 4) { flip[wb] ^= 1 << bb; hG ^= sum.kx[b]; }
  if (gen & 8) { flip[W + wb] ^= 1 << bb; hG ^= sum.kz[b]; }
  const fo: number[] = [];
  for (let k = 0; k < S; k++) if (flip[k] !== 0) fo.push(k);
  const nfo = fo.length;
  const fo0 = fo[0], fo1 = nfo > 1 ? fo[1] : fo[0];
  const fm0 = flip[fo0], fm1 = nfo > 1 ? flip[fo1] : 0;
  if (nfo > 2) throw new Error('internal: generator spans more than two words');
  // anticommutation test: parity of the P bits complementary to G's bits (<= 2 tests here)
  const tOff: number[] = [], tSh: number[] = [];
  if (gen & 1) { tOff.push(W + wa); tSh.push(ba); }
  if (gen & 2) { tOff.push(wa); tSh.push(ba); }
  if (gen & 4) { tOff.push(W + wb); tSh.push(bb); }
  if (gen & 8) { tOff.push(wb); tSh.push(bb); }
  if (tOff.length > 2) throw new Error('internal: generator with more than two test bits');
  const two = tOff.length === 2;
  const o1 = tOff[0], s1 = tSh[0], o2 = two ? tOff[1] : tOff[0], s2 = two ? tSh[1] : 0;
  const checkW = tr.maxWeight < Infinity || tr.maxXY < Infinity;
  const delta = tr.delta;

  if (sum.tableStale) sum.rebuildTable();
  const N0 = sum.count;
  let nDel = 0;
  let del = scratch.del;
  let words = sum.words, coef = sum.coef, hash = sum.hash, mark = sum.mark, slots = sum.slots;
  let mask = slots.length - 1, shift = sum.shift, cap = sum.cap;
  let m = N0;
  for (let i = 0; i < N0; i++) {
    const base = i * S;
    const anti = two
      ? ((words[base + o1] >>> s1) ^ (words[base + o2] >>> s2)) & 1
      : (words[base + o1] >>> s1) & 1;
    if (anti === 0) continue;
    if (mark[i] !== 0) {
      mark[i] = 0;
      continue;
    }
    let code = ((words[base + wa] >>> ba) & 1) | (((words[base + W + wa] >>> ba) & 1) << 1);
    if (nq === 2) code |= (((words[base + wb] >>> bb) & 1) << 2) | (((words[base + W + wb] >>> bb) & 1) << 3);
    const sigma = act[code];
    const hQ = hash[i] ^ hG;
    // probe for Q = P ^ G
    let s = Math.imul(hQ, GOLDEN) >>> shift;
    let j = -1;
    for (;;) {
      const jj = slots[s];
      if (jj === EMPTY) break;
      if (hash[jj] === hQ) {
        const jb = jj * S;
        let k = 0;
        while (k < S && (words[jb + k] ^ words[base + k] ^ flip[k]) === 0) k++; // int32 XOR: bit 31 safe
        if (k === S) {
          j = jj;
          break;
        }
      }
      s = (s + 1) & mask;
    }
    const ci = coef[i];
    if (j >= 0) {
      // pair (P_i, P_j = sigma i G P_i): both originals, j > i not yet processed
      const cj = coef[j];
      const ni = cs * ci - sigma * sn * cj;
      const nj = cs * cj + sigma * sn * ci;
      coef[i] = ni;
      coef[j] = nj;
      mark[j] = 1;
      if (ni < delta && ni > -delta) {
        if (nDel >= del.length) del = grow(del, scratch);
        del[nDel++] = i;
      }
      if (nj < delta && nj > -delta) {
        if (nDel >= del.length) del = grow(del, scratch);
        del[nDel++] = j;
      }
      continue;
    }
    const ni = cs * ci;
    const nQ = sigma * sn * ci;
    coef[i] = ni;
    if (ni < delta && ni > -delta) {
      if (nDel >= del.length) del = grow(del, scratch);
      del[nDel++] = i;
    }
    let keep = !(nQ < delta && nQ > -delta);
    if (keep && checkW) {
      let wq = 0, xq = 0;
      for (let k = 0; k < W; k++) {
        const xw = words[base + k] ^ flip[k];
        wq += popcount32(xw | (words[base + W + k] ^ flip[W + k]));
        xq += popcount32(xw);
      }
      keep = wq <= tr.maxWeight && xq <= tr.maxXY;
    }
    if (!keep) {
      st.droppedTerms++;
      st.droppedWeight += Math.abs(nQ);
      continue;
    }
    if (m === cap) {
      sum.count = m;
      sum.reserve(m + 1); // may rebuild the table: re-probe for an empty slot
      words = sum.words; coef = sum.coef; hash = sum.hash; mark = sum.mark; slots = sum.slots;
      mask = slots.length - 1; shift = sum.shift; cap = sum.cap;
      s = Math.imul(hQ, GOLDEN) >>> shift;
      while (slots[s] !== EMPTY) s = (s + 1) & mask;
    }
    const nb = m * S;
    for (let k = 0; k < S; k++) words[nb + k] = words[base + k];
    words[nb + fo0] ^= fm0;
    if (nfo > 1) words[nb + fo1] ^= fm1;
    coef[m] = nQ;
    hash[m] = hQ;
    mark[m] = 0;
    slots[s] = m;
    m++;
  }
  sum.count = m;
  flip.fill(0);
  if (m > st.peakTerms) st.peakTerms = m;
  const b0 = sum.storageBytes();
  if (b0 > st.peakBytes) st.peakBytes = b0;
  if (nDel > 0) removeIndices(sum, del, nDel, st, scratch);
}

/**
 * A run of consecutive diagonal Clifford gates (rzz / rz at multiples of pi/2, cz, z, s, sdg).
 * They commute, so their Heisenberg maps can be applied in any order; a string is touched only by
 * gates that anticommute with it, each of which has a qubit with x = 1. Per qubit a (CSR):
 * entries (partner b or -1, quarter turns k) of the Z_a Z_b or Z_a rotations exp(-i k pi/4 G).
 */
interface DiagBlock {
  start: Int32Array;
  partner: Int32Array;
  pWord: Int32Array;
  pShift: Int32Array;
  k: Int32Array;
  hkey: Int32Array;
}

const DIAG_CLIFFORD_1Q: Partial<Record<string, number>> = { z: 2, s: 1, sdg: 3 };

/** Quarter turns of a diagonal Clifford gate, as [qubits, k] rotation pieces; null if not one. */
function diagonalPieces(g: Gate): [number, number, number][] | null {
  const fixed = DIAG_CLIFFORD_1Q[g.name];
  if (fixed !== undefined) return [[g.qubits[0], -1, fixed]];
  if (g.name === 'cz') return [[g.qubits[0], -1, 1], [g.qubits[1], -1, 1], [g.qubits[0], g.qubits[1], 3]];
  if (g.name === 'rz' || g.name === 'rzz') {
    const k = cliffordQuarterTurns(angleOf(g));
    if (k < 0) return null;
    return g.name === 'rz' ? [[g.qubits[0], -1, k]] : [[g.qubits[0], g.qubits[1], k]];
  }
  return null;
}

function buildDiagBlock(n: number, pieces: [number, number, number][], kz: Int32Array): DiagBlock {
  // merge pieces on the same qubit / edge (rotations about the same generator add)
  const acc = new Map<string, [number, number, number]>();
  for (const [a, b, k] of pieces) {
    const lo = b < 0 ? a : Math.min(a, b), hi = b < 0 ? -1 : Math.max(a, b);
    const key = `${lo},${hi}`;
    const e = acc.get(key);
    if (e) e[2] = (e[2] + k) % 4;
    else acc.set(key, [lo, hi, k % 4]);
  }
  const per: [number, number][][] = Array.from({ length: n }, () => []);
  for (const [a, b, k] of acc.values()) {
    if (k === 0) continue;
    per[a].push([b, k]);
    if (b >= 0) per[b].push([a, k]);
  }
  let tot = 0;
  for (const l of per) tot += l.length;
  const blk: DiagBlock = {
    start: new Int32Array(n + 1),
    partner: new Int32Array(tot),
    pWord: new Int32Array(tot),
    pShift: new Int32Array(tot),
    k: new Int32Array(tot),
    hkey: new Int32Array(tot),
  };
  let e = 0;
  for (let a = 0; a < n; a++) {
    blk.start[a] = e;
    for (const [b, k] of per[a]) {
      blk.partner[e] = b;
      blk.pWord[e] = b >= 0 ? b >>> 5 : 0;
      blk.pShift[e] = b >= 0 ? b & 31 : 0;
      blk.k[e] = k;
      blk.hkey[e] = kz[a] ^ (b >= 0 ? kz[b] : 0);
      e++;
    }
  }
  blk.start[n] = e;
  return blk;
}

/** Apply a fused block of diagonal Clifford gates to every term in place. */
function applyDiagBlock(sum: PauliSum, blk: DiagBlock, tr: Trunc, st: Stats, scratch: Scratch): void {
  const N = sum.count;
  if (N === 0 || blk.partner.length === 0) return;
  const W = sum.W, S = sum.S;
  const words = sum.words, coef = sum.coef, hash = sum.hash;
  const start = blk.start, partner = blk.partner, pWord = blk.pWord, pShift = blk.pShift, kk = blk.k, hkey = blk.hkey;
  const checkW = tr.maxWeight < Infinity;
  let drop: Uint8Array | null = null;
  let changed = false;
  for (let i = 0; i < N; i++) {
    const base = i * S;
    let par = 0;
    let h = hash[i];
    let flippedB = false;
    for (let w = 0; w < W; w++) {
      let v = words[base + w] | 0;
      while (v !== 0) {
        const low = v & -v;
        v ^= low;
        const a = (w << 5) + 31 - Math.clz32(low);
        const e1 = start[a + 1];
        for (let e = start[a]; e < e1; e++) {
          const b = partner[e];
          const k = kk[e];
          if (b >= 0 && ((words[base + pWord[e]] >>> pShift[e]) & 1) !== 0) continue; // commutes
          if (k === 2) {
            par ^= 1;
            continue;
          }
          const zi = base + W + w;
          const za = (words[zi] & low) !== 0 ? 1 : 0;
          par ^= k === 1 ? za ^ 1 : za;
          words[zi] ^= low;
          if (b >= 0) {
            words[base + W + pWord[e]] ^= 1 << pShift[e];
            flippedB = true;
          }
          h ^= hkey[e];
          changed = true;
        }
      }
    }
    hash[i] = h;
    if (par !== 0) coef[i] = -coef[i];
    if (checkW && flippedB && sum.weightOf(i) > tr.maxWeight) {
      if (!drop) drop = scratch.dropFlags(N);
      drop[i] = 1;
      st.droppedTerms++;
      st.droppedWeight += Math.abs(coef[i]);
    }
  }
  if (changed) sum.tableStale = true;
  if (drop) sum.compact(drop);
}

function grow(del: Int32Array, scratch: Scratch): Int32Array {
  const d = new Int32Array(del.length * 2);
  d.set(del);
  scratch.del = d;
  return d;
}

/** Remove the listed terms (distinct indices), accounting their weight as dropped. */
function removeIndices(sum: PauliSum, del: Int32Array, nDel: number, st: Stats, scratch: Scratch): void {
  const coef = sum.coef;
  for (let k = 0; k < nDel; k++) st.droppedWeight += Math.abs(coef[del[k]]);
  st.droppedTerms += nDel;
  if (nDel * 8 > sum.count || sum.tableStale) {
    const drop = scratch.dropFlags(sum.count);
    for (let k = 0; k < nDel; k++) drop[del[k]] = 1;
    sum.compact(drop);
    return;
  }
  // few deletions: swap-remove with the last term, highest index first, keeping the table valid
  const d = del.subarray(0, nDel);
  d.sort();
  const S = sum.S;
  for (let k = nDel - 1; k >= 0; k--) {
    const i = d[k];
    tableRemove(sum, i);
    const last = sum.count - 1;
    if (i !== last) {
      tableReplace(sum, last, i);
      const words = sum.words, ib = i * S, lb = last * S;
      for (let k = 0; k < S; k++) words[ib + k] = words[lb + k];
      sum.coef[i] = sum.coef[last];
      sum.hash[i] = sum.hash[last];
      sum.mark[i] = sum.mark[last];
    }
    sum.count = last;
  }
}

/** Remove term i's slot (backward-shift deletion for linear probing). */
function tableRemove(sum: PauliSum, i: number): void {
  const slots = sum.slots, mask = slots.length - 1, shift = sum.shift, hash = sum.hash;
  let s = Math.imul(hash[i], GOLDEN) >>> shift;
  while (slots[s] !== i) s = (s + 1) & mask;
  let hole = s;
  let j = s;
  for (;;) {
    j = (j + 1) & mask;
    const e = slots[j];
    if (e === EMPTY) break;
    const home = Math.imul(hash[e], GOLDEN) >>> shift;
    // e may move into the hole iff its home is not cyclically in (hole, j]
    const inRange = hole <= j ? home > hole && home <= j : home > hole || home <= j;
    if (inRange) continue;
    slots[hole] = e;
    hole = j;
  }
  slots[hole] = EMPTY;
}

/** The slot holding index `from` now holds `to`. */
function tableReplace(sum: PauliSum, from: number, to: number): void {
  const slots = sum.slots, mask = slots.length - 1;
  let s = Math.imul(sum.hash[from], GOLDEN) >>> sum.shift;
  while (slots[s] !== from) s = (s + 1) & mask;
  slots[s] = to;
}

/** Keep the `budget` terms of largest |c|. */
function keepLargest(sum: PauliSum, budget: number, st: Stats, scratch: Scratch): void {
  const N = sum.count;
  if (N <= budget) return;
  const k = N - budget; // number to drop: the k smallest |c|
  const coef = sum.coef;
  // Gather the candidates below a guess T (from the previous prune), in index order, so the
  // selection runs on a small set; widen T until at least k candidates are found.
  let T = scratch.lastThr > 0 ? scratch.lastThr * 2 : Infinity;
  let m: number;
  for (;;) {
    if (scratch.abs.length < N) scratch.abs = new Float64Array(Math.ceil(N * 1.5));
    if (scratch.candIdx.length < N) scratch.candIdx = new Int32Array(Math.ceil(N * 1.5));
    const val = scratch.abs, idx = scratch.candIdx;
    m = 0;
    for (let i = 0; i < N; i++) {
      const a = coef[i] < 0 ? -coef[i] : coef[i];
      if (a < T) {
        val[m] = a;
        idx[m++] = i;
      }
    }
    if (m >= k) break;
    T = Infinity; // the guess was too low: take every term as a candidate (m = N >= k next time)
  }
  const val = scratch.abs, idx = scratch.candIdx;
  const sel = scratch.selBuf(m);
  sel.set(val.subarray(0, m));
  const thr = quickselect(sel, m, k); // the k-th smallest |c| overall (all smaller ones are candidates)
  scratch.lastThr = thr;
  if (scratch.del.length < k) scratch.del = new Int32Array(Math.ceil(k * 1.5));
  const del = scratch.del;
  let nDel = 0;
  for (let c = 0; c < m && nDel < k; c++) if (val[c] < thr) del[nDel++] = idx[c];
  for (let c = 0; c < m && nDel < k; c++) if (val[c] === thr) del[nDel++] = idx[c];
  // few removals keep the hash table valid by swap-removal, many compact and rebuild it
  removeIndices(sum, del, nDel, st, scratch);
}

/** The k-th smallest (1-based k) of a[0..n), reordering a. */
function quickselect(a: Float64Array, n: number, k: number): number {
  let lo = 0, hi = n - 1;
  const target = k - 1;
  while (lo < hi) {
    const pivot = a[(lo + hi) >>> 1];
    let i = lo, j = hi;
    while (i <= j) {
      while (a[i] < pivot) i++;
      while (a[j] > pivot) j--;
      if (i <= j) {
        const t = a[i]; a[i] = a[j]; a[j] = t;
        i++; j--;
      }
    }
    if (target <= j) hi = j;
    else if (target >= i) lo = i;
    else return a[target];
  }
  return a[target];
}
