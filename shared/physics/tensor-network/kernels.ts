/**
 * Tensor kernels for networks whose every index has dimension 2 (qubit wires).
 *
 * A tensor is a list of legs (index ids) and complex128 data as an interleaved Float64Array
 * [re0, im0, re1, im1, ...], row-major with legs[0] the most significant bit of the offset.
 *
 * A pairwise contraction is a permute plus a batched matrix product (the usual reduction of
 * tensordot / einsum to GEMM): A is laid out as [batch][left][sum], B as [batch][sum][right], and
 * C[batch][left][right] = sum A B. The permute also splits real and imaginary parts into separate
 * arrays, so the GEMM inner loop runs on two plain real arrays (no strided complex loads); the
 * result is written back interleaved.
 *
 * No framework or node: imports.
 */

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

/** Permute interleaved `src` (legs srcLegs) into split re/im arrays with legs dstLegs. */
export function permuteSplit(src: Float64Array, srcLegs: readonly number[], dstLegs: readonly number[], re: Float64Array, im: Float64Array): void {
  const { lo, hi, loBits } = offsetTables(srcLegs, dstLegs);
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
  void loBits;
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
 * C[m x n] = A[m x k] B[k x n] on split real/imaginary arrays, with offsets (one batch).
 * Blocked over k and n so that a block of B stays in cache while every row of A passes over it;
 * the inner loop updates one row of C from one row of B (two rows of B per pass, so C is loaded
 * and stored half as often).
 */
export function gemmSplit(
  m: number, k: number, n: number,
  ar: Float64Array, ai: Float64Array, aOff: number,
  br: Float64Array, bi: Float64Array, bOff: number,
  cr: Float64Array, ci: Float64Array, cOff: number,
): void {
  for (let i = cOff, e = cOff + m * n; i < e; i++) { cr[i] = 0; ci[i] = 0; }
  if (n === 1) {
    // matrix-vector: dot products along k
    for (let i = 0; i < m; i++) {
      const a0 = aOff + i * k;
      let sr = 0, si = 0;
      for (let p = 0; p < k; p++) {
        const xr = ar[a0 + p], xi = ai[a0 + p], yr = br[bOff + p], yi = bi[bOff + p];
        sr += xr * yr - xi * yi;
        si += xr * yi + xi * yr;
      }
      cr[cOff + i] = sr;
      ci[cOff + i] = si;
    }
    return;
  }
  const KB = 64;
  const NB = 256;
  for (let j0 = 0; j0 < n; j0 += NB) {
    const j1 = Math.min(n, j0 + NB);
    for (let p0 = 0; p0 < k; p0 += KB) {
      const p1 = Math.min(k, p0 + KB);
      for (let i = 0; i < m; i++) {
        const aRow = aOff + i * k;
        const cRow = cOff + i * n;
        let p = p0;
        for (; p + 1 < p1; p += 2) {
          const xr = ar[aRow + p], xi = ai[aRow + p];
          const yr = ar[aRow + p + 1], yi = ai[aRow + p + 1];
          const b0 = bOff + p * n;
          const b1 = b0 + n;
          for (let j = j0; j < j1; j++) {
            const u0 = br[b0 + j], v0 = bi[b0 + j], u1 = br[b1 + j], v1 = bi[b1 + j];
            cr[cRow + j] += xr * u0 - xi * v0 + yr * u1 - yi * v1;
            ci[cRow + j] += xr * v0 + xi * u0 + yr * v1 + yi * u1;
          }
        }
        if (p < p1) {
          const xr = ar[aRow + p], xi = ai[aRow + p];
          const b0 = bOff + p * n;
          for (let j = j0; j < j1; j++) {
            const u0 = br[b0 + j], v0 = bi[b0 + j];
            cr[cRow + j] += xr * u0 - xi * v0;
            ci[cRow + j] += xr * v0 + xi * u0;
          }
        }
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

/** Contract A and B with the given layout; the result has legs [...batch, ...left, ...right]. */
export function contractPair(A: Tensor, B: Tensor, L: PairLayout): Tensor {
  const nb = 1 << L.batch.length;
  const m = 1 << L.left.length;
  const k = 1 << L.sum.length;
  const n = 1 << L.right.length;
  const aSize = nb * m * k;
  const bSize = nb * k * n;
  const cSize = nb * m * n;
  const ar = scratch.get(0, aSize), ai = scratch.get(1, aSize);
  const br = scratch.get(2, bSize), bi = scratch.get(3, bSize);
  const cr = scratch.get(4, cSize), ci = scratch.get(5, cSize);
  permuteSplit(A.data, A.legs, [...L.batch, ...L.left, ...L.sum], ar, ai);
  permuteSplit(B.data, B.legs, [...L.batch, ...L.sum, ...L.right], br, bi);
  for (let t = 0; t < nb; t++) gemmSplit(m, k, n, ar, ai, t * m * k, br, bi, t * k * n, cr, ci, t * m * n);
  const out = new Float64Array(2 * cSize);
  for (let i = 0; i < cSize; i++) {
    out[2 * i] = cr[i];
    out[2 * i + 1] = ci[i];
  }
  return { legs: [...L.batch, ...L.left, ...L.right], data: out };
}

/** Real floating-point operations of a pairwise contraction: 8 per complex multiply-add. */
export function pairFlops(L: PairLayout): number {
  return 8 * 2 ** (L.batch.length + L.left.length + L.sum.length + L.right.length);
}
