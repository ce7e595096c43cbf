/**
 * Full statevector simulator for a CompiledCircuit (circuit.ts conventions): complex128, 16 bytes
 * per amplitude, interleaved (re, im, re, im, ...) in one Float64Array. Qubit q is bit q of the
 * basis-state index (little-endian: index = sum_q b_q 2^q). The state starts in |0...0>.
 *
 * Two kernel sets with one contract: WebAssembly SIMD (default; a tiny module assembled below, the
 * Float64Array is a view of its memory) and plain typed-array JS (fallback, engine: 'js').
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
import type { CompiledCircuit, Gate, ObservableSpec, PauliFactor } from './circuit';

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

// ------------------------------------------------------------------------------------------------
// 2x2 matrices: Float64Array(8) = [m00r, m00i, m01r, m01i, m10r, m10i, m11r, m11i]

export type Mat2 = Float64Array;

function mat2(a: number, b: number, c: number, d: number, e: number, f: number, g: number, h: number): Mat2 {
  const m = new Float64Array(8);
  m[0] = a; m[1] = b; m[2] = c; m[3] = d; m[4] = e; m[5] = f; m[6] = g; m[7] = h;
  return m;
}

/** a * b (apply b first, then a). */
export function mat2Mul(a: Mat2, b: Mat2): Mat2 {
  const r = new Float64Array(8);
  for (let i = 0; i < 2; i++) {
    for (let j = 0; j < 2; j++) {
      let re = 0;
      let im = 0;
      for (let k = 0; k < 2; k++) {
        const ar = a[4 * i + 2 * k], ai = a[4 * i + 2 * k + 1];
        const br = b[4 * k + 2 * j], bi = b[4 * k + 2 * j + 1];
        re += ar * br - ai * bi;
        im += ar * bi + ai * br;
      }
      r[4 * i + 2 * j] = re;
      r[4 * i + 2 * j + 1] = im;
    }
  }
  return r;
}

const SQRT1_2 = Math.SQRT1_2;

function param(g: Gate): number {
  const t = g.params?.[0];
  if (typeof t !== 'number' || !Number.isFinite(t)) throw new Error(`statevector: gate ${g.name} needs a finite angle`);
  return t;
}

/** The 2x2 matrix of a single-qubit gate (circuit.ts conventions). */
export function gateMatrix(g: Gate): Mat2 {
  switch (g.name) {
    case 'x': return mat2(0, 0, 1, 0, 1, 0, 0, 0);
    case 'y': return mat2(0, 0, 0, -1, 0, 1, 0, 0);
    case 'z': return mat2(1, 0, 0, 0, 0, 0, -1, 0);
    case 'h': return mat2(SQRT1_2, 0, SQRT1_2, 0, SQRT1_2, 0, -SQRT1_2, 0);
    case 's': return mat2(1, 0, 0, 0, 0, 0, 0, 1);
    case 'sdg': return mat2(1, 0, 0, 0, 0, 0, 0, -1);
    case 'sx': return mat2(0.5, 0.5, 0.5, -0.5, 0.5, -0.5, 0.5, 0.5);
    case 'rx': {
      const t = param(g), c = Math.cos(t / 2), s = Math.sin(t / 2);
      return mat2(c, 0, 0, -s, 0, -s, c, 0);
    }
    case 'ry': {
      const t = param(g), c = Math.cos(t / 2), s = Math.sin(t / 2);
      return mat2(c, 0, -s, 0, s, 0, c, 0);
    }
    case 'rz': {
      const t = param(g), c = Math.cos(t / 2), s = Math.sin(t / 2);
      return mat2(c, -s, 0, 0, 0, 0, c, s);
    }
    default:
      throw new Error(`statevector: ${g.name} is not a single-qubit gate`);
  }
}

// ------------------------------------------------------------------------------------------------
// Diagonal terms: a diagonal gate is exp(i * angle(bits)). One qubit: angles [a0, a1];
// two qubits (qa, qb): angles [a00, a01, a10, a11] indexed by 2*b_qa + b_qb.

export interface DiagTerm {
  qubits: number[];
  angles: number[];
}

function isDiagonal1(name: string): boolean {
  return name === 'z' || name === 's' || name === 'sdg' || name === 'rz';
}

function diagTerm(g: Gate): DiagTerm {
  const q = g.qubits;
  switch (g.name) {
    case 'z': return { qubits: [q[0]], angles: [0, Math.PI] };
    case 's': return { qubits: [q[0]], angles: [0, Math.PI / 2] };
    case 'sdg': return { qubits: [q[0]], angles: [0, -Math.PI / 2] };
    case 'rz': { const t = param(g); return { qubits: [q[0]], angles: [-t / 2, t / 2] }; }
    case 'rzz': { const t = param(g); return { qubits: [q[0], q[1]], angles: [-t / 2, t / 2, t / 2, -t / 2] }; }
    case 'cz': return { qubits: [q[0], q[1]], angles: [0, 0, 0, Math.PI] };
    default: throw new Error(`statevector: ${g.name} is not diagonal`);
  }
}

function termAngle(t: DiagTerm, index: number): number {
  if (t.qubits.length === 1) return t.angles[(index >>> t.qubits[0]) & 1];
  return t.angles[(((index >>> t.qubits[0]) & 1) << 1) | ((index >>> t.qubits[1]) & 1)];
}

// ------------------------------------------------------------------------------------------------
// Kernels on the interleaved array d (amplitude i at d[2i], d[2i+1]).
//
// Scalar JS is compute-bound in cache and latency-bound when streaming from memory, so:
//  - RX-form matrices [[c, -is], [-is, c]] with |c| >= 1/2 are applied as c * (1 - i t X), t = s/c
//    (4 multiplies per pair instead of 8); the scalars c are collected and folded into one
//    general matrix or into the diagonal pass of the same flush;
//  - the first kernel that streams a region from memory issues one extra load per cache line,
//    PF doubles ahead (a software prefetch: its value goes to a sink so it is not eliminated).

/** Prefetch distance in doubles (4 KiB ahead). */
const PF = 512;
let prefetchSink = 0;
/** Read by nothing; exported so that the prefetch loads stay live. */
export function _prefetchSink(): number {
  return prefetchSink;
}

/**
 * General 2x2 on pairs (off0 + k, off1 + k), k < len (amplitude units). When pf is true the loop
 * prefetches both streams (len must be a multiple of 4 then).
 */
function pairGen(d: Float64Array, off0: number, off1: number, len: number, m: Mat2, pf: boolean): void {
  const m0r = m[0], m0i = m[1], m1r = m[2], m1i = m[3], m2r = m[4], m2i = m[5], m3r = m[6], m3i = m[7];
  let a = 2 * off0;
  let b = 2 * off1;
  const end = a + 2 * len;
  if (pf) {
    const lim = Math.min(end, d.length - PF - (b - a), d.length - PF);
    let sink = 0;
    for (; a < lim; a += 8, b += 8) {
      sink += d[a + PF] + d[b + PF];
      for (let k = 0; k < 8; k += 2) {
        const xr = d[a + k], xi = d[a + k + 1], yr = d[b + k], yi = d[b + k + 1];
        d[a + k] = m0r * xr - m0i * xi + m1r * yr - m1i * yi;
        d[a + k + 1] = m0r * xi + m0i * xr + m1r * yi + m1i * yr;
        d[b + k] = m2r * xr - m2i * xi + m3r * yr - m3i * yi;
        d[b + k + 1] = m2r * xi + m2i * xr + m3r * yi + m3i * yr;
      }
    }
    prefetchSink += sink;
  }
  for (; a < end; a += 2, b += 2) {
    const xr = d[a], xi = d[a + 1], yr = d[b], yi = d[b + 1];
    d[a] = m0r * xr - m0i * xi + m1r * yr - m1i * yi;
    d[a + 1] = m0r * xi + m0i * xr + m1r * yi + m1i * yr;
    d[b] = m2r * xr - m2i * xi + m3r * yr - m3i * yi;
    d[b + 1] = m2r * xi + m2i * xr + m3r * yi + m3i * yr;
  }
}

/** (1 - i t X) on pairs (off0 + k, off1 + k), k < len. */
function pairTan(d: Float64Array, off0: number, off1: number, len: number, t: number, pf: boolean): void {
  let a = 2 * off0;
  let b = 2 * off1;
  const end = a + 2 * len;
  if (pf) {
    const lim = Math.min(end, d.length - PF - (b - a), d.length - PF);
    let sink = 0;
    for (; a < lim; a += 8, b += 8) {
      sink += d[a + PF] + d[b + PF];
      for (let k = 0; k < 8; k += 2) {
        const xr = d[a + k], xi = d[a + k + 1], yr = d[b + k], yi = d[b + k + 1];
        d[a + k] = xr + t * yi;
        d[a + k + 1] = xi - t * yr;
        d[b + k] = yr + t * xi;
        d[b + k + 1] = yi - t * xr;
      }
    }
    prefetchSink += sink;
  }
  for (; a < end; a += 2, b += 2) {
    const xr = d[a], xi = d[a + 1], yr = d[b], yi = d[b + 1];
    d[a] = xr + t * yi;
    d[a + 1] = xi - t * yr;
    d[b] = yr + t * xi;
    d[b + 1] = yi - t * xr;
  }
}

/** General 2x2 on qubit 0 over amplitudes [start, end). */
function q0Gen(d: Float64Array, start: number, end: number, m: Mat2, pf: boolean): void {
  const m0r = m[0], m0i = m[1], m1r = m[2], m1i = m[3], m2r = m[4], m2i = m[5], m3r = m[6], m3i = m[7];
  let a = 2 * start;
  const e = 2 * end;
  if (pf) {
    const lim = Math.min(e, d.length - PF);
    let sink = 0;
    for (; a < lim; a += 8) {
      sink += d[a + PF];
      for (let k = 0; k < 8; k += 4) {
        const xr = d[a + k], xi = d[a + k + 1], yr = d[a + k + 2], yi = d[a + k + 3];
        d[a + k] = m0r * xr - m0i * xi + m1r * yr - m1i * yi;
        d[a + k + 1] = m0r * xi + m0i * xr + m1r * yi + m1i * yr;
        d[a + k + 2] = m2r * xr - m2i * xi + m3r * yr - m3i * yi;
        d[a + k + 3] = m2r * xi + m2i * xr + m3r * yi + m3i * yr;
      }
    }
    prefetchSink += sink;
  }
  for (; a < e; a += 4) {
    const xr = d[a], xi = d[a + 1], yr = d[a + 2], yi = d[a + 3];
    d[a] = m0r * xr - m0i * xi + m1r * yr - m1i * yi;
    d[a + 1] = m0r * xi + m0i * xr + m1r * yi + m1i * yr;
    d[a + 2] = m2r * xr - m2i * xi + m3r * yr - m3i * yi;
    d[a + 3] = m2r * xi + m2i * xr + m3r * yi + m3i * yr;
  }
}

/** (1 - i t X) on qubit 0 over amplitudes [start, end). */
function q0Tan(d: Float64Array, start: number, end: number, t: number): void {
  const e = 2 * end;
  for (let a = 2 * start; a < e; a += 4) {
    const xr = d[a], xi = d[a + 1], yr = d[a + 2], yi = d[a + 3];
    d[a] = xr + t * yi;
    d[a + 1] = xi - t * yr;
    d[a + 2] = yr + t * xi;
    d[a + 3] = yi - t * xr;
  }
}

/** Two RX-form gates (1 - i t0 X) on qubit 0 and (1 - i t1 X) on qubit 1, over [start, end). */
function q01Tan(d: Float64Array, start: number, end: number, t0: number, t1: number): void {
  const e = 2 * end;
  for (let a = 2 * start; a < e; a += 8) {
    const r0 = d[a], i0 = d[a + 1], r1 = d[a + 2], i1 = d[a + 3];
    const r2 = d[a + 4], i2 = d[a + 5], r3 = d[a + 6], i3 = d[a + 7];
    // qubit 0: pairs (0, 1), (2, 3)
    const s0r = r0 + t0 * i1, s0i = i0 - t0 * r1, s1r = r1 + t0 * i0, s1i = i1 - t0 * r0;
    const s2r = r2 + t0 * i3, s2i = i2 - t0 * r3, s3r = r3 + t0 * i2, s3i = i3 - t0 * r2;
    // qubit 1: pairs (0, 2), (1, 3)
    d[a] = s0r + t1 * s2i;
    d[a + 1] = s0i - t1 * s2r;
    d[a + 4] = s2r + t1 * s0i;
    d[a + 5] = s2i - t1 * s0r;
    d[a + 2] = s1r + t1 * s3i;
    d[a + 3] = s1i - t1 * s3r;
    d[a + 6] = s3r + t1 * s1i;
    d[a + 7] = s3i - t1 * s1r;
  }
}

/**
 * Two RX-form gates on bits with strides sa < sb (amplitude units, sa >= 2): (1 - i ta X) on the
 * sa bit, (1 - i tb X) on the sb bit, on quadruples (o, o+sa, o+sb, o+sa+sb), o = base + k, k < len.
 */
function quadTan(d: Float64Array, base: number, sa: number, sb: number, len: number, ta: number, tb: number): void {
  let p0 = 2 * base;
  const p1 = 2 * sa, p2 = 2 * sb, p3 = p1 + p2;
  const end = p0 + 2 * len;
  for (; p0 < end; p0 += 2) {
    const r0 = d[p0], i0 = d[p0 + 1], r1 = d[p0 + p1], i1 = d[p0 + p1 + 1];
    const r2 = d[p0 + p2], i2 = d[p0 + p2 + 1], r3 = d[p0 + p3], i3 = d[p0 + p3 + 1];
    const s0r = r0 + ta * i1, s0i = i0 - ta * r1, s1r = r1 + ta * i0, s1i = i1 - ta * r0;
    const s2r = r2 + ta * i3, s2i = i2 - ta * r3, s3r = r3 + ta * i2, s3i = i3 - ta * r2;
    d[p0] = s0r + tb * s2i;
    d[p0 + 1] = s0i - tb * s2r;
    d[p0 + p2] = s2r + tb * s0i;
    d[p0 + p2 + 1] = s2i - tb * s0r;
    d[p0 + p1] = s1r + tb * s3i;
    d[p0 + p1 + 1] = s1i - tb * s3r;
    d[p0 + p3] = s3r + tb * s1i;
    d[p0 + p3 + 1] = s3i - tb * s1r;
  }
}

function isRealMat(m: Mat2): boolean {
  return m[1] === 0 && m[3] === 0 && m[5] === 0 && m[7] === 0;
}

function isRxForm(m: Mat2): boolean {
  return m[1] === 0 && m[7] === 0 && m[0] === m[6] && m[2] === 0 && m[4] === 0 && m[3] === m[5];
}

/** One single-qubit operation of a flush: a general matrix, or c * (1 - i t X) with t finite. */
interface SingleOp {
  q: number;
  m: Mat2;
  /** NaN for general matrices */
  t: number;
}

/** Apply op on qubit op.q to amplitudes [start, end) (a whole number of 2^(q+1) blocks). */
function applyOnRange(d: Float64Array, op: SingleOp, start: number, end: number, pf: boolean): void {
  const q = op.q;
  const isTan = op.t === op.t;
  if (q === 0) {
    if (isTan) q0Tan(d, start, end, op.t);
    else q0Gen(d, start, end, op.m, pf);
    return;
  }
  const s = 1 << q;
  const pfOk = pf && s >= 4;
  if (isTan) for (let base = start; base < end; base += 2 * s) pairTan(d, base, base + s, s, op.t, pfOk);
  else for (let base = start; base < end; base += 2 * s) pairGen(d, base, base + s, s, op.m, pfOk);
}

/** Apply low-qubit ops to [start, end) (in cache), pairing RX-form gates two at a time. */
function applyLowOps(d: Float64Array, ops: SingleOp[], start: number, end: number, pfFirst: boolean): void {
  let i = 0;
  if (pfFirst && ops.length > 0) {
    applyOnRange(d, ops[0], start, end, true);
    i = 1;
  }
  while (i < ops.length) {
    const a = ops[i], b = ops[i + 1];
    if (b !== undefined && a.t === a.t && b.t === b.t) {
      if (a.q === 0 && b.q === 1) q01Tan(d, start, end, a.t, b.t);
      else {
        const sa = 2 ** a.q, sb = 2 ** b.q; // a.q < b.q (sorted), a.q >= 1 here
        if (sa === 1) {
          // qubit 0 with a non-adjacent partner: do them one by one
          applyOnRange(d, a, start, end, false);
          applyOnRange(d, b, start, end, false);
        } else {
          for (let hi = start; hi < end; hi += 2 * sb) {
            for (let lo = hi; lo < hi + sb; lo += 2 * sa) quadTan(d, lo, sa, sb, sa, a.t, b.t);
          }
        }
      }
      i += 2;
    } else {
      applyOnRange(d, a, start, end, false);
      i++;
    }
  }
}

/** Tuning: low qubits (q < BLOCK_BITS) are applied together per block of 2^BLOCK_BITS amplitudes;
 * the diagonal phase table covers the same low qubits. */
export const BLOCK_BITS = 11;
/** High qubits are applied HIGH_GROUP at a time on 2^HIGH_GROUP runs of 2^RUN_BITS amplitudes. */
export const HIGH_GROUP = 7;
export const RUN_BITS = 8;
/** At most this many distinct high qubits may be touched by gates crossing the low/high split. */
export const DIAG_MAX_CROSS = 6;

function insertZeroBit(u: number, pos: number): number {
  const low = u & ((1 << pos) - 1);
  return ((u >>> pos) << (pos + 1)) | low;
}

function applyHighGroup(d: Float64Array, n: number, ops: SingleOp[], runBits: number): void {
  const G = ops.length;
  const runLen = 1 << runBits;
  const pos = ops.map((o) => o.q); // ascending
  const offs = new Float64Array(1 << G);
  for (let s = 0; s < 1 << G; s++) {
    let o = 0;
    for (let j = 0; j < G; j++) if (s & (1 << j)) o += 2 ** pos[j];
    offs[s] = o;
  }
  const nBases = 2 ** (n - runBits - G);
  for (let u = 0; u < nBases; u++) {
    let v = u;
    for (let j = 0; j < G; j++) v = insertZeroBit(v, pos[j] - runBits);
    const base = v * runLen;
    for (let j = 0; j < G; j++) {
      const bit = 1 << j;
      const op = ops[j];
      const isTan = op.t === op.t;
      const pf = j === 0 && runLen >= 4;
      for (let s = 0; s < 1 << G; s++) {
        if (s & bit) continue;
        const o0 = base + offs[s], o1 = base + offs[s | bit];
        if (isTan) pairTan(d, o0, o1, runLen, op.t, pf);
        else pairGen(d, o0, o1, runLen, op.m, pf);
      }
    }
  }
}

/**
 * One fused flush: the single-qubit matrices (distinct qubits, they commute), then the diagonal
 * terms. High qubits in groups of HIGH_GROUP per pass; then one pass over blocks of 2^BLOCK_BITS
 * amplitudes applies the low-qubit gates and the diagonal phase (and the collected scalars).
 */
export function applyFused(d: Float64Array, n: number, qubits: number[], mats: Mat2[], terms: DiagTerm[]): void {
  const W = Math.min(n, BLOCK_BITS);
  const L = 1 << W;
  const lowIdx: number[] = [];
  const highIdx: number[] = [];
  for (let i = 0; i < qubits.length; i++) (qubits[i] < W ? lowIdx : highIdx).push(i);
  lowIdx.sort((a, b) => qubits[a] - qubits[b]);
  highIdx.sort((a, b) => qubits[a] - qubits[b]);
  // a low pass happens if there are low gates or diagonal terms: only then can scalars be folded
  const lowPass = lowIdx.length > 0 || terms.length > 0;
  let scR = 1; // RX scalars are real
  const mkOp = (i: number, allowTan: boolean): SingleOp => {
    const m = mats[i];
    if (allowTan && isRxForm(m) && Math.abs(m[0]) >= 0.5) {
      scR *= m[0];
      return { q: qubits[i], m, t: -m[3] / m[0] };
    }
    return { q: qubits[i], m, t: NaN };
  };
  const highOps = highIdx.map((i) => mkOp(i, lowPass));
  // the first low op stays general: the per-block scalar is folded into it
  const lowOps = lowIdx.map((i, k) => mkOp(i, k > 0));

  // high passes
  if (highOps.length > 0) {
    const runBits = Math.min(RUN_BITS, W);
    for (let g0 = 0; g0 < highOps.length; g0 += HIGH_GROUP) applyHighGroup(d, n, highOps.slice(g0, g0 + HIGH_GROUP), runBits);
  }
  if (!lowPass) return;

  // diagonal plan
  const lowTerms: DiagTerm[] = [];
  const highTerms: DiagTerm[] = [];
  const crossTerms: DiagTerm[] = [];
  const extra: DiagTerm[] = [];
  const cross: number[] = [];
  for (const t of terms) {
    const nLow = t.qubits.filter((q) => q < W).length;
    if (nLow === t.qubits.length) lowTerms.push(t);
    else if (nLow === 0) highTerms.push(t);
    else {
      const hq = t.qubits[0] >= W ? t.qubits[0] : t.qubits[1];
      if (!cross.includes(hq)) {
        if (cross.length >= DIAG_MAX_CROSS) { extra.push(t); continue; }
        cross.push(hq);
      }
      crossTerms.push(t);
    }
  }
  const hasDiag = lowTerms.length + crossTerms.length > 0;
  const C = cross.length;
  const tables: Float64Array[] = [];
  if (hasDiag) {
    const lowAngle = new Float64Array(L);
    for (let l = 0; l < L; l++) {
      let a = 0;
      for (const t of lowTerms) a += termAngle(t, l);
      lowAngle[l] = a;
    }
    for (let c = 0; c < 1 << C; c++) {
      let hiBits = 0;
      for (let j = 0; j < C; j++) if (c & (1 << j)) hiBits |= 1 << cross[j];
      const tab = new Float64Array(2 * L);
      for (let l = 0; l < L; l++) {
        let a = lowAngle[l];
        const idx = hiBits | l;
        for (const t of crossTerms) a += termAngle(t, idx);
        tab[2 * l] = Math.cos(a);
        tab[2 * l + 1] = Math.sin(a);
      }
      tables.push(tab);
    }
  }

  const first = lowOps.length > 0 ? lowOps[0] : null;
  const rest = lowOps.slice(1);
  const scaled = new Float64Array(8);
  const H = 2 ** (n - W);
  for (let h = 0; h < H; h++) {
    const hIndex = h * L;
    // block scalar: collected RX scalars times the high-qubit diagonal phase
    let pr = scR, pi = 0;
    if (highTerms.length > 0) {
      let a = 0;
      for (const t of highTerms) a += termAngle(t, hIndex);
      const cr = Math.cos(a), ci = Math.sin(a);
      pr = scR * cr;
      pi = scR * ci;
    }
    const start = hIndex, end = hIndex + L;
    if (first) {
      const m = first.m;
      for (let k = 0; k < 8; k += 2) {
        scaled[k] = pr * m[k] - pi * m[k + 1];
        scaled[k + 1] = pr * m[k + 1] + pi * m[k];
      }
      applyOnRange(d, { q: first.q, m: scaled, t: NaN }, start, end, true);
      applyLowOps(d, rest, start, end, false);
    }
    if (hasDiag) {
      let c = 0;
      for (let j = 0; j < C; j++) c |= ((hIndex >>> cross[j]) & 1) << j;
      const tab = tables[c];
      let o = 2 * hIndex;
      if (first) {
        for (let l = 0; l < 2 * L; l += 2, o += 2) {
          const tr = tab[l], ti = tab[l + 1];
          const xr = d[o], xi = d[o + 1];
          d[o] = tr * xr - ti * xi;
          d[o + 1] = tr * xi + ti * xr;
        }
      } else {
        let sink = 0;
        const pfOk = o + 2 * L + PF <= d.length;
        for (let l = 0; l < 2 * L; l += 2, o += 2) {
          if (pfOk && (l & 7) === 0) sink += d[o + PF];
          const tr0 = tab[l], ti0 = tab[l + 1];
          const tr = pr * tr0 - pi * ti0, ti = pr * ti0 + pi * tr0;
          const xr = d[o], xi = d[o + 1];
          d[o] = tr * xr - ti * xi;
          d[o + 1] = tr * xi + ti * xr;
        }
        prefetchSink += sink;
      }
    } else if (!first && (pr !== 1 || pi !== 0)) {
      let o = 2 * hIndex;
      for (let l = 0; l < 2 * L; l += 2, o += 2) {
        const xr = d[o], xi = d[o + 1];
        d[o] = pr * xr - pi * xi;
        d[o + 1] = pr * xi + pi * xr;
      }
    }
  }
  if (extra.length > 0) applyFused(d, n, [], [], extra);
}

/** Apply a set of single-qubit matrices on distinct qubits (they commute). */
export function applySingles(d: Float64Array, n: number, qubits: number[], mats: Mat2[]): void {
  applyFused(d, n, qubits, mats, []);
}

/** Multiply the state by exp(i * sum of the terms' angles). */
export function applyDiagonal(d: Float64Array, n: number, terms: DiagTerm[]): void {
  applyFused(d, n, [], [], terms);
}

// ------------------------------------------------------------------------------------------------
// WebAssembly SIMD kernels (the default engine where WebAssembly SIMD is available).
// Scalar JS reaches only about a third of memory bandwidth when streaming a large state, so the
// inner loops are a tiny hand-assembled wasm module working on the state in its linear memory
// (f64x2: one complex amplitude per v128). The module is built here from its opcodes; no
// toolchain or binary blob is involved. Byte offsets are i32, so the wasm engine holds states up
// to WASM_MAX_QUBITS; wider states (and hosts without wasm SIMD) use the JS kernels.

export const WASM_MAX_QUBITS = 27;

function buildKernelModule(): Uint8Array<ArrayBuffer> {
  const uleb = (v: number): number[] => {
    const o: number[] = [];
    do {
      let b = v & 0x7f;
      v >>>= 7;
      if (v) b |= 0x80;
      o.push(b);
    } while (v);
    return o;
  };
  const vec = (items: number[][]): number[] => [...uleb(items.length), ...items.flat()];
  const section = (id: number, b: number[]): number[] => [id, ...uleb(b.length), ...b];
  const str = (s: string): number[] => [...uleb(s.length), ...[...s].map((c) => c.charCodeAt(0))];
  const I32 = 0x7f, F64 = 0x7c, V128 = 0x7b;
  const get = (i: number) => [0x20, ...uleb(i)];
  const set = (i: number) => [0x21, ...uleb(i)];
  const tee = (i: number) => [0x22, ...uleb(i)];
  const sleb = (v: number): number[] => {
    const o: number[] = [];
    for (;;) {
      const b = v & 0x7f;
      v >>= 7;
      if ((v === 0 && !(b & 0x40)) || (v === -1 && b & 0x40)) { o.push(b); return o; }
      o.push(b | 0x80);
    }
  };
  const i32c = (v: number) => [0x41, ...sleb(v)];
  const add = [0x6a], geu = [0x4f], ltu = [0x49];
  const simd = (op: number) => [0xfd, ...uleb(op)];
  const vload = (off = 0) => [...simd(0x00), 4, ...uleb(off)];
  const vstore = (off = 0) => [...simd(0x0b), 4, ...uleb(off)];
  const f64load = (off: number) => [0x2b, 3, ...uleb(off)];
  const splat = simd(0x14), vadd = simd(0xf0), vmul = simd(0xf2);
  const f64bytes = (x: number) => [...new Uint8Array(new Float64Array([x]).buffer)];
  const vconst = (a: number, b: number) => [...simd(0x0c), ...f64bytes(a), ...f64bytes(b)];
  const shuf = (lanes: number[]) => [...simd(0x0d), ...lanes];
  const SWAP = [8, 9, 10, 11, 12, 13, 14, 15, 0, 1, 2, 3, 4, 5, 6, 7];
  const LO = [0, 1, 2, 3, 4, 5, 6, 7, 0, 1, 2, 3, 4, 5, 6, 7];
  const HI = [8, 9, 10, 11, 12, 13, 14, 15, 8, 9, 10, 11, 12, 13, 14, 15];
  const swapOf = (i: number) => [...get(i), ...get(i), ...shuf(SWAP)];
  const block = (b: number[]) => [0x02, 0x40, ...b, 0x0b];
  const loop = (b: number[]) => [0x03, 0x40, ...b, 0x0b];
  const br = (l: number) => [0x0c, ...uleb(l)];
  const brIf = (l: number) => [0x0d, ...uleb(l)];
  const PM = vconst(-1, 1);

  // Kernel families: rx (RX form: C = splat(c), S = [s, -s]; x' = C x + S swap(y), y' = C y + S swap(x)),
  // real (real 2x2: x' = A x + B y, y' = C x + D y), gen (complex 2x2, 8 coefficient vectors).
  // Layouts: strided (start, end, step, run, sB, ...): for (base = start; base < end; base += step)
  //   for (p = base; p < base + run; p += 32) pairs (p + o, p + o + sB), o = 0, 16 (run % 32 == 0);
  // adjacent (start, end, ...): for (p = start; p < end; p += 64) pairs (p + o, p + o + 16), o = 0, 32.
  type Kind = 'rx' | 'real' | 'gen';
  const build = (kind: Kind, adjacent: boolean, dual: boolean): { params: number[]; locals: number[]; body: number[] } => {
    // dual: every pair (a, b) is also applied at (a + D, b + D), D a parameter: two memory streams
    const nI = (adjacent ? 2 : 5) + (dual ? 1 : 0); // i32 params before the kind-specific ones
    const Dp = adjacent ? 2 : 5;
    const params = [...Array(nI).fill(I32), ...(kind === 'rx' ? [F64, F64] : [I32])];
    const np = params.length;
    const base = np, p = adjacent ? np : np + 1, lim = np + 2;
    const nIntLocals = adjacent ? 1 : 3;
    const v0 = np + nIntLocals; // first v128 local
    const nCoef = kind === 'rx' ? 2 : kind === 'real' ? 4 : 8;
    const x = v0 + nCoef, y = x + 1, sx = x + 2, sy = x + 3;
    const sBp = 4;
    const init: number[] = [];
    if (kind === 'rx') {
      const cp = nI, spp = nI + 1;
      init.push(...get(cp), ...splat, ...set(v0), ...get(spp), ...splat, ...vconst(1, -1), ...vmul, ...set(v0 + 1));
    } else if (kind === 'real') {
      for (let k = 0; k < 4; k++) init.push(...get(nI), ...f64load(16 * k), ...splat, ...set(v0 + k));
    } else {
      for (let k = 0; k < 4; k++) {
        init.push(...get(nI), ...f64load(16 * k), ...splat, ...set(v0 + 2 * k));
        init.push(...get(nI), ...f64load(16 * k + 8), ...splat, ...PM, ...vmul, ...set(v0 + 2 * k + 1));
      }
    }
    const xAddr = (second: boolean): number[] => [...get(p), ...(second ? [...get(Dp), ...add] : [])];
    const yAddr = (second: boolean): number[] =>
      adjacent ? xAddr(second) : [...get(p), ...get(sBp), ...add, ...(second ? [...get(Dp), ...add] : [])];
    const yOff = (o: number) => (adjacent ? o + 16 : o);
    const onePair = (o: number, second: boolean): number[] => {
      const b: number[] = [...xAddr(second), ...vload(o), ...set(x), ...yAddr(second), ...vload(yOff(o)), ...set(y)];
      let outX: number[], outY: number[];
      if (kind === 'rx') {
        outX = [...get(v0), ...get(x), ...vmul, ...get(v0 + 1), ...swapOf(y), ...vmul, ...vadd];
        outY = [...get(v0), ...get(y), ...vmul, ...get(v0 + 1), ...swapOf(x), ...vmul, ...vadd];
      } else if (kind === 'real') {
        outX = [...get(v0), ...get(x), ...vmul, ...get(v0 + 1), ...get(y), ...vmul, ...vadd];
        outY = [...get(v0 + 2), ...get(x), ...vmul, ...get(v0 + 3), ...get(y), ...vmul, ...vadd];
      } else {
        b.push(...swapOf(x), ...set(sx), ...swapOf(y), ...set(sy));
        const lin = (c: number) => [
          ...get(c), ...get(x), ...vmul, ...get(c + 1), ...get(sx), ...vmul, ...vadd,
          ...get(c + 2), ...get(y), ...vmul, ...vadd, ...get(c + 3), ...get(sy), ...vmul, ...vadd,
        ];
        outX = lin(v0);
        outY = lin(v0 + 4);
      }
      b.push(...xAddr(second), ...outX, ...vstore(o), ...yAddr(second), ...outY, ...vstore(yOff(o)));
      return b;
    };
    const pairBody = (o: number): number[] => (dual ? [...onePair(o, false), ...onePair(o, true)] : onePair(o, false));
    let loopCode: number[];
    if (adjacent) {
      loopCode = [
        ...get(0), ...set(p),
        ...block([...loop([
          ...get(p), ...get(1), ...geu, ...brIf(1),
          ...pairBody(0), ...pairBody(32),
          ...get(p), ...i32c(64), ...add, ...set(p), ...br(0),
        ])]),
      ];
    } else {
      loopCode = [
        ...get(0), ...set(base),
        ...block([...loop([
          ...get(base), ...get(1), ...geu, ...brIf(1),
          ...get(base), ...set(p),
          ...get(base), ...get(3), ...add, ...set(lim),
          ...loop([...pairBody(0), ...pairBody(16), ...get(p), ...i32c(32), ...add, ...tee(p), ...get(lim), ...ltu, ...brIf(0)]),
          ...get(base), ...get(2), ...add, ...set(base),
          ...br(0),
        ])]),
      ];
    }
    const nV = nCoef + (kind === 'gen' ? 4 : 2);
    return { params, locals: vec([[...uleb(nIntLocals), I32], [...uleb(nV), V128]]), body: [...init, ...loopCode] };
  };

  // diag(start, end, tptr, pr, pi): amp *= (pr + i pi) * table; locals 5 p, 6 tp; 7 PR, 8 PI, 9 t, 10 f, 11 a
  const diagBody = [
    ...get(3), ...splat, ...set(7),
    ...get(4), ...splat, ...PM, ...vmul, ...set(8),
    ...get(0), ...set(5), ...get(2), ...set(6),
    ...block([
      ...loop([
        ...get(5), ...get(1), ...geu, ...brIf(1),
        ...get(6), ...vload(), ...set(9),
        ...get(7), ...get(9), ...vmul, ...get(8), ...swapOf(9), ...vmul, ...vadd, ...set(10),
        ...get(5), ...vload(), ...set(11),
        ...get(5),
        ...get(10), ...get(10), ...shuf(LO), ...get(11), ...vmul,
        ...get(10), ...get(10), ...shuf(HI), ...PM, ...vmul, ...swapOf(11), ...vmul, ...vadd,
        ...vstore(),
        ...get(5), ...i32c(16), ...add, ...set(5),
        ...get(6), ...i32c(16), ...add, ...set(6),
        ...br(0),
      ]),
    ]),
  ];
  const diagLocals = vec([[...uleb(2), I32], [...uleb(5), V128]]);

  const code = (locals: number[], body: number[]) => {
    const b = [...locals, ...body, 0x0b];
    return [...uleb(b.length), ...b];
  };
  const fn = (params: number[]) => [0x60, ...vec(params.map((p) => [p])), ...vec([])];
  const kernels: { name: string; params: number[]; locals: number[]; body: number[] }[] = [];
  for (const kind of ['rx', 'real', 'gen'] as Kind[]) {
    for (const adjacent of [false, true]) {
      for (const dual of [false, true]) kernels.push({ name: kind + (adjacent ? '0' : '') + (dual ? 'd' : ''), ...build(kind, adjacent, dual) });
    }
  }
  kernels.push({ name: 'diag', params: [I32, I32, I32, F64, F64], locals: diagLocals, body: diagBody });
  const types = vec(kernels.map((k) => fn(k.params)));
  const mod = [
    0x00, 0x61, 0x73, 0x6d, 1, 0, 0, 0,
    ...section(1, types),
    ...section(2, vec([[...str('env'), ...str('mem'), 0x02, 0x00, ...uleb(1)]])),
    ...section(3, vec(kernels.map((_, i) => [i]))),
    ...section(7, vec(kernels.map((k, i) => [...str(k.name), 0x00, i]))),
    ...section(10, vec(kernels.map((k) => code(k.locals, k.body)))),
  ];
  return new Uint8Array(mod);
}

interface WasmKernels {
  rx(start: number, end: number, step: number, run: number, sB: number, c: number, s: number): void;
  gen(start: number, end: number, step: number, run: number, sB: number, mptr: number): void;
  real(start: number, end: number, step: number, run: number, sB: number, mptr: number): void;
  rx0(start: number, end: number, c: number, s: number): void;
  gen0(start: number, end: number, mptr: number): void;
  real0(start: number, end: number, mptr: number): void;
  rxd(start: number, end: number, step: number, run: number, sB: number, D: number, c: number, s: number): void;
  gend(start: number, end: number, step: number, run: number, sB: number, D: number, mptr: number): void;
  reald(start: number, end: number, step: number, run: number, sB: number, D: number, mptr: number): void;
  rx0d(start: number, end: number, D: number, c: number, s: number): void;
  gen0d(start: number, end: number, D: number, mptr: number): void;
  real0d(start: number, end: number, D: number, mptr: number): void;
  diag(start: number, end: number, tptr: number, pr: number, pi: number): void;
}

let wasmModule: WebAssembly.Module | null | undefined;
function getWasmModule(): WebAssembly.Module | null {
  if (wasmModule !== undefined) return wasmModule;
  try {
    const bytes = buildKernelModule();
    wasmModule = typeof WebAssembly !== 'undefined' && WebAssembly.validate(bytes) ? new WebAssembly.Module(bytes) : null;
  } catch {
    wasmModule = null;
  }
  return wasmModule;
}

/** True when this host runs the WebAssembly SIMD kernels. */
export function wasmKernelsAvailable(): boolean {
  return getWasmModule() !== null;
}

/** Scratch after the state: a 2x2 matrix (64 B) and the diagonal phase tables. */
const SCRATCH_MATRIX = 64;
const SCRATCH_TABLES = (1 << DIAG_MAX_CROSS) * (1 << BLOCK_BITS) * 16;

class WasmState {
  readonly data: Float64Array;
  readonly k: WasmKernels;
  readonly mptr: number;
  readonly tptr: number;
  readonly mat: Float64Array;
  constructor(nQubits: number) {
    const mod = getWasmModule();
    if (!mod) throw new Error('statevector: WebAssembly SIMD is not available');
    const stateBytes = statevectorBytes(nQubits);
    const pages = Math.ceil((stateBytes + SCRATCH_MATRIX + SCRATCH_TABLES) / 65536);
    const mem = new WebAssembly.Memory({ initial: pages });
    const inst = new WebAssembly.Instance(mod, { env: { mem } });
    this.k = inst.exports as unknown as WasmKernels;
    this.data = new Float64Array(mem.buffer, 0, 2 * 2 ** nQubits);
    this.mptr = stateBytes;
    this.tptr = stateBytes + SCRATCH_MATRIX;
    this.mat = new Float64Array(mem.buffer, this.mptr, 8);
  }
  table(c: number, L: number): Float64Array {
    return new Float64Array(this.data.buffer, this.tptr + c * L * 16, 2 * L);
  }
}

/** The wasm counterpart of applyFused (same contract). */
function applyFusedWasm(ws: WasmState, n: number, qubits: number[], mats: Mat2[], terms: DiagTerm[]): void {
  const k = ws.k;
  const W = Math.min(n, BLOCK_BITS);
  const L = 1 << W;
  const lowIdx: number[] = [];
  const highIdx: number[] = [];
  for (let i = 0; i < qubits.length; i++) (qubits[i] < W ? lowIdx : highIdx).push(i);
  lowIdx.sort((a, b) => qubits[a] - qubits[b]);
  highIdx.sort((a, b) => qubits[a] - qubits[b]);
  const setMat = (m: Mat2) => ws.mat.set(m);
  // one gate on qubit q over amplitudes [start, end), and also over [start + dual, end + dual) if dual > 0
  const gate = (q: number, m: Mat2, start: number, end: number, dual: number) => {
    const rx = isRxForm(m);
    const real = !rx && isRealMat(m);
    if (!rx) setMat(m);
    const a = start * 16, b = end * 16, D = dual * 16;
    if (q === 0) {
      if (end - start < 4) { // 1-qubit states
        q0Gen(ws.data, start, end, m, false);
        if (dual) q0Gen(ws.data, start + dual, end + dual, m, false);
        return;
      }
      if (dual) {
        if (rx) k.rx0d(a, b, D, m[0], -m[3]);
        else if (real) k.real0d(a, b, D, ws.mptr);
        else k.gen0d(a, b, D, ws.mptr);
      } else if (rx) k.rx0(a, b, m[0], -m[3]);
      else if (real) k.real0(a, b, ws.mptr);
      else k.gen0(a, b, ws.mptr);
      return;
    }
    const sB = 16 * 2 ** q;
    if (dual) {
      if (rx) k.rxd(a, b, 2 * sB, sB, sB, D, m[0], -m[3]);
      else if (real) k.reald(a, b, 2 * sB, sB, sB, D, ws.mptr);
      else k.gend(a, b, 2 * sB, sB, sB, D, ws.mptr);
    } else if (rx) k.rx(a, b, 2 * sB, sB, sB, m[0], -m[3]);
    else if (real) k.real(a, b, 2 * sB, sB, sB, ws.mptr);
    else k.gen(a, b, 2 * sB, sB, sB, ws.mptr);
  };

  // high passes: groups of HIGH_GROUP qubits on 2^G runs of 2^RUN_BITS amplitudes
  if (highIdx.length > 0) {
    const runBits = Math.min(RUN_BITS, W);
    const runLen = 1 << runBits;
    for (let g0 = 0; g0 < highIdx.length; g0 += HIGH_GROUP) {
      const grp = highIdx.slice(g0, g0 + HIGH_GROUP);
      const G = grp.length;
      const pos = grp.map((i) => qubits[i]);
      const ms = grp.map((i) => mats[i]);
      const rxs = ms.map(isRxForm);
      const reals = ms.map((m, j) => !rxs[j] && isRealMat(m));
      const offs = new Float64Array(1 << G);
      for (let s = 0; s < 1 << G; s++) {
        let o = 0;
        for (let j = 0; j < G; j++) if (s & (1 << j)) o += 2 ** pos[j];
        offs[s] = o;
      }
      const nBases = 2 ** (n - runBits - G);
      const runB = runLen * 16;
      const expand = (u: number) => {
        let v = u;
        for (let j = 0; j < G; j++) v = insertZeroBit(v, pos[j] - runBits);
        return v * runLen;
      };
      // bases u and u + nBases/2 go together (two memory streams); their distance is constant
      const half = nBases >= 2 ? nBases / 2 : 0;
      const D = half ? expand(half) * 16 : 0;
      for (let u = 0; u < (half || 1); u++) {
        const base = expand(u);
        for (let j = 0; j < G; j++) {
          const bit = 1 << j;
          const m = ms[j];
          const sB = 16 * 2 ** pos[j];
          if (!rxs[j]) setMat(m);
          const c = m[0], sn = -m[3];
          for (let s = 0; s < 1 << G; s++) {
            if (s & bit) continue;
            const o0 = (base + offs[s]) * 16;
            if (D) {
              if (rxs[j]) k.rxd(o0, o0 + 1, runB, runB, sB, D, c, sn);
              else if (reals[j]) k.reald(o0, o0 + 1, runB, runB, sB, D, ws.mptr);
              else k.gend(o0, o0 + 1, runB, runB, sB, D, ws.mptr);
            } else if (rxs[j]) k.rx(o0, o0 + 1, runB, runB, sB, c, sn);
            else if (reals[j]) k.real(o0, o0 + 1, runB, runB, sB, ws.mptr);
            else k.gen(o0, o0 + 1, runB, runB, sB, ws.mptr);
          }
        }
      }
    }
  }

  // diagonal plan (as in applyFused)
  const lowTerms: DiagTerm[] = [];
  const highTerms: DiagTerm[] = [];
  const crossTerms: DiagTerm[] = [];
  const extra: DiagTerm[] = [];
  const cross: number[] = [];
  for (const t of terms) {
    const nLow = t.qubits.filter((q) => q < W).length;
    if (nLow === t.qubits.length) lowTerms.push(t);
    else if (nLow === 0) highTerms.push(t);
    else {
      const hq = t.qubits[0] >= W ? t.qubits[0] : t.qubits[1];
      if (!cross.includes(hq)) {
        if (cross.length >= DIAG_MAX_CROSS) { extra.push(t); continue; }
        cross.push(hq);
      }
      crossTerms.push(t);
    }
  }
  const hasDiag = terms.length > extra.length;
  const C = cross.length;
  if (hasDiag) {
    const lowAngle = new Float64Array(L);
    for (let l = 0; l < L; l++) {
      let a = 0;
      for (const t of lowTerms) a += termAngle(t, l);
      lowAngle[l] = a;
    }
    for (let c = 0; c < 1 << C; c++) {
      let hiBits = 0;
      for (let j = 0; j < C; j++) if (c & (1 << j)) hiBits |= 1 << cross[j];
      const tab = ws.table(c, L);
      for (let l = 0; l < L; l++) {
        let a = lowAngle[l];
        const idx = hiBits | l;
        for (const t of crossTerms) a += termAngle(t, idx);
        tab[2 * l] = Math.cos(a);
        tab[2 * l + 1] = Math.sin(a);
      }
    }
  }
  if (lowIdx.length > 0 || hasDiag) {
    const H = 2 ** (n - W);
    // blocks h and h + H/2 go together (two memory streams keep more loads in flight)
    const pairs = H >= 2 ? H / 2 : 1;
    const dual = H >= 2 ? (H / 2) * L : 0;
    const diagBlock = (start: number) => {
      let a = 0;
      for (const t of highTerms) a += termAngle(t, start);
      let c = 0;
      for (let j = 0; j < C; j++) c |= ((start >>> cross[j]) & 1) << j;
      k.diag(start * 16, (start + L) * 16, ws.tptr + c * L * 16, Math.cos(a), Math.sin(a));
    };
    for (let h = 0; h < pairs; h++) {
      const start = h * L, end = start + L;
      for (const i of lowIdx) gate(qubits[i], mats[i], start, end, dual);
      if (hasDiag) {
        diagBlock(start);
        if (dual) diagBlock(start + dual);
      }
    }
  }
  if (extra.length > 0) applyFusedWasm(ws, n, [], [], extra);
}

// ------------------------------------------------------------------------------------------------
// Planner: greedy fusion of a gate list into [singles, diagonal] pairs.

const H_MAT = gateMatrix({ name: 'h', qubits: [0] });

class Planner {
  private singles = new Map<number, Mat2>();
  private diag: DiagTerm[] = [];
  private diagQubits = new Set<number>();
  constructor(private readonly flush: (qubits: number[], mats: Mat2[], diag: DiagTerm[]) => void) {}

  single(q: number, m: Mat2, diagonal: boolean, g?: Gate): void {
    if (this.diagQubits.has(q)) {
      if (diagonal && g) { this.addDiag(diagTerm(g)); return; }
      this.doFlush();
    } else if (diagonal && g && (this.diag.length > 0 || !this.singles.has(q))) {
      this.addDiag(diagTerm(g));
      return;
    }
    const prev = this.singles.get(q);
    this.singles.set(q, prev ? mat2Mul(m, prev) : m);
  }

  addDiag(t: DiagTerm): void {
    this.diag.push(t);
    for (const q of t.qubits) this.diagQubits.add(q);
  }

  gate(g: Gate): void {
    switch (g.name) {
      case 'rzz':
      case 'cz':
        this.addDiag(diagTerm(g));
        return;
      case 'cx': {
        const [c, t] = g.qubits;
        this.single(t, H_MAT, false);
        this.addDiag({ qubits: [c, t], angles: [0, 0, 0, Math.PI] });
        this.single(t, H_MAT, false);
        return;
      }
      default:
        this.single(g.qubits[0], gateMatrix(g), isDiagonal1(g.name), g);
    }
  }

  doFlush(): void {
    if (this.singles.size === 0 && this.diag.length === 0) return;
    const qs = [...this.singles.keys()];
    const ms = qs.map((q) => this.singles.get(q)!);
    const dg = this.diag;
    this.singles = new Map();
    this.diag = [];
    this.diagQubits = new Set();
    this.flush(qs, ms, dg);
  }
}

function validateGate(g: Gate, n: number, index: number): void {
  const ar = g.name === 'rzz' || g.name === 'cx' || g.name === 'cz' ? 2 : 1;
  if (g.qubits.length !== ar) throw new Error(`statevector: gate ${index} (${g.name}) needs ${ar} qubit(s)`);
  for (const q of g.qubits) {
    if (!Number.isInteger(q) || q < 0 || q >= n) throw new Error(`statevector: gate ${index} (${g.name}) has qubit ${q} outside 0..${n - 1}`);
  }
  if (ar === 2 && g.qubits[0] === g.qubits[1]) throw new Error(`statevector: gate ${index} (${g.name}) acts twice on qubit ${g.qubits[0]}`);
}

// ------------------------------------------------------------------------------------------------

function parity32(v: number): number {
  v ^= v >>> 16;
  v ^= v >>> 8;
  v ^= v >>> 4;
  v ^= v >>> 2;
  v ^= v >>> 1;
  return v & 1;
}

export class Statevector {
  readonly nQubits: number;
  /** Interleaved amplitudes: amplitude i is data[2i] + i data[2i+1]. */
  readonly data: Float64Array;

  /** The kernels in use: 'wasm' (WebAssembly SIMD) or 'js'. */
  readonly engine: 'wasm' | 'js';
  private readonly ws: WasmState | null;

  constructor(nQubits: number, opts: { maxQubits?: number; engine?: 'wasm' | 'js' } = {}) {
    checkQubitLimit(nQubits, opts.maxQubits ?? DEFAULT_MAX_QUBITS);
    this.nQubits = nQubits;
    let ws: WasmState | null = null;
    if (opts.engine !== 'js' && nQubits <= WASM_MAX_QUBITS && wasmKernelsAvailable()) {
      try {
        ws = new WasmState(nQubits);
      } catch {
        ws = null; // e.g. the host refused a large wasm memory: fall back to the JS kernels
      }
    }
    this.ws = ws;
    this.engine = ws ? 'wasm' : 'js';
    this.data = ws ? ws.data : new Float64Array(2 * 2 ** nQubits);
    this.data[0] = 1;
  }

  /** One fused flush: single-qubit matrices on distinct qubits, then diagonal terms. */
  applyFlush(qubits: number[], mats: Mat2[], terms: DiagTerm[]): void {
    if (this.ws) applyFusedWasm(this.ws, this.nQubits, qubits, mats, terms);
    else applyFused(this.data, this.nQubits, qubits, mats, terms);
  }

  /** Simulate a circuit from |0...0>. */
  static run(circuit: CompiledCircuit, opts: StatevectorOptions = {}): Statevector {
    const sv = new Statevector(circuit.nQubits, opts);
    sv.apply(circuit, opts);
    return sv;
  }

  get size(): number {
    return 2 ** this.nQubits;
  }

  get bytes(): number {
    return statevectorBytes(this.nQubits);
  }

  /** Apply the circuit's gates to the current state. */
  apply(circuit: CompiledCircuit, opts: StatevectorOptions = {}): void {
    const n = this.nQubits;
    if (circuit.nQubits !== n) throw new Error(`statevector: circuit has ${circuit.nQubits} qubits, state has ${n}`);
    const gates = circuit.gates;
    const total = gates.length;
    gates.forEach((g, i) => validateGate(g, n, i));
    const onProgress = opts.onProgress;
    if (opts.noFusion) {
      for (let i = 0; i < total; i++) {
        this.applyGate(gates[i]);
        onProgress?.(i + 1, total);
      }
      return;
    }
    let done = 0;
    let consumed = 0;
    const planner = new Planner((qs, ms, dg) => {
      this.applyFlush(qs, ms, dg);
      done = consumed;
      onProgress?.(done, total);
    });
    // layer hints: an 'rzz' layer whose gates are all rzz goes to the diagonal set in one go
    const layerAt = new Map<number, number>();
    for (const L of circuit.layers ?? []) {
      if (L.kind === 'rzz' && L.start >= 0 && L.end <= total && L.end > L.start) layerAt.set(L.start, L.end);
    }
    let i = 0;
    while (i < total) {
      const end = layerAt.get(i);
      if (end !== undefined && gates.slice(i, end).every((g) => g.name === 'rzz')) {
        for (let k = i; k < end; k++) planner.addDiag(diagTerm(gates[k]));
        consumed = end;
        i = end;
        continue;
      }
      // gates consumed before a flush triggered by this gate are the ones before it
      consumed = i;
      planner.gate(gates[i]);
      consumed = i + 1;
      i++;
    }
    consumed = total;
    planner.doFlush();
    if (done !== total) onProgress?.(total, total);
  }

  /** Apply one gate, unfused (one pass over the state per gate). */
  applyGate(g: Gate): void {
    const n = this.nQubits;
    validateGate(g, n, 0);
    if (g.name === 'rzz' || g.name === 'cz' || isDiagonal1(g.name)) {
      this.applyFlush([], [], [diagTerm(g)]);
    } else if (g.name === 'cx') {
      this.applyCx(g.qubits[0], g.qubits[1]);
    } else {
      this.applyFlush([g.qubits[0]], [gateMatrix(g)], []);
    }
  }

  /** Apply a 2x2 matrix on one qubit (one pass). */
  applyMatrix(q: number, m: Mat2): void {
    this.applyFlush([q], [m], []);
  }

  private applyCx(c: number, t: number): void {
    const d = this.data;
    const N = this.size;
    const cm = 1 << c, tm = 1 << t;
    for (let i = 0; i < N; i++) {
      if ((i & cm) !== 0 && (i & tm) === 0) {
        const a = 2 * i, b = 2 * (i | tm);
        const xr = d[a], xi = d[a + 1];
        d[a] = d[b]; d[a + 1] = d[b + 1];
        d[b] = xr; d[b + 1] = xi;
      }
    }
  }

  amplitude(index: number): { re: number; im: number } {
    return { re: this.data[2 * index], im: this.data[2 * index + 1] };
  }

  /** Copies of the amplitudes as separate real and imaginary arrays (index = sum_q b_q 2^q). */
  amplitudes(): { re: Float64Array; im: Float64Array } {
    const N = this.size;
    const re = new Float64Array(N), im = new Float64Array(N);
    const d = this.data;
    for (let i = 0; i < N; i++) {
      re[i] = d[2 * i];
      im[i] = d[2 * i + 1];
    }
    return { re, im };
  }

  norm2(): number {
    const d = this.data;
    let s = 0;
    for (let i = 0; i < d.length; i++) s += d[i] * d[i];
    return s;
  }

  /** <psi| P |psi> for one Pauli string (identity on unlisted qubits). */
  pauliExpectation(factors: readonly PauliFactor[]): number {
    const n = this.nQubits;
    let xmask = 0, zmask = 0, nY = 0;
    const seen = new Set<number>();
    for (const f of factors) {
      if (!Number.isInteger(f.qubit) || f.qubit < 0 || f.qubit >= n) throw new Error(`statevector: Pauli factor on qubit ${f.qubit} outside 0..${n - 1}`);
      if (seen.has(f.qubit)) throw new Error(`statevector: two Pauli factors on qubit ${f.qubit}`);
      seen.add(f.qubit);
      const b = 1 << f.qubit;
      if (f.op === 'X') xmask |= b;
      else if (f.op === 'Z') zmask |= b;
      else if (f.op === 'Y') { xmask |= b; zmask |= b; nY++; }
      else throw new Error(`statevector: unknown Pauli ${String(f.op)}`);
    }
    // P|b> = i^nY (-1)^{pop(b & z)} |b ^ x>, so <P> = Re[i^nY sum_b conj(psi_{b^x}) psi_b (-1)^{pop(b&z)}]
    const d = this.data;
    const W = Math.min(n, 11);
    const L = 1 << W;
    const lmask = L - 1;
    const sgn = new Float64Array(L);
    for (let l = 0; l < L; l++) sgn[l] = parity32(l & zmask & lmask) ? -1 : 1;
    const H = 2 ** (n - W);
    const xl = xmask & lmask;
    let sr = 0, si = 0;
    for (let h = 0; h < H; h++) {
      const hIndex = h * L;
      const hs = parity32(hIndex & zmask) ? -1 : 1;
      let ar = 0, ai = 0;
      if (xmask === 0) {
        // two independent accumulators (the add latency, not memory, bounds one)
        let o = 2 * hIndex;
        let a0 = 0, a1 = 0;
        let l = 0;
        for (; l + 1 < L; l += 2, o += 4) {
          const r0 = d[o], i0 = d[o + 1], r1 = d[o + 2], i1 = d[o + 3];
          a0 += sgn[l] * (r0 * r0 + i0 * i0);
          a1 += sgn[l + 1] * (r1 * r1 + i1 * i1);
        }
        for (; l < L; l++, o += 2) a0 += sgn[l] * (d[o] * d[o] + d[o + 1] * d[o + 1]);
        ar = a0 + a1;
      } else {
        const pIndex = (hIndex ^ xmask) & ~lmask;
        for (let l = 0; l < L; l++) {
          const o = 2 * (hIndex + l), p = 2 * (pIndex + (l ^ xl));
          const s = sgn[l];
          const br = d[o], bi = d[o + 1], cr = d[p], ci = d[p + 1];
          // conj(c) * b
          ar += s * (cr * br + ci * bi);
          ai += s * (cr * bi - ci * br);
        }
      }
      sr += hs * ar;
      si += hs * ai;
    }
    // multiply by i^nY and take the real part
    switch (nY & 3) {
      case 0: return sr;
      case 1: return -si;
      case 2: return -sr;
      default: return si;
    }
  }

  /** Per-term values <P_k> (without coefficients), computed from the amplitudes. */
  termExpectations(obs: ObservableSpec): number[] {
    return obs.terms.map((t) => this.pauliExpectation(t.factors));
  }

  /** <psi| O |psi> = sum_k coef_k <P_k>. */
  expectation(obs: ObservableSpec): number {
    let v = 0;
    for (const t of obs.terms) v += t.coef * this.pauliExpectation(t.factors);
    return v;
  }
}

/** Convenience: simulate and return the expectation value and per-term values. */
export function statevectorExpectation(
  circuit: CompiledCircuit,
  obs: ObservableSpec,
  opts: StatevectorOptions = {},
): { value: number; termValues: number[] } {
  const sv = Statevector.run(circuit, opts);
  const termValues = sv.termExpectations(obs);
  let value = 0;
  obs.terms.forEach((t, k) => (value += t.coef * termValues[k]));
  return { value, termValues };
}
