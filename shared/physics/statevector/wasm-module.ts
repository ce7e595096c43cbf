/** The hand-assembled WebAssembly SIMD module (docs/decisions/0002-hand-assembled-wasm.md). */
import {
  add, assembleModule, block, br, brIf, compileModule, F64, f64load, geu, get, HI, I32, i32c, LO, locals, loop, ltu,
  set, shuf, splat, swapOf, tee, V128, vadd, vconst, vload, vmul, vstore, type Kernel,
} from '../wasm/assembler';

// ------------------------------------------------------------------------------------------------
// WebAssembly SIMD kernels (the default engine where WebAssembly SIMD is available).
// Scalar JS reaches only about a third of memory bandwidth when streaming a large state, so the
// inner loops are a tiny hand-assembled wasm module working on the state in its linear memory
// (f64x2: one complex amplitude per v128). The module is built here from its opcodes; no
// toolchain or binary blob is involved. Byte offsets are i32, so the wasm engine holds states up
// to WASM_MAX_QUBITS; wider states (and hosts without wasm SIMD) use the JS kernels.

export const WASM_MAX_QUBITS = 27;

function buildKernelModule(): Uint8Array<ArrayBuffer> {
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
    return { params, locals: locals([[nIntLocals, I32], [nV, V128]]), body: [...init, ...loopCode] };
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
  const diagLocals = locals([[2, I32], [5, V128]]);

  const kernels: Kernel[] = [];
  for (const kind of ['rx', 'real', 'gen'] as Kind[]) {
    for (const adjacent of [false, true]) {
      for (const dual of [false, true]) kernels.push({ name: kind + (adjacent ? '0' : '') + (dual ? 'd' : ''), ...build(kind, adjacent, dual) });
    }
  }
  kernels.push({ name: 'diag', params: [I32, I32, I32, F64, F64], locals: diagLocals, body: diagBody });
  return assembleModule(kernels);
}

export interface WasmKernels {
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
export function getWasmModule(): WebAssembly.Module | null {
  if (wasmModule !== undefined) return wasmModule;
  wasmModule = compileModule(buildKernelModule);
  return wasmModule;
}

/** True when this host runs the WebAssembly SIMD kernels. */
export function wasmKernelsAvailable(): boolean {
  return getWasmModule() !== null;
}

/** Scratch after the state: a 2x2 matrix (64 B) and the diagonal phase tables. */
