/**
 * The closed tensor network of <0...0| U^dag P U |0...0> for one Pauli string P, on a circuit that
 * is already restricted to P's backward light cone (light-cone.ts: the gates left out commute with
 * the evolved observable and cancel against their inverses).
 *
 * Construction (every index is a qubit wire of dimension 2):
 * - ket side: |0> vectors, then every gate in time order. A non-diagonal one-qubit gate is a 2 x 2
 *   tensor [out, in] and starts a new wire index. A diagonal gate (z, s, sdg, rz, rzz, cz) does not
 *   start new wires: it is a tensor on the wire indices it sits on (rank 1 or 2), which makes those
 *   indices hyperedges shared by every diagonal gate along the wire. CX is diagonal on its control:
 *   a rank-3 tensor [control, target out, target in].
 * - the observable: Z is diagonal (a rank-1 tensor [1, -1] on the final wire, which the bra side
 *   then continues); X and Y are 2 x 2 tensors [bra wire, ket wire]; a cone qubit with no factor
 *   joins the ket and bra wires directly (identity).
 * - bra side: the complex conjugates of the ket tensors, walked back to <0|.
 * Then rank simplification: any pair of tensors sharing an index whose product has no more legs than
 * the larger of the two is contracted at once (this absorbs the |0> vectors, the one-qubit gates
 * and the one-qubit diagonals into their neighbours); rank-0 results become a scalar factor.
 *
 * No framework or node: imports.
 */
import type { CompiledCircuit, Gate, PauliFactor } from '../circuit';
import { gateMatrix } from '../statevector';
import { contractPair, pairLayout, type Tensor } from './kernels';

export interface Network {
  tensors: Tensor[];
  /** number of distinct leg ids (0..nLegs-1 after compaction) */
  nLegs: number;
  /** a scalar factor [re, im] from rank-0 tensors met during simplification */
  scalar: [number, number];
}

const DIAG_1Q = new Set(['z', 's', 'sdg', 'rz']);

function c(re: number, im: number): [number, number] {
  return [re, im];
}

/** Diagonal of a one-qubit diagonal gate, interleaved [d0r, d0i, d1r, d1i]. */
function diag1(g: Gate): Float64Array {
  const m = gateMatrix(g);
  return Float64Array.of(m[0], m[1], m[6], m[7]);
}

/** Diagonal of rzz(t) = exp(-i t ZZ/2) or cz on bits (a, b), interleaved, index 2a + b. */
function diag2(g: Gate): Float64Array {
  if (g.name === 'cz') return Float64Array.of(1, 0, 1, 0, 1, 0, -1, 0);
  const t = g.params?.[0];
  if (typeof t !== 'number' || !Number.isFinite(t)) throw new Error('tensor network: rzz needs a finite angle');
  const [er, ei] = c(Math.cos(t / 2), -Math.sin(t / 2)); // equal bits: e^{-it/2}
  return Float64Array.of(er, ei, er, -ei, er, -ei, er, ei);
}

/** CX as [control, target out, target in]. */
const CX_DATA = (() => {
  const d = new Float64Array(16);
  d[2 * 0] = 1; // c=0: identity
  d[2 * 3] = 1;
  d[2 * (4 + 1)] = 1; // c=1: X
  d[2 * (4 + 2)] = 1;
  return d;
})();

const PAULI: Record<'X' | 'Y', Float64Array> = {
  X: Float64Array.of(0, 0, 1, 0, 1, 0, 0, 0),
  Y: Float64Array.of(0, 0, 0, -1, 0, 1, 0, 0),
};

function conj(d: Float64Array): Float64Array {
  const o = new Float64Array(d);
  for (let i = 1; i < o.length; i += 2) o[i] = -o[i];
  return o;
}

/** Build the (unsimplified) network for <0|U^dag P U|0>. `factors` use the circuit's qubit numbers. */
export function buildNetwork(circuit: CompiledCircuit, factors: readonly PauliFactor[]): Network {
  const n = circuit.nQubits;
  let next = 0;
  const tensors: Tensor[] = [];
  const ket = new Int32Array(n);
  for (let q = 0; q < n; q++) {
    ket[q] = next++;
    tensors.push({ legs: [ket[q]], data: Float64Array.of(1, 0, 0, 0) });
  }
  // ket tensors, remembered for the bra side: [tensor index, qubits, in legs (for new wires)]
  interface Step { data: Float64Array; kind: 'm1' | 'd1' | 'd2' | 'cx'; qubits: readonly number[] }
  const steps: Step[] = [];
  for (const g of circuit.gates) {
    const qs = g.qubits;
    if (g.name === 'rzz' || g.name === 'cz') {
      const d = diag2(g);
      tensors.push({ legs: [ket[qs[0]], ket[qs[1]]], data: d });
      steps.push({ data: d, kind: 'd2', qubits: qs });
    } else if (g.name === 'cx') {
      const [cq, tq] = qs;
      const out = next++;
      tensors.push({ legs: [ket[cq], out, ket[tq]], data: CX_DATA });
      ket[tq] = out;
      steps.push({ data: CX_DATA, kind: 'cx', qubits: qs });
    } else if (DIAG_1Q.has(g.name)) {
      const d = diag1(g);
      tensors.push({ legs: [ket[qs[0]]], data: d });
      steps.push({ data: d, kind: 'd1', qubits: qs });
    } else {
      const m = gateMatrix(g);
      const out = next++;
      tensors.push({ legs: [out, ket[qs[0]]], data: m });
      ket[qs[0]] = out;
      steps.push({ data: m, kind: 'm1', qubits: qs });
    }
  }
  // observable
  const bra = Int32Array.from(ket);
  for (const f of factors) {
    const q = f.qubit;
    if (!Number.isInteger(q) || q < 0 || q >= n) throw new RangeError(`tensor network: factor on qubit ${q}, outside the circuit's qubits 0..${n - 1}`);
    if (f.op === 'Z') tensors.push({ legs: [ket[q]], data: Float64Array.of(1, 0, -1, 0) });
    else {
      const b = next++;
      tensors.push({ legs: [b, ket[q]], data: PAULI[f.op] });
      bra[q] = b;
    }
  }
  // bra side: conjugate tensors walked backwards; "out" is the later wire (bra[q]), "in" a new one
  for (let s = steps.length - 1; s >= 0; s--) {
    const st = steps[s];
    const qs = st.qubits;
    if (st.kind === 'd2') tensors.push({ legs: [bra[qs[0]], bra[qs[1]]], data: conj(st.data) });
    else if (st.kind === 'd1') tensors.push({ legs: [bra[qs[0]]], data: conj(st.data) });
    else if (st.kind === 'cx') {
      const [cq, tq] = qs;
      const inn = next++;
      tensors.push({ legs: [bra[cq], bra[tq], inn], data: CX_DATA });
      bra[tq] = inn;
    } else {
      const inn = next++;
      tensors.push({ legs: [bra[qs[0]], inn], data: conj(st.data) });
      bra[qs[0]] = inn;
    }
  }
  for (let q = 0; q < n; q++) tensors.push({ legs: [bra[q]], data: Float64Array.of(1, 0, 0, 0) });
  return { tensors, nLegs: next, scalar: [1, 0] };
}

/**
 * Rank simplification: contract every pair sharing an index whose product has no more legs than
 * the larger factor, until none is left; multiply rank-0 tensors into the scalar; renumber legs
 * 0..nLegs-1. Also merges duplicate legs? No: a leg appears at most once per tensor by construction.
 */
export function simplifyNetwork(net: Network): Network {
  const alive: (Tensor | null)[] = net.tensors.slice();
  const where = new Map<number, Set<number>>(); // leg -> tensors holding it
  alive.forEach((t, i) => {
    for (const l of (t as Tensor).legs) {
      let s = where.get(l);
      if (!s) where.set(l, (s = new Set()));
      s.add(i);
    }
  });
  let [sr, si] = net.scalar;
  const mulScalar = (t: Tensor) => {
    const r = sr * t.data[0] - si * t.data[1];
    si = sr * t.data[1] + si * t.data[0];
    sr = r;
  };
  const merge = (i: number, j: number) => {
    const A = alive[i] as Tensor, B = alive[j] as Tensor;
    const closes = (leg: number) => (where.get(leg) as Set<number>).size === 2;
    const L = pairLayout(A.legs, B.legs, closes);
    const C = contractPair(A, B, L);
    for (const l of A.legs) where.get(l)?.delete(i);
    for (const l of B.legs) where.get(l)?.delete(j);
    for (const l of L.sum) where.delete(l);
    alive[i] = null;
    alive[j] = null;
    if (C.legs.length === 0) {
      mulScalar(C);
      return -1;
    }
    const k = alive.length;
    alive.push(C);
    for (const l of C.legs) (where.get(l) as Set<number>).add(k);
    return k;
  };
  const queue: number[] = alive.map((_, i) => i);
  while (queue.length) {
    const i = queue.pop() as number;
    const A = alive[i];
    if (!A) continue;
    let done = false;
    for (const l of A.legs) {
      const holders = where.get(l) as Set<number>;
      for (const j of holders) {
        if (j === i) continue;
        const B = alive[j] as Tensor;
        const closes = (leg: number) => (where.get(leg) as Set<number>).size === 2;
        const L = pairLayout(A.legs, B.legs, closes);
        const r = L.batch.length + L.left.length + L.right.length;
        if (r <= Math.max(A.legs.length, B.legs.length)) {
          const k = merge(i, j);
          if (k >= 0) queue.push(k);
          done = true;
          break;
        }
      }
      if (done) break;
    }
  }
  // isolated tensors holding only legs nobody else has (open within themselves): sum them out
  const out: Tensor[] = [];
  for (const t of alive) {
    if (!t) continue;
    if (t.legs.length === 0) mulScalar(t);
    else out.push(t);
  }
  // renumber legs compactly
  const ids = new Map<number, number>();
  for (const t of out) for (const l of t.legs) if (!ids.has(l)) ids.set(l, ids.size);
  return { tensors: out.map((t) => ({ legs: t.legs.map((l) => ids.get(l) as number), data: t.data })), nLegs: ids.size, scalar: [sr, si] };
}
