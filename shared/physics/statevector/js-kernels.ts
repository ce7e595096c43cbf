/** The plain typed-array kernels (the fallback engine, engine: 'js') and the fused pass they share. */
import { termAngle, type DiagTerm, type Mat2 } from './matrices';
import { fillPhaseTables, planDiagonal } from './diagonal-plan';

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
export function q0Gen(d: Float64Array, start: number, end: number, m: Mat2, pf: boolean): void {
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

export function isRealMat(m: Mat2): boolean {
  return m[1] === 0 && m[3] === 0 && m[5] === 0 && m[7] === 0;
}

export function isRxForm(m: Mat2): boolean {
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

export function insertZeroBit(u: number, pos: number): number {
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

  // diagonal plan (diagonal-plan.ts, shared with the wasm kernels)
  const plan = planDiagonal(terms, W);
  const { highTerms, extra, cross, hasTableTerms: hasDiag } = plan;
  const C = cross.length;
  const tables: Float64Array[] = [];
  if (hasDiag) fillPhaseTables(plan, L, () => { const t = new Float64Array(2 * L); tables.push(t); return t; });

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
