/**
 * A small WebAssembly assembler: encoders for the handful of opcodes the hand-assembled SIMD
 * modules use (docs/decisions/0002-hand-assembled-wasm.md), and the module layout they share (one
 * imported memory `env.mem`, one exported function per kernel). Each helper returns the bytes of
 * one instruction or construct; a function body is the concatenation of such arrays, written in
 * stack order. Used by shared/physics/statevector/wasm-module.ts and
 * shared/physics/tensor-network/wasm-gemm.ts. No framework or node: imports.
 */

/** Unsigned LEB128. */
export function uleb(v: number): number[] {
  const o: number[] = [];
  do {
    let b = v & 0x7f;
    v >>>= 7;
    if (v) b |= 0x80;
    o.push(b);
  } while (v);
  return o;
}

/** Signed LEB128 (32-bit values). */
export function sleb(v: number): number[] {
  const o: number[] = [];
  for (;;) {
    const b = v & 0x7f;
    v >>= 7;
    if ((v === 0 && !(b & 0x40)) || (v === -1 && b & 0x40)) {
      o.push(b);
      return o;
    }
    o.push(b | 0x80);
  }
}

export const vec = (items: number[][]): number[] => [...uleb(items.length), ...items.flat()];
export const section = (id: number, b: number[]): number[] => [id, ...uleb(b.length), ...b];
export const str = (s: string): number[] => [...uleb(s.length), ...[...s].map((c) => c.charCodeAt(0))];

// value types
export const I32 = 0x7f, F64 = 0x7c, V128 = 0x7b;

// locals
export const get = (i: number) => [0x20, ...uleb(i)];
export const set = (i: number) => [0x21, ...uleb(i)];
export const tee = (i: number) => [0x22, ...uleb(i)];

// i32
export const i32c = (v: number) => [0x41, ...sleb(v)];
export const add = [0x6a], sub = [0x6b], mul = [0x6c], and = [0x71], shl = [0x74];
export const eqz = [0x45], geu = [0x4f], ltu = [0x49], gtu = [0x4b];

// control
export const block = (b: number[]) => [0x02, 0x40, ...b, 0x0b];
export const loop = (b: number[]) => [0x03, 0x40, ...b, 0x0b];
/** `if` without a result (the condition is on the stack). */
export const ifThen = (b: number[]) => [0x04, 0x40, ...b, 0x0b];
export const br = (l: number) => [0x0c, ...uleb(l)];
export const brIf = (l: number) => [0x0d, ...uleb(l)];

// f64 and SIMD (f64x2: one complex number, or two reals, per v128)
export const f64load = (off: number) => [0x2b, 3, ...uleb(off)];
export const simd = (op: number) => [0xfd, ...uleb(op)];
export const vload = (off = 0) => [...simd(0x00), 4, ...uleb(off)];
/** v128.load64_zero: one f64 into lane 0, lane 1 zero. */
export const vload64zero = (off = 0) => [...simd(0x5d), 3, ...uleb(off)];
export const vstore = (off = 0) => [...simd(0x0b), 4, ...uleb(off)];
export const splat = simd(0x14), vadd = simd(0xf0), vsub = simd(0xf1), vmul = simd(0xf2);
export const f64bytes = (x: number) => [...new Uint8Array(new Float64Array([x]).buffer)];
export const vconst = (a: number, b: number) => [...simd(0x0c), ...f64bytes(a), ...f64bytes(b)];
/** i8x16.shuffle of the two v128 on the stack (lanes 0-15 the first, 16-31 the second). */
export const shuf = (lanes: number[]) => [...simd(0x0d), ...lanes];
/** Byte lanes: swap the two f64 halves; both lanes from the low half; both from the high half. */
export const SWAP = [8, 9, 10, 11, 12, 13, 14, 15, 0, 1, 2, 3, 4, 5, 6, 7];
export const LO = [0, 1, 2, 3, 4, 5, 6, 7, 0, 1, 2, 3, 4, 5, 6, 7];
export const HI = [8, 9, 10, 11, 12, 13, 14, 15, 8, 9, 10, 11, 12, 13, 14, 15];
/** Two-operand lanes: [a.lo, b.lo] and [a.hi, b.hi]. */
export const LO_LO = [0, 1, 2, 3, 4, 5, 6, 7, 16, 17, 18, 19, 20, 21, 22, 23];
export const HI_HI = [8, 9, 10, 11, 12, 13, 14, 15, 24, 25, 26, 27, 28, 29, 30, 31];
export const swapOf = (i: number) => [...get(i), ...get(i), ...shuf(SWAP)];

/** A local declaration list: runs of [count, type]. */
export const locals = (runs: [number, number][]) => vec(runs.map(([n, t]) => [...uleb(n), t]));

export interface Kernel {
  name: string;
  params: number[];
  /** encoded local declarations (see `locals`) */
  locals: number[];
  body: number[];
}

/**
 * The module bytes: one function type per kernel (params, no results), the memory imported as
 * env.mem (at least one page), every kernel exported under its name.
 */
export function assembleModule(kernels: readonly Kernel[]): Uint8Array<ArrayBuffer> {
  const code = (l: number[], body: number[]) => {
    const b = [...l, ...body, 0x0b];
    return [...uleb(b.length), ...b];
  };
  const fn = (params: number[]) => [0x60, ...vec(params.map((p) => [p])), ...vec([])];
  const mod = [
    0x00, 0x61, 0x73, 0x6d, 1, 0, 0, 0,
    ...section(1, vec(kernels.map((k) => fn(k.params)))),
    ...section(2, vec([[...str('env'), ...str('mem'), 0x02, 0x00, ...uleb(1)]])),
    ...section(3, vec(kernels.map((_, i) => [i]))),
    ...section(7, vec(kernels.map((k, i) => [...str(k.name), 0x00, i]))),
    ...section(10, vec(kernels.map((k) => code(k.locals, k.body)))),
  ];
  return new Uint8Array(mod);
}

/** Compile module bytes, or null where WebAssembly (with SIMD) is unavailable or refuses them. */
export function compileModule(build: () => Uint8Array<ArrayBuffer>): WebAssembly.Module | null {
  try {
    const bytes = build();
    return typeof WebAssembly !== 'undefined' && WebAssembly.validate(bytes) ? new WebAssembly.Module(bytes) : null;
  } catch {
    return null;
  }
}
