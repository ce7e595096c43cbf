/**
 * Compile challenge instances to CompiledCircuit (circuit.ts), enumerate the instance grid and the
 * targets, count gates and depth.
 *
 * Instances:
 * - kicked-ising: the grid steps x thetaH, steps outer, both in spec order. Instance id
 *   `t<steps>-h<thetaH with 6 decimals>`, e.g. "t4-h0.785398" (challenge.ts rejects grids whose ids
 *   collide).
 * - gates: exactly one instance, id "base" (a parameter sweep of a plain gate list is published as
 *   separate challenges or versions; the gate list is the instance).
 * Target id: `<instance id>:<observable id>`, e.g. "t4-h0.785398:z24".
 */
import type { CompiledCircuit, Gate, GateName, Layer } from './circuit';
import { GATE_ARITY } from './circuit';
import type { ChallengeSpec } from './challenge-spec';
import { buildLattice, edgeColouring, type Edge, type Graph } from './lattices';
import { DEFAULT_THETA_J, kickedIsing } from './kicked-ising';

export type InstanceParams =
  | { family: 'kicked-ising'; steps: number; thetaH: number; thetaJ: number }
  | { family: 'gates' };

export interface Instance {
  id: string;
  /** position in the enumeration order */
  index: number;
  params: InstanceParams;
}

export interface Target {
  id: string;
  instanceId: string;
  observableId: string;
}

export const GATES_INSTANCE_ID = 'base';

export function instanceId(steps: number, thetaH: number): string {
  return `t${steps}-h${thetaH.toFixed(6)}`;
}

export function targetId(instanceId: string, observableId: string): string {
  return `${instanceId}:${observableId}`;
}

export function enumerateInstances(spec: ChallengeSpec): Instance[] {
  const c = spec.circuit;
  if (c.family === 'gates') return [{ id: GATES_INSTANCE_ID, index: 0, params: { family: 'gates' } }];
  const thetaJ = c.thetaJ ?? DEFAULT_THETA_J;
  const out: Instance[] = [];
  for (const steps of c.steps) {
    for (const thetaH of c.thetaH) {
      out.push({ id: instanceId(steps, thetaH), index: out.length, params: { family: 'kicked-ising', steps, thetaH, thetaJ } });
    }
  }
  return out;
}

export function enumerateTargets(spec: ChallengeSpec): Target[] {
  const out: Target[] = [];
  for (const inst of enumerateInstances(spec)) {
    for (const o of spec.observables) out.push({ id: targetId(inst.id, o.id), instanceId: inst.id, observableId: o.id });
  }
  return out;
}

/** The coupling graph and its colour layers, built once per challenge and reused per instance. */
export interface CompiledLattice {
  graph: Graph;
  colourLayers: Edge[][];
}

export function compileLattice(spec: ChallengeSpec): CompiledLattice {
  const graph = buildLattice(spec.lattice);
  return { graph, colourLayers: edgeColouring(graph.n, graph.edges) };
}

/** Compile one instance. Pass `lattice` (compileLattice) when compiling many instances. */
export function compileInstance(spec: ChallengeSpec, instance: Instance, lattice?: CompiledLattice): CompiledCircuit {
  const c = spec.circuit;
  if (c.family === 'gates') {
    const gates: Gate[] = c.gates.map((g) =>
      g.params && g.params.length ? { name: g.name, qubits: [...g.qubits], params: [...g.params] } : { name: g.name, qubits: [...g.qubits] },
    );
    return { nQubits: c.qubits, gates, layers: detectLayers(gates) };
  }
  if (instance.params.family !== 'kicked-ising') throw new Error(`instance ${instance.id} is not a kicked-ising instance`);
  const lat = lattice ?? compileLattice(spec);
  return kickedIsing(lat.graph.n, lat.colourLayers, instance.params);
}

/**
 * Split a flat gate list into layers: maximal runs of consecutive gates on disjoint qubits; a run
 * made only of rx gates is an 'rx' layer, only of rzz gates an 'rzz' layer, anything else
 * 'generic'. A gate of a different kind ends an rx or rzz run.
 */
export function detectLayers(gates: readonly Gate[]): Layer[] {
  const layers: Layer[] = [];
  const kindOf = (name: GateName): Layer['kind'] => (name === 'rx' ? 'rx' : name === 'rzz' ? 'rzz' : 'generic');
  let start = 0;
  let kind: Layer['kind'] | null = null;
  let busy = new Set<number>();
  for (let i = 0; i < gates.length; i++) {
    const g = gates[i];
    const k = kindOf(g.name);
    const overlaps = g.qubits.some((q) => busy.has(q));
    const kindBreak = kind !== null && k !== kind;
    if (kind !== null && (overlaps || kindBreak)) {
      layers.push({ kind, start, end: i });
      start = i;
      kind = null;
      busy = new Set();
    }
    if (kind === null) kind = k;
    for (const q of g.qubits) busy.add(q);
  }
  if (kind !== null) layers.push({ kind, start, end: gates.length });
  return layers;
}

export interface GateCounts {
  total: number;
  oneQubit: number;
  twoQubit: number;
  byName: Partial<Record<GateName, number>>;
  /** ASAP depth: the longest chain of gates that share qubits (every gate counts 1) */
  depth: number;
  /** ASAP depth counting two-qubit gates only */
  twoQubitDepth: number;
}

export function gateCounts(c: CompiledCircuit): GateCounts {
  const byName: Partial<Record<GateName, number>> = {};
  let one = 0;
  let two = 0;
  const level = new Int32Array(c.nQubits);
  const level2 = new Int32Array(c.nQubits);
  let depth = 0;
  let depth2 = 0;
  for (const g of c.gates) {
    byName[g.name] = (byName[g.name] ?? 0) + 1;
    if (GATE_ARITY[g.name] === 2) {
      two++;
      const [a, b] = g.qubits;
      const d = Math.max(level[a], level[b]) + 1;
      level[a] = level[b] = d;
      const d2 = Math.max(level2[a], level2[b]) + 1;
      level2[a] = level2[b] = d2;
      if (d > depth) depth = d;
      if (d2 > depth2) depth2 = d2;
    } else {
      one++;
      const q = g.qubits[0];
      const d = ++level[q];
      if (d > depth) depth = d;
    }
  }
  return { total: c.gates.length, oneQubit: one, twoQubit: two, byName, depth, twoQubitDepth: depth2 };
}

/**
 * Gate counts of a kicked-ising instance without building the gate list:
 * steps * n RX gates and steps * |E| RZZ gates (use gateCounts on the compiled circuit for depth).
 */
export function kickedIsingGateTotals(n: number, edges: number, steps: number): { rx: number; rzz: number; total: number } {
  return { rx: steps * n, rzz: steps * edges, total: steps * (n + edges) };
}
