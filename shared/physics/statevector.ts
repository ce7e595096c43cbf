/**
 * Full statevector simulator for a CompiledCircuit (circuit.ts conventions), on one interleaved
 * Float64Array (re, im, re, im, ...): complex128, 16 bytes per amplitude. Qubit q is bit q of the
 * basis-state index (little-endian: index = sum_q b_q 2^q). The state starts in |0...0>.
 *
 * Fusion (the reason this is fast enough for 24-qubit kicked-Ising steps):
 *  - consecutive single-qubit gates on one qubit are multiplied into one 2x2 matrix;
 *  - a pending set of single-qubit matrices on distinct qubits is applied in few passes: all the
 *    low qubits (q < BLOCK_BITS) in one pass over cache-sized blocks, the high qubits in groups of
 *    up to HIGH_GROUP per pass (2^HIGH_GROUP runs of RUN_LEN contiguous amplitudes, all in cache);
 *  - all pending diagonal gates (rzz, cz, z, s, sdg, rz, in any number, on any qubits) are applied
 *    in one pass: the phase of basis state (h, l) (high bits, low bits) is
 *    phaseHigh[h] * lowTable[c(h)][l], where c(h) gathers the few high bits that diagonal gates
 *    crossing the low/high boundary touch;
 *  - cx(c, t) = H_t CZ(c, t) H_t, so it joins the same two fused kinds.
 * A gate list is planned greedily, so a flat list gets the same fusion as a layered one; Layer
 * hints of kind 'rzz' are used as a fast path (the whole layer goes to the diagonal set at once).
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

/** Apply m to the amplitude pairs (off0 + k, off1 + k), k = 0..len-1. */
function pairKernel(d: Float64Array, off0: number, off1: number, len: number, m: Mat2): void {
  const m0r = m[0], m0i = m[1], m1r = m[2], m1i = m[3], m2r = m[4], m2i = m[5], m3r = m[6], m3i = m[7];
  let a = 2 * off0;
  let b = 2 * off1;
  const end = a + 2 * len;
  for (; a < end; a += 2, b += 2) {
    const xr = d[a], xi = d[a + 1], yr = d[b], yi = d[b + 1];
    d[a] = m0r * xr - m0i * xi + m1r * yr - m1i * yi;
    d[a + 1] = m0r * xi + m0i * xr + m1r * yi + m1i * yr;
    d[b] = m2r * xr - m2i * xi + m3r * yr - m3i * yi;
    d[b + 1] = m2r * xi + m2i * xr + m3r * yi + m3i * yr;
  }
}

/** Same as pairKernel for a matrix of the RX form [[c, -i s], [-i s, c]] (c, s real). */
function pairKernelRx(d: Float64Array, off0: number, off1: number, len: number, c: number, s: number): void {
  let a = 2 * off0;
  let b = 2 * off1;
  const end = a + 2 * len;
  for (; a < end; a += 2, b += 2) {
    const xr = d[a], xi = d[a + 1], yr = d[b], yi = d[b + 1];
    d[a] = c * xr + s * yi;
    d[a + 1] = c * xi - s * yr;
    d[b] = c * yr + s * xi;
    d[b + 1] = c * yi - s * xr;
  }
}

/** Gate on qubit 0 over amplitudes [start, end): adjacent pairs. */
function q0Kernel(d: Float64Array, start: number, end: number, m: Mat2): void {
  const m0r = m[0], m0i = m[1], m1r = m[2], m1i = m[3], m2r = m[4], m2i = m[5], m3r = m[6], m3i = m[7];
  const e = 2 * end;
  for (let a = 2 * start; a < e; a += 4) {
    const xr = d[a], xi = d[a + 1], yr = d[a + 2], yi = d[a + 3];
    d[a] = m0r * xr - m0i * xi + m1r * yr - m1i * yi;
    d[a + 1] = m0r * xi + m0i * xr + m1r * yi + m1i * yr;
    d[a + 2] = m2r * xr - m2i * xi + m3r * yr - m3i * yi;
    d[a + 3] = m2r * xi + m2i * xr + m3r * yi + m3i * yr;
  }
}

/** Gate on qubit 1 over amplitudes [start, end) (start a multiple of 4). */
function q1Kernel(d: Float64Array, start: number, end: number, m: Mat2): void {
  const m0r = m[0], m0i = m[1], m1r = m[2], m1i = m[3], m2r = m[4], m2i = m[5], m3r = m[6], m3i = m[7];
  const e = 2 * end;
  for (let base = 2 * start; base < e; base += 8) {
    for (let a = base; a < base + 4; a += 2) {
      const b = a + 4;
      const xr = d[a], xi = d[a + 1], yr = d[b], yi = d[b + 1];
      d[a] = m0r * xr - m0i * xi + m1r * yr - m1i * yi;
      d[a + 1] = m0r * xi + m0i * xr + m1r * yi + m1i * yr;
      d[b] = m2r * xr - m2i * xi + m3r * yr - m3i * yi;
      d[b + 1] = m2r * xi + m2i * xr + m3r * yi + m3i * yr;
    }
  }
}

function isRxForm(m: Mat2): boolean {
  return m[1] === 0 && m[7] === 0 && m[0] === m[6] && m[2] === 0 && m[4] === 0 && m[3] === m[5];
}

/** Apply m on qubit q to amplitudes [start, end) (a whole number of 2^(q+1) blocks). */
function applyOnRange(d: Float64Array, q: number, start: number, end: number, m: Mat2): void {
  if (q === 0) { q0Kernel(d, start, end, m); return; }
  if (q === 1) { q1Kernel(d, start, end, m); return; }
  const s = 1 << q;
  if (isRxForm(m)) {
    const c = m[0], sn = -m[3];
    for (let base = start; base < end; base += 2 * s) pairKernelRx(d, base, base + s, s, c, sn);
  } else {
    for (let base = start; base < end; base += 2 * s) pairKernel(d, base, base + s, s, m);
  }
}

/** Tuning: low qubits (q < BLOCK_BITS) are applied together per block of 2^BLOCK_BITS amplitudes. */
export const BLOCK_BITS = 12;
/** High qubits are applied HIGH_GROUP at a time on 2^HIGH_GROUP runs of 2^RUN_BITS amplitudes. */
export const HIGH_GROUP = 5;
export const RUN_BITS = 10;

function insertZeroBit(u: number, pos: number): number {
  const low = u & ((1 << pos) - 1);
  return ((u >>> pos) << (pos + 1)) | low;
}

/**
 * Apply a set of single-qubit matrices on distinct qubits (they commute). Low qubits in one blocked
 * pass; high qubits in groups.
 */
export function applySingles(d: Float64Array, n: number, qubits: number[], mats: Mat2[]): void {
  const N = 2 ** n;
  const blockBits = Math.min(n, BLOCK_BITS);
  const low: number[] = [];
  const high: number[] = [];
  for (let i = 0; i < qubits.length; i++) (qubits[i] < blockBits ? low : high).push(i);
  if (low.length > 0) {
    const B = 1 << blockBits;
    for (let start = 0; start < N; start += B) {
      for (const i of low) applyOnRange(d, qubits[i], start, start + B, mats[i]);
    }
  }
  if (high.length === 0) return;
  high.sort((a, b) => qubits[a] - qubits[b]);
  const runBits = Math.min(RUN_BITS, blockBits);
  const runLen = 1 << runBits;
  for (let g0 = 0; g0 < high.length; g0 += HIGH_GROUP) {
    const grp = high.slice(g0, g0 + HIGH_GROUP);
    const G = grp.length;
    const pos = grp.map((i) => qubits[i]); // ascending
    const gm = grp.map((i) => mats[i]);
    const rx = gm.map(isRxForm);
    // offsets of the 2^G runs relative to a base
    const offs = new Float64Array(1 << G);
    for (let s = 0; s < 1 << G; s++) {
      let o = 0;
      for (let j = 0; j < G; j++) if (s & (1 << j)) o += 2 ** pos[j];
      offs[s] = o;
    }
    const nBases = 2 ** (n - runBits - G);
    for (let u = 0; u < nBases; u++) {
      // expand u (in run units) by inserting zero bits at the group positions
      let v = u;
      for (let j = 0; j < G; j++) v = insertZeroBit(v, pos[j] - runBits);
      const base = v * runLen;
      for (let j = 0; j < G; j++) {
        const bit = 1 << j;
        const m = gm[j];
        const isRx = rx[j];
        const c = m[0], sn = -m[3];
        for (let s = 0; s < 1 << G; s++) {
          if (s & bit) continue;
          const o0 = base + offs[s], o1 = base + offs[s | bit];
          if (isRx) pairKernelRx(d, o0, o1, runLen, c, sn);
          else pairKernel(d, o0, o1, runLen, m);
        }
      }
    }
  }
}

/** Tuning: diagonal passes use a phase table over the low DIAG_LOW_BITS qubits. */
export const DIAG_LOW_BITS = 11;
/** At most this many distinct high qubits may be touched by gates crossing the low/high split. */
export const DIAG_MAX_CROSS = 6;

/** Multiply the state by exp(i * sum of the terms' angles), in one pass (or a few, see above). */
export function applyDiagonal(d: Float64Array, n: number, terms: DiagTerm[]): void {
  if (terms.length === 0) return;
  const W = Math.min(n, DIAG_LOW_BITS);
  const L = 1 << W;
  const lowTerms: DiagTerm[] = [];
  const highTerms: DiagTerm[] = [];
  const crossTerms: DiagTerm[] = [];
  const extra: DiagTerm[] = [];
  const cross: number[] = []; // distinct high qubits of crossing terms
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
  const C = cross.length;
  // low tables: for each configuration c of the crossing high qubits, exp(i angle) over low bits
  const tables: Float64Array[] = [];
  const lowAngle = new Float64Array(L);
  for (let l = 0; l < L; l++) {
    let a = 0;
    for (const t of lowTerms) a += termAngle(t, l);
    lowAngle[l] = a;
  }
  for (let c = 0; c < 1 << C; c++) {
    let hiBits = 0; // the high qubits set by c, as a full index
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
  const H = 2 ** (n - W);
  for (let h = 0; h < H; h++) {
    const hIndex = h * L; // < 2^30, safe for bitwise use
    let a = 0;
    for (const t of highTerms) a += termAngle(t, hIndex);
    let c = 0;
    for (let j = 0; j < C; j++) c |= ((hIndex >>> cross[j]) & 1) << j;
    const pr = Math.cos(a), pi = Math.sin(a);
    const tab = tables[c];
    let o = 2 * hIndex;
    for (let l = 0; l < 2 * L; l += 2, o += 2) {
      const tr = tab[l], ti = tab[l + 1];
      const fr = pr * tr - pi * ti, fi = pr * ti + pi * tr;
      const xr = d[o], xi = d[o + 1];
      d[o] = fr * xr - fi * xi;
      d[o + 1] = fr * xi + fi * xr;
    }
  }
  if (extra.length > 0) applyDiagonal(d, n, extra);
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

  constructor(nQubits: number, opts: { maxQubits?: number } = {}) {
    checkQubitLimit(nQubits, opts.maxQubits ?? DEFAULT_MAX_QUBITS);
    this.nQubits = nQubits;
    this.data = new Float64Array(2 * 2 ** nQubits);
    this.data[0] = 1;
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
      if (qs.length) applySingles(this.data, n, qs, ms);
      if (dg.length) applyDiagonal(this.data, n, dg);
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
      applyDiagonal(this.data, n, [diagTerm(g)]);
    } else if (g.name === 'cx') {
      this.applyCx(g.qubits[0], g.qubits[1]);
    } else {
      applySingles(this.data, n, [g.qubits[0]], [gateMatrix(g)]);
    }
  }

  /** Apply a 2x2 matrix on one qubit (one pass). */
  applyMatrix(q: number, m: Mat2): void {
    applySingles(this.data, this.nQubits, [q], [m]);
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
        let o = 2 * hIndex;
        for (let l = 0; l < L; l++, o += 2) {
          const re = d[o], im = d[o + 1];
          ar += sgn[l] * (re * re + im * im);
        }
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
