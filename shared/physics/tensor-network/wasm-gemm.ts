/**
 * The complex GEMM of the tensor-network kernels as a hand-assembled WebAssembly SIMD module (the
 * statevector's approach: docs/decisions/0002-hand-assembled-wasm.md; the opcodes come from
 * shared/physics/wasm/assembler.ts). Same contract as gemmSplit in kernels.ts: C[m x n] = A B^T
 * on split real/imaginary operands (A is m x k, B is n x k, both rows contiguous along k), C
 * interleaved complex.
 *
 * The kernel vectorises along k (f64x2: two consecutive k per v128) and keeps a register block of
 * RI x RJ outputs (real and imaginary accumulators per output); an odd k ends with one
 * v128.load64_zero step. At the end of a block the two lanes are summed and the real and imaginary
 * sums interleaved with two shuffles, so each output is one v128 store (or load-add-store when a
 * later block of k accumulates). Rows left over by the register block run as 1-row / 1-column
 * blocks, so every m, k, n >= 1 is handled (not only powers of two).
 *
 * The operands live in the module's linear memory (one memory per thread, grown on demand up to
 * WASM_GEMM_MAX_BYTES, never shrunk, like the JS kernels' scratch); `gemmArena` hands out views so
 * the permute writes straight into it. Where the memory cannot hold the operands (or the host has
 * no WebAssembly SIMD) callers use the JS kernel.
 *
 * No framework or node: imports.
 */
import {
  add, and, assembleModule, block, br, brIf, compileModule, geu, get, HI_HI, I32, i32c, ifThen, LO_LO, locals, loop,
  ltu, mul, set, shl, shuf, sub, V128, vadd, vconst, vload, vload64zero, vmul, vstore, vsub, type Kernel,
} from '../wasm/assembler';

/** Register block of the main loop (rows of A x rows of B). */
export const GEMM_RI = 2;
export const GEMM_RJ = 1;
/** Four accumulators per output (ar br, ai bi, ar bi, ai br) instead of two: shorter add chains. */
export const GEMM_SPLIT_ACC = true;
/** Largest linear memory the GEMM module grows to (i32 byte offsets; 2 GiB). */
export const WASM_GEMM_MAX_BYTES = 2 ** 31;

// gemm(m, k, n, lda, ar, ai, br, bi, c, ldc, acc): lda = row stride of A and B in bytes (8 per
// element), ldc = row stride of C in bytes (16 per element), acc != 0 adds to C instead of storing.
const P = { m: 0, k: 1, n: 2, lda: 3, ar: 4, ai: 5, br: 6, bi: 7, c: 8, ldc: 9, acc: 10 };

export function buildGemmModule(RI = GEMM_RI, RJ = GEMM_RJ, SPLIT = GEMM_SPLIT_ACC): Uint8Array<ArrayBuffer> {
  // i32 locals
  const I = 11, J = 12, PEND = 13, PP = 14, CROW = 15;
  const AR = (r: number) => 16 + r, AI = (r: number) => 16 + RI + r;
  const BR = (r: number) => 16 + 2 * RI + r, BI = (r: number) => 16 + 2 * RI + RJ + r;
  const nI32 = 5 + 2 * RI + 2 * RJ;
  // v128 locals: accumulators, then the loaded rows of B, one row of A, a temporary
  const V0 = 11 + nI32;
  const NA = SPLIT ? 4 : 2;
  const ACCR = (i: number, j: number) => V0 + NA * (i * RJ + j), ACCI = (i: number, j: number) => ACCR(i, j) + 1;
  // with SPLIT: ACCR collects ar br, ACCR2 ai bi, ACCI ar bi, ACCI2 ai br
  const ACCR2 = (i: number, j: number) => ACCR(i, j) + 2, ACCI2 = (i: number, j: number) => ACCR(i, j) + 3;
  const LB = V0 + NA * RI * RJ;
  const LBR = (j: number) => LB + j, LBI = (j: number) => LB + RJ + j;
  const LAR = LB + 2 * RJ, LAI = LAR + 1, T = LAI + 1;
  const nV = NA * RI * RJ + 2 * RJ + 3;

  // one step along k (two k with v128.load, the odd last one with load64_zero)
  const step = (ri: number, rj: number, ld: (off?: number) => number[]): number[] => {
    const b: number[] = [];
    for (let j = 0; j < rj; j++) b.push(...get(BR(j)), ...get(PP), ...add, ...ld(), ...set(LBR(j)), ...get(BI(j)), ...get(PP), ...add, ...ld(), ...set(LBI(j)));
    for (let i = 0; i < ri; i++) {
      b.push(...get(AR(i)), ...get(PP), ...add, ...ld(), ...set(LAR), ...get(AI(i)), ...get(PP), ...add, ...ld(), ...set(LAI));
      for (let j = 0; j < rj; j++) {
        // re += ar br - ai bi; im += ar bi + ai br
        if (SPLIT) {
          b.push(...get(ACCR(i, j)), ...get(LAR), ...get(LBR(j)), ...vmul, ...vadd, ...set(ACCR(i, j)));
          b.push(...get(ACCR2(i, j)), ...get(LAI), ...get(LBI(j)), ...vmul, ...vadd, ...set(ACCR2(i, j)));
          b.push(...get(ACCI(i, j)), ...get(LAR), ...get(LBI(j)), ...vmul, ...vadd, ...set(ACCI(i, j)));
          b.push(...get(ACCI2(i, j)), ...get(LAI), ...get(LBR(j)), ...vmul, ...vadd, ...set(ACCI2(i, j)));
          continue;
        }
        b.push(...get(ACCR(i, j)), ...get(LAR), ...get(LBR(j)), ...vmul, ...vadd, ...get(LAI), ...get(LBI(j)), ...vmul, ...vsub, ...set(ACCR(i, j)));
        b.push(...get(ACCI(i, j)), ...get(LAR), ...get(LBI(j)), ...vmul, ...vadd, ...get(LAI), ...get(LBR(j)), ...vmul, ...vadd, ...set(ACCI(i, j)));
      }
    }
    return b;
  };
  // an ri x rj block of C at rows I.., columns J..
  const blockCode = (ri: number, rj: number): number[] => {
    const b: number[] = [];
    for (let i = 0; i < ri; i++) for (let j = 0; j < rj; j++) for (let q = 0; q < NA; q++) b.push(...vconst(0, 0), ...set(ACCR(i, j) + q));
    b.push(...i32c(0), ...set(PP));
    b.push(...block(loop([
      ...get(PP), ...get(PEND), ...geu, ...brIf(1),
      ...step(ri, rj, vload),
      ...get(PP), ...i32c(16), ...add, ...set(PP), ...br(0),
    ])));
    b.push(...get(P.k), ...i32c(1), ...and, ...ifThen(step(ri, rj, vload64zero)));
    for (let i = 0; i < ri; i++) {
      for (let j = 0; j < rj; j++) {
        if (SPLIT) b.push(...get(ACCR(i, j)), ...get(ACCR2(i, j)), ...vsub, ...set(ACCR(i, j)), ...get(ACCI(i, j)), ...get(ACCI2(i, j)), ...vadd, ...set(ACCI(i, j)));
        // address of C[I + i][J + j] without the column offset j (a memarg offset)
        const addr = [...get(CROW), ...get(J), ...i32c(4), ...shl, ...add, ...(i ? [...get(P.ldc), ...i32c(i), ...mul, ...add] : [])];
        b.push(
          ...get(ACCR(i, j)), ...get(ACCI(i, j)), ...shuf(LO_LO), ...get(ACCR(i, j)), ...get(ACCI(i, j)), ...shuf(HI_HI), ...vadd, ...set(T),
          ...get(P.acc), ...ifThen([...get(T), ...addr, ...vload(16 * j), ...vadd, ...set(T)]),
          ...addr, ...get(T), ...vstore(16 * j),
        );
      }
    }
    return b;
  };
  // rows of B in steps of rj from J while rj remain
  const jLoop = (ri: number, rj: number): number[] => block(loop([
    ...get(P.n), ...get(J), ...sub, ...i32c(rj), ...ltu, ...brIf(1),
    ...get(P.br), ...get(J), ...get(P.lda), ...mul, ...add, ...set(BR(0)),
    ...get(P.bi), ...get(J), ...get(P.lda), ...mul, ...add, ...set(BI(0)),
    ...Array.from({ length: rj - 1 }, (_, r) => [...get(BR(r)), ...get(P.lda), ...add, ...set(BR(r + 1)), ...get(BI(r)), ...get(P.lda), ...add, ...set(BI(r + 1))]).flat(),
    ...blockCode(ri, rj),
    ...get(J), ...i32c(rj), ...add, ...set(J), ...br(0),
  ]));
  const iLoop = (ri: number): number[] => block(loop([
    ...get(P.m), ...get(I), ...sub, ...i32c(ri), ...ltu, ...brIf(1),
    ...get(P.ar), ...get(I), ...get(P.lda), ...mul, ...add, ...set(AR(0)),
    ...get(P.ai), ...get(I), ...get(P.lda), ...mul, ...add, ...set(AI(0)),
    ...Array.from({ length: ri - 1 }, (_, r) => [...get(AR(r)), ...get(P.lda), ...add, ...set(AR(r + 1)), ...get(AI(r)), ...get(P.lda), ...add, ...set(AI(r + 1))]).flat(),
    ...get(P.c), ...get(I), ...get(P.ldc), ...mul, ...add, ...set(CROW),
    ...i32c(0), ...set(J),
    ...jLoop(ri, RJ),
    ...(RJ > 1 ? jLoop(ri, 1) : []),
    ...get(I), ...i32c(ri), ...add, ...set(I), ...br(0),
  ]));
  const body = [
    ...get(P.k), ...i32c(-2), ...and, ...i32c(3), ...shl, ...set(PEND),
    ...i32c(0), ...set(I),
    ...iLoop(RI),
    ...(RI > 1 ? iLoop(1) : []),
  ];
  const gemm: Kernel = { name: 'gemm', params: Array(11).fill(I32), locals: locals([[nI32, I32], [nV, V128]]), body };
  return assembleModule([gemm]);
}

interface GemmExports {
  gemm(m: number, k: number, n: number, lda: number, ar: number, ai: number, br: number, bi: number, c: number, ldc: number, acc: number): void;
}

let gemmModule: WebAssembly.Module | null | undefined;
function getGemmModule(): WebAssembly.Module | null {
  if (gemmModule === undefined) gemmModule = compileModule(() => buildGemmModule());
  return gemmModule;
}

/** True when this host runs the WebAssembly SIMD GEMM. */
export function wasmGemmAvailable(): boolean {
  return getGemmModule() !== null;
}

let mem: WebAssembly.Memory | null = null;
let exportsOf: GemmExports | null = null;

/** The module instance with at least `bytes` of memory, or null (no wasm, or over the limit / out of memory). */
function instance(bytes: number): { mem: WebAssembly.Memory; k: GemmExports } | null {
  if (bytes > WASM_GEMM_MAX_BYTES) return null;
  const mod = getGemmModule();
  if (!mod) return null;
  const pages = Math.max(1, Math.ceil(bytes / 65536));
  try {
    if (!mem || !exportsOf) {
      mem = new WebAssembly.Memory({ initial: pages });
      exportsOf = new WebAssembly.Instance(mod, { env: { mem } }).exports as unknown as GemmExports;
    } else if (mem.buffer.byteLength < pages * 65536) {
      mem.grow(pages - mem.buffer.byteLength / 65536);
    }
  } catch {
    return null;
  }
  return { mem, k: exportsOf };
}

/** Split operands and the interleaved result of a batched product, laid out in the module's memory. */
export interface GemmArena {
  ar: Float64Array;
  ai: Float64Array;
  br: Float64Array;
  bi: Float64Array;
  c: Float64Array;
  /** byte offsets of the five arrays */
  ptr: { ar: number; ai: number; br: number; bi: number; c: number };
  k: GemmExports;
}

const align16 = (x: number) => Math.ceil(x / 16) * 16;

/**
 * Views for operands of aSize and bSize complex elements (split) and a result of cSize (interleaved)
 * in the module's memory, or null when the memory cannot hold them (the caller falls back to JS).
 * The views are valid until the next call (a grow detaches them).
 */
export function gemmArena(aSize: number, bSize: number, cSize: number): GemmArena | null {
  const pAr = 0, pAi = align16(8 * aSize), pBr = pAi + align16(8 * aSize), pBi = pBr + align16(8 * bSize), pC = pBi + align16(8 * bSize);
  const inst = instance(pC + 16 * cSize);
  if (!inst) return null;
  const buf = inst.mem.buffer;
  // the same shapes recur step after step: reuse the views while the memory has not grown
  if (last && last.buf === buf && last.aSize === aSize && last.bSize === bSize && last.cSize === cSize) return last.arena;
  const arena: GemmArena = {
    ar: new Float64Array(buf, pAr, aSize), ai: new Float64Array(buf, pAi, aSize),
    br: new Float64Array(buf, pBr, bSize), bi: new Float64Array(buf, pBi, bSize),
    c: new Float64Array(buf, pC, 2 * cSize),
    ptr: { ar: pAr, ai: pAi, br: pBr, bi: pBi, c: pC },
    k: inst.k,
  };
  last = { buf, aSize, bSize, cSize, arena };
  return arena;
}
let last: { buf: ArrayBuffer; aSize: number; bSize: number; cSize: number; arena: GemmArena } | null = null;

/** Blocking over k and n (elements) so the rows of B in use stay in cache (tuned by the bench). */
export const GEMM_KB = 256;
export const GEMM_JB = 32;

/**
 * nb products in the arena: batch t uses A at ar + t m k, B at br + t n k, C at c + t m n
 * (elements). Blocked over k and n.
 */
export function gemmBatchedInArena(a: GemmArena, nb: number, m: number, k: number, n: number): void {
  const { ar, ai, br, bi, c } = a.ptr;
  const g = a.k.gemm;
  const lda = 8 * k, ldc = 16 * n;
  for (let t = 0; t < nb; t++) {
    const aOff = 8 * t * m * k, bOff = 8 * t * n * k, cOff = c + 16 * t * m * n;
    for (let p0 = 0; p0 < k; p0 += GEMM_KB) {
      const kl = Math.min(GEMM_KB, k - p0);
      for (let j0 = 0; j0 < n; j0 += GEMM_JB) {
        const nl = Math.min(GEMM_JB, n - j0);
        const bRow = bOff + j0 * lda + 8 * p0;
        g(m, kl, nl, lda, ar + aOff + 8 * p0, ai + aOff + 8 * p0, br + bRow, bi + bRow, cOff + 16 * j0, ldc, p0 > 0 ? 1 : 0);
      }
    }
  }
}

/**
 * gemmSplit's contract on the wasm kernel: the operands are copied into the module's memory and
 * the result copied out. Returns false (and writes nothing) when the module cannot take them.
 */
export function gemmSplitWasm(m: number, k: number, n: number, ar: Float64Array, ai: Float64Array, aOff: number, br: Float64Array, bi: Float64Array, bOff: number, c: Float64Array, cOff: number): boolean {
  const arena = gemmArena(m * k, n * k, m * n);
  if (!arena) return false;
  arena.ar.set(ar.subarray(aOff, aOff + m * k));
  arena.ai.set(ai.subarray(aOff, aOff + m * k));
  arena.br.set(br.subarray(bOff, bOff + n * k));
  arena.bi.set(bi.subarray(bOff, bOff + n * k));
  gemmBatchedInArena(arena, 1, m, k, n);
  c.set(arena.c, 2 * cOff);
  return true;
}
