/** The Statevector class and statevectorExpectation. */
import type { CompiledCircuit, Gate, ObservableSpec, PauliFactor } from '../circuit';
import { DEFAULT_MAX_QUBITS, checkQubitLimit, statevectorBytes, type StatevectorOptions } from './limits';
import { diagTerm, gateMatrix, isDiagonal1, type DiagTerm, type Mat2 } from './matrices';
import { applyFused } from './js-kernels';
import { WASM_MAX_QUBITS, wasmKernelsAvailable } from './wasm-module';
import { WasmState, applyFusedWasm } from './wasm-kernels';
import { Planner, validateGate } from './fusion';

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
