/**
 * Tensor kernels for networks whose every index has dimension 2 (qubit wires).
 *
 * A tensor is a list of legs (index ids) and complex128 data as an interleaved Float64Array
 * [re0, im0, re1, im1, ...], row-major with legs[0] the most significant bit of the offset.
 *
 * A pairwise contraction is a permute plus a batched matrix product (the usual reduction of
 * tensordot / einsum to GEMM): A is laid out as [batch][left][sum], B as [batch][right][sum], and
 * C[batch][left][right] = sum A B. The permute also splits real and imaginary parts into separate
 * arrays, so the GEMM inner loop runs on two plain real arrays (no strided complex loads); the
 * GEMM writes the interleaved result directly. k <= 4 (one or two summed legs) has its own loops.
 *
 * Two GEMM kernels with one contract: gemmSplit here (plain JS, the fallback) and the hand-assembled
 * WebAssembly SIMD kernel in wasm-gemm.ts (the permute writes its operands straight into the
 * module's memory). contractPair picks per product with `useWasmGemm` (the rule measured by
 * bench/tensor-network.bench.ts) and falls back to JS when the module's memory cannot hold the
 * operands or the host has no WebAssembly SIMD.
 *
 * No framework or node: imports.
 */
import { gemmArena, gemmBatchedInArena } from './wasm-gemm';

export interface Tensor {
  legs: number[];
  data: Float64Array;
}

/** Lookup tables for a permutation of 2-dim legs: srcOffset(o) = lo[o & loMask] + hi[o >> loBits]. */
function offsetTables(srcLegs: readonly number[], dstLegs: readonly number[], fixedOffset = 0): { lo: Int32Array; hi: Int32Array; loBits: number } {
  const rs = srcLegs.length;
  const rd = dstLegs.length;
  const strides = new Int32Array(rd);
  for (let t = 0; t < rd; t++) {
    const p = srcLegs.indexOf(dstLegs[t]);
    if (p < 0) throw new Error(`permute: leg ${dstLegs[t]} not in the source tensor`);
    strides[t] = 1 << (rs - 1 - p);
  }
  const loBits = Math.min(rd, Math.max(0, Math.ceil(rd / 2)));
  const hiBits = rd - loBits;
  const lo = new Int32Array(1 << loBits);
  const hi = new Int32Array(1 << hiBits);
  // target bit b (from the least significant) is target position rd - 1 - b
  for (let o = 1; o < lo.length; o++) {
    const b = 31 - Math.clz32(o & -o);
    lo[o] = lo[o & (o - 1)] + strides[rd - 1 - b];
  }
  hi[0] = fixedOffset;
  for (let o = 1; o < hi.length; o++) {
    const b = 31 - Math.clz32(o & -o);
    hi[o] = hi[o & (o - 1)] + strides[rd - 1 - (b + loBits)];
  }
  return { lo, hi, loBits };
}

/** Tensors of at least this rank are permuted in tiles (permuteTiled); smaller ones in one sweep. */
export const PERMUTE_TILED_MIN_RANK = 12;

/** Permute interleaved `src` (legs srcLegs) into split re/im arrays with legs dstLegs. */
export function permuteSplit(src: Float64Array, srcLegs: readonly number[], dstLegs: readonly number[], re: Float64Array, im: Float64Array): void {
  if (dstLegs.length >= PERMUTE_TILED_MIN_RANK) {
    permuteTiled(src, srcLegs, dstLegs, re, im);
    return;
  }
  const { lo, hi } = offsetTables(srcLegs, dstLegs);
  const nl = lo.length;
  let o = 0;
  for (let h = 0; h < hi.length; h++) {
    const base = hi[h];
    for (let l = 0; l < nl; l++) {
      const s = (base + lo[l]) << 1;
      re[o] = src[s];
      im[o] = src[s + 1];
      o++;
    }
  }
}

/** Source and destination offsets over every combination of the given destination bits. */
function bitTable(bits: readonly number[], srcStride: Int32Array): { s: Int32Array; d: Int32Array } {
  const s = new Int32Array(1 << bits.length), d = new Int32Array(1 << bits.length);
  for (let o = 1; o < s.length; o++) {
    const j = 31 - Math.clz32(o & -o);
    s[o] = s[o & (o - 1)] + srcStride[bits[j]];
    d[o] = d[o & (o - 1)] + (1 << bits[j]);
  }
  return { s, d };
}

const TILE_INNER_BITS = 4, TILE_BITS = 4;

/**
 * permuteSplit for large tensors, cache-blocked: the innermost loop writes runs of 2^4 contiguous
 * destination elements; the next loop walks the destination bits that are the source's lowest
 * (up to 4 of them), so one tile reads and writes a few KB that stay in L1 instead of striding
 * through the whole source for every run. The bench's heavy-hex width-23 network: a reversed
 * rank-23 permute 3.9 s -> 0.5 s, a random one 0.45 -> 0.31 s.
 */
function permuteTiled(src: Float64Array, srcLegs: readonly number[], dstLegs: readonly number[], re: Float64Array, im: Float64Array): void {
  const rs = srcLegs.length, rd = dstLegs.length;
  // by destination bit b (from the least significant): the source bit and stride
  const srcBit = new Int32Array(rd), srcStride = new Int32Array(rd);
  for (let b = 0; b < rd; b++) {
    const p = srcLegs.indexOf(dstLegs[rd - 1 - b]);
    if (p < 0) throw new Error(`permute: leg ${dstLegs[rd - 1 - b]} not in the source tensor`);
    srcBit[b] = rs - 1 - p;
    srcStride[b] = 1 << srcBit[b];
  }
  const a = Math.min(rd, TILE_INNER_BITS);
  const inner = bitTable(Array.from({ length: a }, (_, b) => b), srcStride);
  const rest = Array.from({ length: rd - a }, (_, i) => a + i);
  const tileBits = [...rest].sort((x, y) => srcBit[x] - srcBit[y]).slice(0, TILE_BITS).filter((b) => srcBit[b] < TILE_INNER_BITS + TILE_BITS + 2);
  const outerBits = rest.filter((b) => !tileBits.includes(b));
  const tile = bitTable(tileBits, srcStride);
  const half = outerBits.length >> 1;
  const oLo = bitTable(outerBits.slice(0, half), srcStride), oHi = bitTable(outerBits.slice(half), srcStride);
  const nl = inner.s.length, nt = tile.s.length, is = inner.s;
  for (let h = 0; h < oHi.s.length; h++) {
    for (let m = 0; m < oLo.s.length; m++) {
      const s0 = oHi.s[h] + oLo.s[m], d0 = oHi.d[h] + oLo.d[m];
      for (let t = 0; t < nt; t++) {
        const s1 = s0 + tile.s[t];
        let d = d0 + tile.d[t];
        for (let l = 0; l < nl; l++, d++) {
          const s = (s1 + is[l]) << 1;
          re[d] = src[s];
          im[d] = src[s + 1];
        }
      }
    }
  }
}

/**
 * The sub-tensor of `t` with the legs in `fixed` set to the given bits (0/1); the remaining legs
 * keep their order. Used for slicing.
 */
export function sliceTensor(t: Tensor, fixed: ReadonlyMap<number, number>): Tensor {
  let offset = 0;
  const rest: number[] = [];
  const r = t.legs.length;
  t.legs.forEach((leg, p) => {
    const b = fixed.get(leg);
    if (b === undefined) rest.push(leg);
    else if (b) offset += 1 << (r - 1 - p);
  });
  if (rest.length === r) return t;
  const { lo, hi } = offsetTables(t.legs, rest, offset);
  const out = new Float64Array(2 << rest.length);
  let o = 0;
  for (let h = 0; h < hi.length; h++) {
    const base = hi[h];
    for (let l = 0; l < lo.length; l++) {
      const s = (base + lo[l]) << 1;
      out[o++] = t.data[s];
      out[o++] = t.data[s + 1];
    }
  }
  return { legs: rest, data: out };
}

/**
 * C[m x n] = A[m x k] B^T (B stored as n x k) on split real/imaginary arrays, one batch at the
 * given offsets, into interleaved C (written directly: no split copy of the result). Both operands are read along contiguous rows (the permute lays B out transposed
 * for free). Register-blocked 2 x 2 (four complex accumulators), blocked over k (256) and n (32)
 * so the rows of B in use stay in cache while the rows of A pass over them.
 */
export function gemmSplit(m: number, k: number, n: number, ar: Float64Array, ai: Float64Array, aOff: number, br: Float64Array, bi: Float64Array, bOff: number, c: Float64Array, cOff: number): void {
  // c is interleaved complex; cOff counts complex elements
  if (k === 1 || k === 2 || k === 4) {
    smallK(m, k, n, ar, ai, aOff, br, bi, bOff, c, cOff);
    return;
  }
  for (let i = 2 * cOff, e = 2 * (cOff + m * n); i < e; i++) c[i] = 0;
  const KB = 256, JB = 32;
  for (let p0 = 0; p0 < k; p0 += KB) {
    const p1 = Math.min(k, p0 + KB);
    for (let j0 = 0; j0 < n; j0 += JB) {
      const j1 = Math.min(n, j0 + JB);
      let i = 0;
      for (; i + 1 < m; i += 2) {
        const a0 = aOff + i * k, a1 = a0 + k;
        let j = j0;
        for (; j + 1 < j1; j += 2) {
          const b0 = bOff + j * k, b1 = b0 + k;
          let r00 = 0, i00 = 0, r01 = 0, i01 = 0, r10 = 0, i10 = 0, r11 = 0, i11 = 0;
          for (let p = p0; p < p1; p++) {
            const x0r = ar[a0 + p], x0i = ai[a0 + p], x1r = ar[a1 + p], x1i = ai[a1 + p];
            const y0r = br[b0 + p], y0i = bi[b0 + p], y1r = br[b1 + p], y1i = bi[b1 + p];
            r00 += x0r * y0r - x0i * y0i; i00 += x0r * y0i + x0i * y0r;
            r01 += x0r * y1r - x0i * y1i; i01 += x0r * y1i + x0i * y1r;
            r10 += x1r * y0r - x1i * y0i; i10 += x1r * y0i + x1i * y0r;
            r11 += x1r * y1r - x1i * y1i; i11 += x1r * y1i + x1i * y1r;
          }
          const c0 = 2 * (cOff + i * n + j), c1 = c0 + 2 * n;
          c[c0] += r00; c[c0 + 1] += i00; c[c0 + 2] += r01; c[c0 + 3] += i01;
          c[c1] += r10; c[c1 + 1] += i10; c[c1 + 2] += r11; c[c1 + 3] += i11;
        }
        for (; j < j1; j++) {
          const b0 = bOff + j * k;
          let r00 = 0, i00 = 0, r10 = 0, i10 = 0;
          for (let p = p0; p < p1; p++) {
            const x0r = ar[a0 + p], x0i = ai[a0 + p], x1r = ar[a1 + p], x1i = ai[a1 + p];
            const y0r = br[b0 + p], y0i = bi[b0 + p];
            r00 += x0r * y0r - x0i * y0i; i00 += x0r * y0i + x0i * y0r;
            r10 += x1r * y0r - x1i * y0i; i10 += x1r * y0i + x1i * y0r;
          }
          const c0 = 2 * (cOff + i * n + j), c1 = c0 + 2 * n;
          c[c0] += r00; c[c0 + 1] += i00; c[c1] += r10; c[c1 + 1] += i10;
        }
      }
      for (; i < m; i++) {
        const a0 = aOff + i * k;
        for (let j = j0; j < j1; j++) {
          const b0 = bOff + j * k;
          let r00 = 0, i00 = 0;
          for (let p = p0; p < p1; p++) {
            const x0r = ar[a0 + p], x0i = ai[a0 + p], y0r = br[b0 + p], y0i = bi[b0 + p];
            r00 += x0r * y0r - x0i * y0i; i00 += x0r * y0i + x0i * y0r;
          }
          const c0 = 2 * (cOff + i * n + j);
          c[c0] += r00; c[c0 + 1] += i00;
        }
      }
    }
  }
}

/** k = 1, 2 or 4 (only those: k = 3 takes the general loop): the row of A sits in locals, one pass over the rows of B per row of A. */
function smallK(m: number, k: number, n: number, ar: Float64Array, ai: Float64Array, aOff: number, br: Float64Array, bi: Float64Array, bOff: number, c: Float64Array, cOff: number): void {
  let o = 2 * cOff;
  if (k === 1) {
    for (let i = 0; i < m; i++) {
      const xr = ar[aOff + i], xi = ai[aOff + i];
      for (let j = 0; j < n; j++) {
        const yr = br[bOff + j], yi = bi[bOff + j];
        c[o++] = xr * yr - xi * yi;
        c[o++] = xr * yi + xi * yr;
      }
    }
  } else if (k === 2) {
    for (let i = 0; i < m; i++) {
      const a = aOff + 2 * i;
      const x0r = ar[a], x0i = ai[a], x1r = ar[a + 1], x1i = ai[a + 1];
      for (let j = 0, b = bOff; j < n; j++, b += 2) {
        const y0r = br[b], y0i = bi[b], y1r = br[b + 1], y1i = bi[b + 1];
        c[o++] = x0r * y0r - x0i * y0i + x1r * y1r - x1i * y1i;
        c[o++] = x0r * y0i + x0i * y0r + x1r * y1i + x1i * y1r;
      }
    }
  } else {
    for (let i = 0; i < m; i++) {
      const a = aOff + 4 * i;
      const x0r = ar[a], x0i = ai[a], x1r = ar[a + 1], x1i = ai[a + 1];
      const x2r = ar[a + 2], x2i = ai[a + 2], x3r = ar[a + 3], x3i = ai[a + 3];
      for (let j = 0, b = bOff; j < n; j++, b += 4) {
        const y0r = br[b], y0i = bi[b], y1r = br[b + 1], y1i = bi[b + 1];
        const y2r = br[b + 2], y2i = bi[b + 2], y3r = br[b + 3], y3i = bi[b + 3];
        c[o++] = x0r * y0r - x0i * y0i + x1r * y1r - x1i * y1i + x2r * y2r - x2i * y2i + x3r * y3r - x3i * y3i;
        c[o++] = x0r * y0i + x0i * y0r + x1r * y1i + x1i * y1r + x2r * y2i + x2i * y2r + x3r * y3i + x3i * y3r;
      }
    }
  }
}

/** How the legs of a pairwise contraction split (all lists in output order). */
export interface PairLayout {
  batch: number[];
  left: number[];
  sum: number[];
  right: number[];
}

/** out = [batch, left, right]; `closes(leg)` says whether a shared leg is summed here. */
export function pairLayout(a: readonly number[], b: readonly number[], closes: (leg: number) => boolean): PairLayout {
  const inB = new Set(b);
  const inA = new Set(a);
  const batch: number[] = [], left: number[] = [], sum: number[] = [], right: number[] = [];
  for (const l of a) {
    if (inB.has(l)) (closes(l) ? sum : batch).push(l);
    else left.push(l);
  }
  for (const l of b) if (!inA.has(l)) right.push(l);
  return { batch, left, sum, right };
}

/** Scratch buffers reused across contractions (grown on demand). */
class Scratch {
  private bufs: Float64Array[] = [];
  get(i: number, size: number): Float64Array {
    let b = this.bufs[i];
    if (!b || b.length < size) {
      b = new Float64Array(Math.max(size, 16));
      this.bufs[i] = b;
    }
    return b;
  }
}
const scratch = new Scratch();

/** Which GEMM contractPair uses: 'auto' (the measured rule, useWasmGemm) or one kernel throughout. */
export type GemmKernel = 'auto' | 'js' | 'wasm';
let gemmKernel: GemmKernel = 'auto';

/** Set the GEMM kernel of contractPair for this thread (the bench and the kernel tests compare them). */
export function setGemmKernel(kernel: GemmKernel): void {
  gemmKernel = kernel;
}

/**
 * Smallest m k n of one product for which the wasm kernel pays. Measured by the bench's size sweep
 * (one whole pairwise step, permute included, JS vs wasm, on the 2-core machine under load): below
 * 2^7 the wasm path's fixed cost (the call, the copy of the result out of its memory) makes it
 * 0.7-0.9x of JS; at 2^7-2^9 about even to 1.3x; from 2^11 1.2-1.5x at k = 2 and 3-10x at k >= 8.
 */
export const WASM_GEMM_MIN_MKN = 128;

/**
 * The rule of 'auto': the wasm kernel for products of at least WASM_GEMM_MIN_MKN multiply-adds
 * with at least two summed values (k >= 2); outer products (k = 1) are bound by writing C, which
 * the wasm path writes twice (into its memory, then out), so they stay in JS.
 */
export function useWasmGemm(m: number, k: number, n: number): boolean {
  return k >= 2 && m * k * n >= WASM_GEMM_MIN_MKN;
}

/** Contract A and B with the given layout; the result has legs [...batch, ...left, ...right]. */
export function contractPair(A: Tensor, B: Tensor, L: PairLayout): Tensor {
  const nb = 1 << L.batch.length;
  const m = 1 << L.left.length;
  const k = 1 << L.sum.length;
  const n = 1 << L.right.length;
  const aSize = nb * m * k;
  const bSize = nb * k * n;
  const cSize = nb * m * n;
  if (gemmKernel === 'wasm' || (gemmKernel === 'auto' && useWasmGemm(m, k, n))) {
    const arena = gemmArena(aSize, bSize, cSize);
    if (arena) {
      permuteSplit(A.data, A.legs, [...L.batch, ...L.left, ...L.sum], arena.ar, arena.ai);
      permuteSplit(B.data, B.legs, [...L.batch, ...L.right, ...L.sum], arena.br, arena.bi);
      gemmBatchedInArena(arena, nb, m, k, n);
      return { legs: [...L.batch, ...L.left, ...L.right], data: arena.c.slice() };
    }
  }
  const ar = scratch.get(0, aSize), ai = scratch.get(1, aSize);
  const br = scratch.get(2, bSize), bi = scratch.get(3, bSize);
  permuteSplit(A.data, A.legs, [...L.batch, ...L.left, ...L.sum], ar, ai);
  permuteSplit(B.data, B.legs, [...L.batch, ...L.right, ...L.sum], br, bi);
  const out = new Float64Array(2 * cSize);
  for (let t = 0; t < nb; t++) gemmSplit(m, k, n, ar, ai, t * m * k, br, bi, t * k * n, out, t * m * n);
  return { legs: [...L.batch, ...L.left, ...L.right], data: out };
}

/** Real floating-point operations of a pairwise contraction: 8 per complex multiply-add. */
export function pairFlops(L: PairLayout): number {
  return 8 * 2 ** (L.batch.length + L.left.length + L.sum.length + L.right.length);
}
