/**
 * Backward light cones (PHYSICS.md "Light cones").
 *
 * Walk the gates backwards from the observable's support S, keeping also D, a set of qubits on
 * which the propagated observable is known to commute with Z (initially: every qubit where no
 * term has an X or Y). A gate is dropped when it provably commutes with the propagated observable:
 *   - it touches no qubit of S, or
 *   - it is diagonal (z, s, sdg, rz, rzz, cz) and all its qubits are in D, or
 *   - it is a CX whose target is outside S and whose control is in D.
 * Otherwise it is kept: S gains all its qubits, and a qubit leaves D unless the gate commutes with Z
 * there (diagonal gates, a CX control). Diagonal gates never change D, so a whole RZZ layer acts as
 * one block: S grows to S plus the graph neighbours of its non-diagonal sites, never by more than
 * one hop per layer; a Z-only support is not grown by the final ZZ layer at all. For the kicked
 * Ising circuit this gives the graph ball of radius t - 1 around a Z site and t around an X or Y
 * site. The support-based cone is an upper bound on the qubits that can affect the value.
 *
 * Dropping a gate that commutes with the propagated observable at that point leaves every later
 * (earlier-in-time) propagated observable unchanged, so the kept gates alone give the same value:
 * `circuit` below holds exactly the kept gates, on the cone qubits re-indexed 0..k-1.
 */
import type { CompiledCircuit, Gate, Layer, ObservableSpec, PauliFactor } from './circuit';

export interface LightConeResult {
  /** Cone qubits in the original numbering, ascending. */
  qubits: number[];
  /** toLocal[q] = index in the sub-circuit, or -1 outside the cone. */
  toLocal: Int32Array;
  /** The sub-circuit: kept gates only, qubits re-indexed 0..k-1 (local i is original qubits[i]). */
  circuit: CompiledCircuit;
  /** The observable re-indexed to the sub-circuit. */
  observable?: ObservableSpec;
  /** Indices into the original gate list of the kept gates. */
  keptGates: number[];
  /** Non-Clifford rotations (angle not a multiple of pi/2 within 1e-12) among the kept gates. */
  nonCliffordRotations: number;
}

const DIAGONAL = new Set(['z', 's', 'sdg', 'rz', 'rzz', 'cz']);
const ROTATIONS = new Set(['rx', 'ry', 'rz', 'rzz']);

function isCliffordAngle(t: number): boolean {
  const k = Math.round(t / (Math.PI / 2));
  return Math.abs(t - k * (Math.PI / 2)) <= 1e-12;
}

/** Is the gate a non-Clifford rotation? */
export function isNonCliffordRotation(g: Gate): boolean {
  return ROTATIONS.has(g.name) && !isCliffordAngle(g.params?.[0] ?? 0);
}

/**
 * The backward light cone of an observable (or a list of Pauli factors, e.g. one term).
 * A gate that is an identity (a rotation by a multiple of 2 pi within 1e-12) is still treated as a
 * gate: the cone is support-based.
 */
export function lightCone(circuit: CompiledCircuit, observable: ObservableSpec | readonly PauliFactor[]): LightConeResult {
  const n = circuit.nQubits;
  const inS = new Uint8Array(n);
  const inD = new Uint8Array(n).fill(1);
  const factors: PauliFactor[] = Array.isArray(observable)
    ? [...(observable as readonly PauliFactor[])]
    : (observable as ObservableSpec).terms.flatMap((t) => t.factors);
  for (const f of factors) {
    if (!Number.isInteger(f.qubit) || f.qubit < 0 || f.qubit >= n) throw new Error(`qubit ${f.qubit} out of range`);
    inS[f.qubit] = 1;
    if (f.op !== 'Z') inD[f.qubit] = 0;
  }
  const gates = circuit.gates;
  const kept = new Uint8Array(gates.length);
  for (let gi = gates.length - 1; gi >= 0; gi--) {
    const g = gates[gi];
    const qs = g.qubits;
    let touches = false;
    for (const q of qs) if (inS[q]) touches = true;
    if (!touches) continue;
    if (DIAGONAL.has(g.name)) {
      let allD = true;
      for (const q of qs) if (!inD[q]) allD = false;
      if (allD) continue;
      for (const q of qs) inS[q] = 1; // D unchanged: diagonal gates commute with Z
    } else if (g.name === 'cx') {
      const [c, t] = qs;
      if (!inS[t] && inD[c]) continue;
      inS[c] = 1;
      inS[t] = 1;
      inD[t] = 0; // the control keeps its D status (CX commutes with Z_c)
    } else {
      for (const q of qs) {
        inS[q] = 1;
        inD[q] = 0;
      }
    }
    kept[gi] = 1;
  }
  const qubits: number[] = [];
  const toLocal = new Int32Array(n).fill(-1);
  for (let q = 0; q < n; q++) if (inS[q]) { toLocal[q] = qubits.length; qubits.push(q); }

  const keptGates: number[] = [];
  const subGates: Gate[] = [];
  let nonClifford = 0;
  const newIndex = new Int32Array(gates.length + 1);
  for (let gi = 0; gi < gates.length; gi++) {
    newIndex[gi] = subGates.length;
    if (!kept[gi]) continue;
    const g = gates[gi];
    keptGates.push(gi);
    const ng: Gate = { name: g.name, qubits: g.qubits.map((q) => toLocal[q]) };
    if (g.params) ng.params = [...g.params];
    subGates.push(ng);
    if (isNonCliffordRotation(g)) nonClifford++;
  }
  newIndex[gates.length] = subGates.length;

  // Layers: map each original layer onto its kept gates; uncovered runs become generic layers.
  const layers: Layer[] = [];
  const push = (kind: Layer['kind'], s: number, e: number) => {
    const a = newIndex[s], b = newIndex[e];
    if (b > a) layers.push({ kind, start: a, end: b });
  };
  const sorted = [...circuit.layers].sort((x, y) => x.start - y.start);
  let cursor = 0;
  for (const L of sorted) {
    if (L.start < cursor || L.end < L.start || L.end > gates.length) continue; // malformed: ignore
    if (L.start > cursor) push('generic', cursor, L.start);
    push(L.kind, L.start, L.end);
    cursor = L.end;
  }
  if (cursor < gates.length) push('generic', cursor, gates.length);

  const res: LightConeResult = {
    qubits,
    toLocal,
    circuit: { nQubits: qubits.length, gates: subGates, layers },
    keptGates,
    nonCliffordRotations: nonClifford,
  };
  if (!Array.isArray(observable)) {
    const o = observable as ObservableSpec;
    res.observable = {
      id: o.id,
      terms: o.terms.map((t) => ({ coef: t.coef, factors: t.factors.map((f) => ({ qubit: toLocal[f.qubit], op: f.op })) })),
    };
  }
  return res;
}

/** The undirected graph ball of the given radius around `sources` (for checks and planning). */
export function graphBall(n: number, edges: readonly (readonly [number, number])[], sources: readonly number[], radius: number): number[] {
  const adj: number[][] = Array.from({ length: n }, () => []);
  for (const [a, b] of edges) { adj[a].push(b); adj[b].push(a); }
  const dist = new Int32Array(n).fill(-1);
  let frontier: number[] = [];
  for (const s of sources) if (dist[s] < 0) { dist[s] = 0; frontier.push(s); }
  for (let r = 0; r < radius && frontier.length; r++) {
    const next: number[] = [];
    for (const u of frontier) for (const v of adj[u]) if (dist[v] < 0) { dist[v] = r + 1; next.push(v); }
    frontier = next;
  }
  const out: number[] = [];
  for (let q = 0; q < n; q++) if (dist[q] >= 0) out.push(q);
  return out;
}
