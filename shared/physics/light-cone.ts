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
import type { CompiledCircuit, Gate, Layer, ObservableSpec, PauliFactor, PauliTerm } from './circuit';
import type { CompiledLattice } from './compile';
import { cliffordQuarterTurns } from './pauli-propagation/options';

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

/** Is the angle a multiple of pi/2 (within 1e-12)? The rule of the propagation engine's Clifford maps. */
export function isCliffordAngle(t: number): boolean {
  return cliffordQuarterTurns(t) >= 0;
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

/**
 * The sub-chain [lo, hi] (0-based, inclusive) holding the causal cone of a Pauli string on sites
 * lo..hi of an open chain of n sites after `steps` kicked-Ising steps: radius t - 1 around a Z-only
 * support (the last ZZ layer commutes with it), t when it has an X or Y; clipped to the chain.
 * Exact for the free-fermion terms (Z_j, X_j, Z_j Z_j+1); for a string mixing Z with X/Y an upper bound.
 */
export function chainCone(n: number, steps: number, lo: number, hi: number, hasXY: boolean): [number, number] {
  const r = hasXY ? steps : Math.max(0, steps - 1);
  return [Math.max(0, lo - r), Math.min(n - 1, hi + r)];
}

// ---------------------------------------------------------------------------------------------
// Counting variants: the same rules without building the sub-circuit (the planner's estimates).

/** What a counting walk over a gate list reports, walking backwards (the hooks of countLightCone). */
export interface ConeWalkHooks {
  /** a kept gate: is it a non-Clifford rotation, and the cone's qubits once it is kept */
  kept(nonClifford: boolean, coneQubits: number): void;
  /**
   * Every earlier gate is kept (the cone is the whole register and no qubit commutes with Z any
   * more): `gates` gates, `nonClifford` of them non-Clifford rotations.
   */
  rest(gates: number, nonClifford: number, coneQubits: number): void;
}

export interface ConeCount {
  /** qubits in the light cone */
  qubits: number;
  /** kept gates (the restricted circuit's size) */
  gates: number;
  /** non-Clifford rotations among them */
  nonClifford: number;
}

/**
 * lightCone's walk over one gate list, counting only (no allocation per call): the same kept
 * gates, qubits and non-Clifford rotations as lightCone(circuit, terms). Reuse one counter for
 * many observables of the same circuit.
 */
export class GateConeCounter {
  /** per gate: bit 1 diagonal, bit 2 non-Clifford rotation, bit 4 cx */
  private readonly flags: Uint8Array;
  /** non-Clifford rotations among gates 0..i-1 */
  private readonly nonCliffPrefix: Int32Array;
  private readonly inD: Uint8Array;
  private readonly mark: Int32Array;
  private stamp = 0;

  constructor(readonly circuit: CompiledCircuit) {
    const G = circuit.gates.length;
    this.flags = new Uint8Array(G);
    this.nonCliffPrefix = new Int32Array(G + 1);
    circuit.gates.forEach((g, i) => {
      const non = isNonCliffordRotation(g);
      this.flags[i] = (DIAGONAL.has(g.name) ? 1 : 0) | (non ? 2 : 0) | (g.name === 'cx' ? 4 : 0);
      this.nonCliffPrefix[i + 1] = this.nonCliffPrefix[i] + (non ? 1 : 0);
    });
    this.inD = new Uint8Array(circuit.nQubits);
    this.mark = new Int32Array(circuit.nQubits);
  }

  /**
   * Count the cone of `terms` (their union). Once the cone is the whole register and D is empty
   * every earlier gate is kept, so the rest is closed form (hooks.rest, no per-gate calls).
   */
  count(terms: readonly PauliTerm[], hooks?: ConeWalkHooks): ConeCount {
    const circ = this.circuit;
    const G = circ.gates.length;
    const n = circ.nQubits;
    const flags = this.flags;
    const pre = this.nonCliffPrefix;
    const inD = this.inD;
    inD.fill(1);
    let dCount = n;
    if (++this.stamp >= 0x7fffffff) {
      this.mark.fill(0);
      this.stamp = 1;
    }
    const s = this.stamp;
    const mark = this.mark;
    let qubits = 0;
    for (const t of terms) {
      for (const f of t.factors) {
        if (mark[f.qubit] !== s) {
          mark[f.qubit] = s;
          qubits++;
        }
        if (f.op !== 'Z' && inD[f.qubit]) {
          inD[f.qubit] = 0;
          dCount--;
        }
      }
    }
    let gates = 0;
    let nonClifford = 0;
    const gs = circ.gates;
    for (let i = G - 1; i >= 0; i--) {
      if (qubits === n && dCount === 0) {
        const rest = pre[i + 1];
        gates += i + 1;
        nonClifford += rest;
        hooks?.rest(i + 1, rest, qubits);
        break;
      }
      const q = gs[i].qubits;
      const a = q[0];
      const b = q.length === 2 ? q[1] : -1;
      const inA = mark[a] === s;
      const inB = b >= 0 && mark[b] === s;
      if (!inA && !inB) continue;
      const fl = flags[i];
      if (fl & 1) {
        // diagonal: dropped when every qubit commutes with Z; D unchanged otherwise
        if (inD[a] && (b < 0 || inD[b])) continue;
        if (!inA) {
          mark[a] = s;
          qubits++;
        }
        if (b >= 0 && !inB) {
          mark[b] = s;
          qubits++;
        }
      } else if (fl & 4) {
        // cx(a = control, b = target): dropped when the target is outside and the control in D
        if (!inB && inD[a]) continue;
        if (!inA) {
          mark[a] = s;
          qubits++;
        }
        if (!inB) {
          mark[b] = s;
          qubits++;
        }
        if (inD[b]) {
          inD[b] = 0;
          dCount--;
        }
      } else {
        if (!inA) {
          mark[a] = s;
          qubits++;
        }
        if (inD[a]) {
          inD[a] = 0;
          dCount--;
        }
        if (b >= 0) {
          if (!inB) {
            mark[b] = s;
            qubits++;
          }
          if (inD[b]) {
            inD[b] = 0;
            dCount--;
          }
        }
      }
      gates++;
      const non = (fl & 2) !== 0;
      if (non) nonClifford++;
      hooks?.kept(non, qubits);
    }
    return { qubits, gates, nonClifford };
  }
}

/**
 * The cone of a kicked-Ising circuit, walked block by block: `blocks` lists, backwards from the
 * end, (kind 0 = RZZ block / 1 = RX layer, gates kept in it, cone qubits after it), 3 numbers each.
 * The walk for t steps is the first 6t numbers of the walk for more steps (the last RZZ block, then
 * t RX layers with t - 1 RZZ blocks between them).
 */
export interface KickedIsingCone {
  qubits: number;
  rx: number;
  rzz: number;
  blocks: number[];
}

/**
 * Light cones of kicked-Ising circuits on a lattice (PHYSICS.md): each whole RZZ block (all colour
 * layers of a step commute) grows the cone S to S plus its graph neighbours; RX layers add nothing;
 * the last block grows only the X/Y sites (ZZ commutes with Z). So a Z site's cone is the graph ball
 * of radius t - 1 and an X or Y site's has radius t: the same cone as lightCone on the compiled
 * circuit, walked on the graph (a breadth-first search per support, no gate list).
 */
export class KickedIsingCones {
  private readonly offsets: Int32Array;
  private readonly nbrs: Int32Array;
  private readonly n: number;
  private readonly mark: Int32Array;
  private readonly xyMark: Int32Array;
  private stamp = 0;
  private edgeIndex: Map<string, number> | null = null;
  private colour: Int32Array | null = null;

  constructor(readonly lattice: CompiledLattice) {
    const { n, edges } = lattice.graph;
    this.n = n;
    const deg = new Int32Array(n + 1);
    for (const [a, b] of edges) {
      deg[a + 1]++;
      deg[b + 1]++;
    }
    for (let i = 0; i < n; i++) deg[i + 1] += deg[i];
    const fill = deg.slice(0, n);
    const nbrs = new Int32Array(2 * edges.length);
    for (const [a, b] of edges) {
      nbrs[fill[a]++] = b;
      nbrs[fill[b]++] = a;
    }
    this.offsets = deg;
    this.nbrs = nbrs;
    this.mark = new Int32Array(n);
    this.xyMark = new Int32Array(n);
  }

  private nextStamp(): number {
    if (++this.stamp >= 0x7fffffff) {
      this.mark.fill(0);
      this.xyMark.fill(0);
      this.stamp = 1;
    }
    return this.stamp;
  }

  /**
   * Backward cone of `terms` through `steps` steps. With `collect`, also records the kept gates per
   * step (for the restricted sub-circuit): RX qubits and RZZ edge indices, the last step first.
   */
  walk(steps: number, terms: readonly PauliTerm[], collect: { rx: number[][]; rzz: number[][] } | null = null): KickedIsingCone {
    const { offsets, nbrs } = this;
    const mark = this.mark;
    const s = this.nextStamp();
    const members: number[] = [];
    const xy: number[] = [];
    const xyMark = this.xyMark;
    const sx = this.nextStamp();
    for (const t of terms) {
      for (const f of t.factors) {
        if (f.op !== 'Z' && xyMark[f.qubit] !== sx) {
          xyMark[f.qubit] = sx;
          xy.push(f.qubit);
        }
      }
    }
    const isXY = (v: number) => xyMark[v] === sx;
    let internal = 0;
    const add = (v: number) => {
      if (mark[v] === s) return;
      for (let e = offsets[v]; e < offsets[v + 1]; e++) if (mark[nbrs[e]] === s) internal++;
      mark[v] = s;
      members.push(v);
    };
    for (const t of terms) for (const f of t.factors) add(f.qubit);
    if (steps === 0) return { qubits: members.length, rx: 0, rzz: 0, blocks: [] };
    let rx = 0;
    let rzz = 0;
    const blocks: number[] = [];
    const edgesTouching = (set: readonly number[], inSet: (v: number) => boolean) => {
      let deg = 0;
      let inner = 0;
      for (const v of set) {
        deg += offsets[v + 1] - offsets[v];
        for (let e = offsets[v]; e < offsets[v + 1]; e++) if (inSet(nbrs[e])) inner++;
      }
      return deg - inner / 2;
    };
    // last RZZ block: only edges at X/Y sites act
    const last = edgesTouching(xy, isXY);
    rzz += last;
    if (collect) collect.rzz.push(this.edgesAt(xy, isXY));
    for (const v of xy) for (let e = offsets[v]; e < offsets[v + 1]; e++) add(nbrs[e]);
    blocks.push(0, last, members.length);
    let frontierStart = 0; // every member may still have neighbours outside
    for (let step = steps; step >= 1; step--) {
      rx += members.length;
      blocks.push(1, members.length, members.length);
      if (collect) collect.rx.push([...members]);
      if (step === 1) break;
      // RZZ block of step - 1: every edge touching the cone
      let deg = 0;
      for (const v of members) deg += offsets[v + 1] - offsets[v];
      const blockEdges = deg - internal;
      rzz += blockEdges;
      if (collect) collect.rzz.push(this.edgesAt(members, (v) => mark[v] === s));
      const end = members.length;
      for (let i = frontierStart; i < end; i++) {
        const v = members[i];
        for (let e = offsets[v]; e < offsets[v + 1]; e++) add(nbrs[e]);
      }
      frontierStart = end;
      if (members.length === this.n) frontierStart = members.length;
      blocks.push(0, blockEdges, members.length);
    }
    return { qubits: members.length, rx, rzz, blocks };
  }

  /** Indices (into lattice.graph.edges) of edges with an endpoint in `set`. */
  private edgesAt(set: readonly number[], inSet: (v: number) => boolean): number[] {
    if (!this.edgeIndex) this.edgeIndex = new Map(this.lattice.graph.edges.map(([a, b], i) => [`${a},${b}`, i]));
    const out: number[] = [];
    const { offsets, nbrs } = this;
    for (const v of set) {
      for (let e = offsets[v]; e < offsets[v + 1]; e++) {
        const w = nbrs[e];
        if (inSet(w) && w < v) continue; // counted from the smaller endpoint
        out.push(this.edgeIndex.get(v < w ? `${v},${w}` : `${w},${v}`) as number);
      }
    }
    return out;
  }

  private colourOfEdge(): Int32Array {
    if (!this.colour) {
      const idx = new Map(this.lattice.graph.edges.map(([a, b], i) => [`${a},${b}`, i]));
      const colour = new Int32Array(this.lattice.graph.edges.length);
      this.lattice.colourLayers.forEach((layer, c) => {
        for (const [a, b] of layer) colour[idx.get(`${a},${b}`) as number] = c;
      });
      this.colour = colour;
    }
    return this.colour;
  }

  /**
   * The light-cone sub-circuit of an observable after `steps` steps, on qubits re-indexed 0..k-1 (in
   * increasing original order), with the observable re-indexed the same way: per step the RX layer
   * on the cone, then the step's RZZ gates touching it in colour order (the compiled order).
   */
  restrict(params: { steps: number; thetaH: number; thetaJ: number }, obs: ObservableSpec): { circuit: CompiledCircuit; observable: ObservableSpec; qubits: number[] } {
    const { steps, thetaH, thetaJ } = params;
    const collect = { rx: [] as number[][], rzz: [] as number[][] };
    this.walk(steps, obs.terms, collect);
    // collect lists blocks backwards: rzz[0] is the last step's block, rx[0] the last RX layer
    const edges = this.lattice.graph.edges;
    const colourOf = this.colourOfEdge();
    const set = new Set<number>();
    for (const t of obs.terms) for (const f of t.factors) set.add(f.qubit);
    const gates: Gate[] = [];
    for (let step = 1; step <= steps; step++) {
      const rxq = [...collect.rx[steps - step]].sort((a, b) => a - b);
      for (const q of rxq) {
        gates.push({ name: 'rx', qubits: [q], params: [thetaH] });
        set.add(q);
      }
      const block = collect.rzz[steps - step] ?? [];
      const byColour = new Map<number, number[]>();
      for (const e of block) {
        const c = colourOf[e];
        if (!byColour.has(c)) byColour.set(c, []);
        (byColour.get(c) as number[]).push(e);
      }
      for (const c of [...byColour.keys()].sort((a, b) => a - b)) {
        for (const e of (byColour.get(c) as number[]).sort((a, b) => a - b)) {
          const [a, b] = edges[e];
          gates.push({ name: 'rzz', qubits: [a, b], params: [thetaJ] });
          set.add(a);
          set.add(b);
        }
      }
    }
    const used = [...set].sort((a, b) => a - b);
    const index = new Map(used.map((q, i) => [q, i]));
    const mapped: Gate[] = gates.map((g) => ({ ...g, qubits: g.qubits.map((q) => index.get(q) as number) }));
    const observable: ObservableSpec = {
      id: obs.id,
      terms: obs.terms.map((t) => ({ coef: t.coef, factors: t.factors.map((f) => ({ qubit: index.get(f.qubit) as number, op: f.op })) })),
    };
    return { circuit: { nQubits: used.length, gates: mapped, layers: layersOf(mapped) }, observable, qubits: used };
  }
}

/** Layers of a restricted kicked-Ising gate list: runs of rx, then runs of rzz on disjoint qubits. */
function layersOf(gates: readonly Gate[]): Layer[] {
  const out: Layer[] = [];
  let start = 0;
  let busy = new Set<number>();
  for (let i = 0; i <= gates.length; i++) {
    const g = gates[i];
    const prev = gates[i - 1];
    const brk = i === gates.length || (i > start && (g.name !== prev.name || g.qubits.some((q) => busy.has(q))));
    if (brk && i > start) {
      const name = prev.name;
      out.push({ kind: name === 'rx' ? 'rx' : name === 'rzz' ? 'rzz' : 'generic', start, end: i });
      start = i;
      busy = new Set();
    }
    if (g) for (const q of g.qubits) busy.add(q);
  }
  return out;
}
