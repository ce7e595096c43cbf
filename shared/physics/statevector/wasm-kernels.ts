/** The WebAssembly kernels: a state in the module's memory and the fused pass on it. */
import { statevectorBytes } from './limits';
import { termAngle, type DiagTerm, type Mat2 } from './matrices';
import { DIAG_MAX_CROSS, fillPhaseTables, planDiagonal } from './diagonal-plan';
import { BLOCK_BITS, HIGH_GROUP, RUN_BITS, insertZeroBit, isRealMat, isRxForm, q0Gen } from './js-kernels';
import { getWasmModule, type WasmKernels } from './wasm-module';

const SCRATCH_MATRIX = 64;
const SCRATCH_TABLES = (1 << DIAG_MAX_CROSS) * (1 << BLOCK_BITS) * 16;

export class WasmState {
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
export function applyFusedWasm(ws: WasmState, n: number, qubits: number[], mats: Mat2[], terms: DiagTerm[]): void {
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

  // diagonal plan (diagonal-plan.ts, shared with the JS kernels); the wasm pass applies the high
  // terms through the tables too, so it runs whenever any term is planned
  const plan = planDiagonal(terms, W);
  const { highTerms, extra, cross, hasTerms: hasDiag } = plan;
  const C = cross.length;
  if (hasDiag) fillPhaseTables(plan, L, (c) => ws.table(c, L));
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
