/**
 * The tensor-network GEMM kernels: the hand-assembled WebAssembly SIMD kernel (wasm-gemm.ts) and
 * the plain-JS kernel (gemmSplit) against a naive triple loop written here from the definition of
 * the matrix product (C[i][j] = sum_p A[i][p] B[j][p], B stored transposed), and a product worked
 * by hand. Sizes cover 1 x k and k x 1, odd and even, sizes that are not multiples of the register
 * block (2 x 1) or of the k / n cache blocks (256 / 32), and an odd k (the load64_zero tail).
 */
import { afterEach, describe, expect, it } from 'vitest';
import {
  contractPair, gemmSplit, pairLayout, permuteSplit, PERMUTE_TILED_MIN_RANK, setGemmKernel, useWasmGemm, WASM_GEMM_MIN_MKN, type Tensor,
} from '../../../shared/physics/tensor-network/kernels';
import { buildGemmModule, gemmArena, gemmSplitWasm, GEMM_JB, GEMM_KB, WASM_GEMM_MAX_BYTES, wasmGemmAvailable } from '../../../shared/physics/tensor-network/wasm-gemm';
import { rng } from '../../../shared/physics/tensor-network/path';

interface Operands { m: number; k: number; n: number; ar: Float64Array; ai: Float64Array; br: Float64Array; bi: Float64Array }

function randomOperands(m: number, k: number, n: number, seed: number): Operands {
  const r = rng(seed);
  const fill = (len: number) => Float64Array.from({ length: len }, () => 2 * r() - 1);
  return { m, k, n, ar: fill(m * k), ai: fill(m * k), br: fill(n * k), bi: fill(n * k) };
}

/** The definition, and the scale sum_p |A[i][p]| |B[j][p]| each entry's rounding error is bounded by. */
function naive({ m, k, n, ar, ai, br, bi }: Operands): { c: Float64Array; scale: Float64Array } {
  const c = new Float64Array(2 * m * n);
  const scale = new Float64Array(m * n);
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < n; j++) {
      let re = 0, im = 0, s = 0;
      for (let p = 0; p < k; p++) {
        const xr = ar[i * k + p], xi = ai[i * k + p], yr = br[j * k + p], yi = bi[j * k + p];
        re += xr * yr - xi * yi;
        im += xr * yi + xi * yr;
        s += Math.hypot(xr, xi) * Math.hypot(yr, yi);
      }
      c[2 * (i * n + j)] = re;
      c[2 * (i * n + j) + 1] = im;
      scale[i * n + j] = s;
    }
  }
  return { c, scale };
}

/** Largest |got - want| relative to the entry's scale. */
function worstRelative(got: Float64Array, want: Float64Array, scale: Float64Array): number {
  let worst = 0;
  for (let e = 0; e < scale.length; e++) {
    const d = Math.hypot(got[2 * e] - want[2 * e], got[2 * e + 1] - want[2 * e + 1]);
    worst = Math.max(worst, d / Math.max(scale[e], Number.MIN_VALUE));
  }
  return worst;
}

// m, k, n: row and column vectors, odd and even, past the register block and the k / n blocks
const SIZES: [number, number, number][] = [
  [1, 1, 1], [1, 7, 1], [1, 16, 9], [9, 16, 1], [1, 1, 13], [13, 1, 1], [2, 2, 2], [3, 5, 7], [4, 4, 4],
  [5, 2, 3], [6, 9, 10], [7, 3, 2], [17, 31, 19], [16, 64, 16], [8, GEMM_KB + 1, 5], [3, 2 * GEMM_KB + 3, 4],
  [11, 40, GEMM_JB + 3], [33, 257, 2 * GEMM_JB + 1], [64, 256, 64],
];

describe('tensor-network GEMM kernels', () => {
  afterEach(() => setGemmKernel('auto'));

  it('WebAssembly SIMD is available on this host (so the wasm kernel is really exercised below)', () => {
    expect(wasmGemmAvailable()).toBe(true);
  });

  it('a product worked by hand: [1+2i, 3-i] . [3+4i, 1-i] = (-5+10i) + (2-4i) = -3+6i', () => {
    const ar = new Float64Array([1, 3]), ai = new Float64Array([2, -1]);
    const br = new Float64Array([3, 1]), bi = new Float64Array([4, -1]);
    const js = new Float64Array(2), wasm = new Float64Array(2);
    gemmSplit(1, 2, 1, ar, ai, 0, br, bi, 0, js, 0);
    expect(gemmSplitWasm(1, 2, 1, ar, ai, 0, br, bi, 0, wasm, 0)).toBe(true);
    expect([...js]).toEqual([-3, 6]);
    expect([...wasm]).toEqual([-3, 6]);
  });

  it('wasm GEMM equals the JS GEMM and the naive triple loop to 1e-12 relative on random complex matrices', () => {
    SIZES.forEach(([m, k, n], s) => {
      const ops = randomOperands(m, k, n, 1000 + s);
      const { c: want, scale } = naive(ops);
      const js = new Float64Array(2 * m * n), wasm = new Float64Array(2 * m * n);
      gemmSplit(m, k, n, ops.ar, ops.ai, 0, ops.br, ops.bi, 0, js, 0);
      expect(gemmSplitWasm(m, k, n, ops.ar, ops.ai, 0, ops.br, ops.bi, 0, wasm, 0)).toBe(true);
      expect(worstRelative(js, want, scale), `js ${m}x${k}x${n}`).toBeLessThan(1e-12);
      expect(worstRelative(wasm, want, scale), `wasm ${m}x${k}x${n}`).toBeLessThan(1e-12);
      expect(worstRelative(wasm, js, scale), `wasm vs js ${m}x${k}x${n}`).toBeLessThan(1e-12);
    });
  });

  it('operand and result offsets are honoured (one batch of several), and nothing outside C is written', () => {
    const [m, k, n] = [5, 6, 3];
    const ops = randomOperands(3 * m, k, 3 * n, 77); // three batches stacked
    const aOff = m * k, bOff = n * k, cOff = m * n + 2;
    const js = new Float64Array(2 * (3 * m * n + 4)).fill(9), wasm = new Float64Array(js.length).fill(9);
    gemmSplit(m, k, n, ops.ar, ops.ai, aOff, ops.br, ops.bi, bOff, js, cOff);
    expect(gemmSplitWasm(m, k, n, ops.ar, ops.ai, aOff, ops.br, ops.bi, bOff, wasm, cOff)).toBe(true);
    const one: Operands = { m, k, n, ar: ops.ar.subarray(aOff, aOff + m * k), ai: ops.ai.subarray(aOff, aOff + m * k), br: ops.br.subarray(bOff, bOff + n * k), bi: ops.bi.subarray(bOff, bOff + n * k) };
    const { c: want, scale } = naive(one);
    expect(worstRelative(wasm.subarray(2 * cOff, 2 * (cOff + m * n)), want, scale)).toBeLessThan(1e-12);
    expect(worstRelative(js.subarray(2 * cOff, 2 * (cOff + m * n)), want, scale)).toBeLessThan(1e-12);
    for (const c of [js, wasm]) {
      expect([...c.subarray(0, 2 * cOff)].every((x) => x === 9)).toBe(true);
      expect([...c.subarray(2 * (cOff + m * n))].every((x) => x === 9)).toBe(true);
    }
  });

  it('every register block the generator builds (1x1, 2x2, 3x2, 1x4; two or four accumulators) equals the naive loop', () => {
    for (const [ri, rj, split] of [[1, 1, false], [2, 2, false], [3, 2, true], [1, 4, true]] as [number, number, boolean][]) {
      const mem = new WebAssembly.Memory({ initial: 4 });
      const g = (new WebAssembly.Instance(new WebAssembly.Module(buildGemmModule(ri, rj, split)), { env: { mem } }).exports as {
        gemm: (m: number, k: number, n: number, lda: number, ar: number, ai: number, br: number, bi: number, c: number, ldc: number, acc: number) => void;
      }).gemm;
      for (const [m, k, n] of [[1, 1, 1], [7, 5, 9], [6, 8, 4], [1, 9, 5], [5, 3, 1]]) {
        const ops = randomOperands(m, k, n, 31 * ri + rj + m);
        const f = new Float64Array(mem.buffer);
        const A = 0, AI = m * k, B = 2 * m * k, BI = B + n * k, C = 2 * (m * k + n * k);
        f.set(ops.ar, A); f.set(ops.ai, AI); f.set(ops.br, B); f.set(ops.bi, BI);
        g(m, k, n, 8 * k, 8 * A, 8 * AI, 8 * B, 8 * BI, 8 * C, 16 * n, 0);
        const { c: want, scale } = naive(ops);
        expect(worstRelative(f.slice(C, C + 2 * m * n), want, scale), `${ri}x${rj}${split ? ' split' : ''} on ${m}x${k}x${n}`).toBeLessThan(1e-12);
      }
    }
  });

  it('contractPair gives the same tensor with either kernel and with the size rule (batch, left, summed and right legs)', () => {
    const r = rng(5);
    const tensor = (legs: number[]): Tensor => ({ legs, data: Float64Array.from({ length: 2 << legs.length }, () => 2 * r() - 1) });
    // legs 0-1 batch, 2-4 left, 5-8 summed, 9-10 right; the orders are shuffled so the permute is not trivial
    const A = tensor([6, 2, 0, 5, 4, 8, 1, 3, 7]);
    const B = tensor([9, 7, 1, 5, 10, 0, 6, 8]);
    const batch = new Set([0, 1]);
    const L = pairLayout(A.legs, B.legs, (l) => !batch.has(l));
    expect(L).toEqual({ batch: [0, 1], left: [2, 4, 3], sum: [6, 5, 8, 7], right: [9, 10] });
    const out: Record<string, Tensor> = {};
    for (const k of ['js', 'wasm', 'auto'] as const) {
      setGemmKernel(k);
      out[k] = contractPair(A, B, L);
    }
    expect(out.js.legs).toEqual([0, 1, 2, 4, 3, 9, 10]);
    // the definition, entry by entry: sum over the summed legs of A(...) B(...)
    const bit = (legs: number[], vals: Map<number, number>) => legs.reduce((o, l) => 2 * o + (vals.get(l) ?? 0), 0);
    let worst = 0;
    for (let o = 0; o < 1 << 7; o++) {
      const vals = new Map(out.js.legs.map((l, p) => [l, (o >> (6 - p)) & 1]));
      let re = 0, im = 0, s = 0;
      for (let q = 0; q < 16; q++) {
        L.sum.forEach((l, p) => vals.set(l, (q >> (3 - p)) & 1));
        const a = bit(A.legs, vals), b = bit(B.legs, vals);
        const [xr, xi, yr, yi] = [A.data[2 * a], A.data[2 * a + 1], B.data[2 * b], B.data[2 * b + 1]];
        re += xr * yr - xi * yi;
        im += xr * yi + xi * yr;
        s += Math.hypot(xr, xi) * Math.hypot(yr, yi);
      }
      for (const k of ['js', 'wasm', 'auto']) worst = Math.max(worst, Math.hypot(out[k].data[2 * o] - re, out[k].data[2 * o + 1] - im) / s);
    }
    expect(worst).toBeLessThan(1e-12);
  });

  it('permuteSplit (one sweep below rank 12, tiled from rank 12) equals the definition: dst[j] = src[the same leg values]', () => {
    const r = rng(11);
    for (const rank of [1, 5, PERMUTE_TILED_MIN_RANK - 1, PERMUTE_TILED_MIN_RANK, 15]) {
      const legs = Array.from({ length: rank }, (_, i) => 100 + i);
      const src = Float64Array.from({ length: 2 << rank }, () => r());
      const orders = [[...legs].reverse(), [...legs].sort(() => r() - 0.5), [...legs.slice(rank >> 1), ...legs.slice(0, rank >> 1)]];
      for (const dst of orders) {
        const re = new Float64Array(1 << rank), im = new Float64Array(1 << rank);
        permuteSplit(src, legs, dst, re, im);
        let bad = 0;
        for (let j = 0; j < 1 << rank; j++) {
          // the value of each leg in destination index j (dst[0] the most significant bit), then the source index
          let s = 0;
          legs.forEach((leg, p) => { s += ((j >> (rank - 1 - dst.indexOf(leg))) & 1) << (rank - 1 - p); });
          if (re[j] !== src[2 * s] || im[j] !== src[2 * s + 1]) bad++;
        }
        expect(bad, `rank ${rank}, order ${dst.join(' ')}`).toBe(0);
      }
    }
  });

  it('the size rule: outer products and tiny products stay in JS; a memory the module cannot hold is refused (JS fallback)', () => {
    expect(useWasmGemm(64, 1, 64)).toBe(false);
    expect(useWasmGemm(1, 2, 1)).toBe(false);
    expect(useWasmGemm(2, 2, WASM_GEMM_MIN_MKN / 4 - 1)).toBe(false);
    expect(useWasmGemm(2, 2, WASM_GEMM_MIN_MKN / 4)).toBe(true);
    expect(useWasmGemm(128, 256, 64)).toBe(true);
    // 2^28 elements per split operand: 8 GiB of operands, over WASM_GEMM_MAX_BYTES; refused before any allocation
    expect(8 * 2 * (2 ** 28 + 2 ** 28)).toBeGreaterThan(WASM_GEMM_MAX_BYTES);
    expect(gemmArena(2 ** 28, 2 ** 28, 1)).toBeNull();
  });
});
