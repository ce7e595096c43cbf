/**
 * Pauli propagation throughput on a ~100-qubit heavy-hex kicked-Ising circuit (PHYSICS.md).
 * Run: node --import tsx --expose-gc bench/pauli-propagation.bench.ts [--quick]
 * Exits 1 when the rate per CPU second misses the target (the wall-clock rate is printed beside it;
 * on a shared machine it measures the neighbours too). --quick, or the short form (BENCH_SHORT=1):
 * the same circuit, thresholds 1e-3 and 1e-4 only (1e-5 and 1e-6 take most of the time).
 *
 * 20 steps of RX(pi/16) on every qubit then RZZ(-pi/2) on every edge (colour layers), single-site
 * Z in the middle of the patch, truncation thresholds 1e-3, 1e-4, 1e-5 after every gate.
 */
import type { CompiledCircuit, Gate, Layer } from '../shared/physics/circuit';
import { cpus, loadavg } from 'node:os';
import { lightCone } from '../shared/physics/light-cone';
import { propagate } from '../shared/physics/pauli-propagation';
import { PROPAGATION_RATE } from '../shared/physics/planner/rates';
import { checkRate } from './rate-check';

type Edge = [number, number];

/** Heavy-hex patch: `rows` rows of `len` qubits joined by bridge qubits every 4 columns (offset 0 / 2 alternating). */
function heavyHex(rows: number, len: number): { n: number; edges: Edge[]; rowQubit: (r: number, c: number) => number } {
  const edges: Edge[] = [];
  const id = (r: number, c: number) => r * len + c;
  for (let r = 0; r < rows; r++) for (let c = 0; c + 1 < len; c++) edges.push([id(r, c), id(r, c + 1)]);
  let n = rows * len;
  for (let r = 0; r + 1 < rows; r++) {
    for (let c = r % 2 === 0 ? 0 : 2; c < len; c += 4) {
      const br = n++;
      edges.push([id(r, c), br], [br, id(r + 1, c)]);
    }
  }
  return { n, edges, rowQubit: id };
}

function kickedIsing(n: number, edges: Edge[], steps: number, thetaH: number, thetaJ = -Math.PI / 2): CompiledCircuit {
  const colour: number[] = [];
  const used: Set<number>[] = Array.from({ length: n }, () => new Set<number>());
  for (const [a, b] of edges) {
    let c = 0;
    while (used[a].has(c) || used[b].has(c)) c++;
    colour.push(c);
    used[a].add(c);
    used[b].add(c);
  }
  const nc = Math.max(...colour) + 1;
  const gates: Gate[] = [];
  const layers: Layer[] = [];
  for (let s = 0; s < steps; s++) {
    const st = gates.length;
    for (let q = 0; q < n; q++) gates.push({ name: 'rx', qubits: [q], params: [thetaH] });
    layers.push({ kind: 'rx', start: st, end: gates.length });
    for (let c = 0; c < nc; c++) {
      const s0 = gates.length;
      edges.forEach(([a, b], k) => { if (colour[k] === c) gates.push({ name: 'rzz', qubits: [a, b], params: [thetaJ] }); });
      layers.push({ kind: 'rzz', start: s0, end: gates.length });
    }
  }
  return { nQubits: n, gates, layers };
}

const TARGET = 5e7;
const quick = process.argv.includes('--quick') || process.env.BENCH_SHORT === '1';
const hh = heavyHex(6, 14);
const steps = 20;
const circuit = kickedIsing(hh.n, hh.edges, steps, Math.PI / 16);
const mid = hh.rowQubit(2, 7);
const observable = { id: `Z${mid}`, terms: [{ coef: 1, factors: [{ qubit: mid, op: 'Z' as const }] }] };
console.log(`heavy-hex patch: ${hh.n} qubits, ${hh.edges.length} edges; ${steps} kicked-Ising steps, thetaH = pi/16, thetaJ = -pi/2; observable Z${mid}; ${circuit.gates.length} gates`);

const gc = (globalThis as { gc?: () => void }).gc;
// warm-up (JIT), not reported
for (let k = 0; k < 4; k++) propagate(circuit, observable, { delta: 1e-4 });
propagate(circuit, observable, { delta: 1e-5 });
gc?.();

// Each threshold is repeated (at least 3 times and 1 s of wall time); the rate is the median over
// repetitions of updates / wall time, and also total updates / total CPU time of the process
// (the machine may be shared: the CPU figure is what the code itself costs).
const median = (xs: number[]) => [...xs].sort((p, q) => p - q)[Math.floor(xs.length / 2)];
let worstWall = Infinity;
let worstCpu = Infinity;
const deltas = quick ? [1e-3, 1e-4] : [1e-3, 1e-4, 1e-5, 1e-6];
for (const delta of deltas) {
  const wall: number[] = [];
  let r = propagate(circuit, observable, { delta });
  let totalUpdates = 0;
  let spent = 0;
  const c0 = process.cpuUsage();
  while (wall.length < (delta < 1e-5 ? 1 : 3) || (spent < 1000 && delta >= 1e-5)) {
    r = propagate(circuit, observable, { delta });
    wall.push(r.updates / (r.wallMs / 1000));
    totalUpdates += r.updates;
    spent += r.wallMs;
  }
  const c = process.cpuUsage(c0);
  const REPS = wall.length;
  const wallRate = median(wall);
  const cpuRate = totalUpdates / ((c.user + c.system) / 1e6);
  if (delta <= 1e-4 && delta >= 1e-5) {
    // the target is stated for 1e-4 and 1e-5
    worstWall = Math.min(worstWall, wallRate);
    worstCpu = Math.min(worstCpu, cpuRate);
  }
  console.log(
    [
      `delta ${delta.toExponential(0)}${delta < 1e-5 ? ' (information only, large N)' : ''}:`,
      `value ${r.value.toFixed(8)}`,
      `terms ${r.terms}`,
      `peak ${r.peakTerms}`,
      `updates ${r.updates.toExponential(3)}`,
      `time ${(r.wallMs / 1000).toFixed(3)} s`,
      `rate ${wallRate.toExponential(3)} updates/s wall (median of ${REPS}; best ${Math.max(...wall).toExponential(3)}), ${cpuRate.toExponential(3)} per CPU second`,
      `storage ${r.bytesPerTerm.toFixed(1)} B/term at peak (${(r.peakStorageBytes / 1e6).toFixed(2)} MB)`,
      `dropped ${r.droppedTerms} terms, weight ${r.droppedWeight.toExponential(3)}`,
    ].join('  '),
  );
}
console.log(`process: rss ${(process.memoryUsage().rss / 1e6).toFixed(0)} MB; machine load average ${loadavg().map((x) => x.toFixed(1)).join(' ')} on ${cpus().length} cores`);
const verdict = (x: number) => (x >= TARGET ? 'PASS' : 'MISS');
console.log(
  `target >= 5e7 updates/s on one core; the rate of a plain C implementation measured on this machine kind ` +
    `(PHYSICS.md: 2e7 to 9e7): worst of delta 1e-4, 1e-5: ${worstWall.toExponential(3)} wall ${verdict(worstWall)}; ` +
    `${worstCpu.toExponential(3)} per CPU second ${verdict(worstCpu)}`,
);
if (!(worstCpu >= TARGET)) process.exitCode = 1;

// Planner calibration (shared/physics/planner/rates.ts PROPAGATION_RATE): the planner's unit is a
// term-gate update at every kept gate of the cone, Clifford ones included. The cone (light-cone.ts,
// as the runner restricts it) is propagated one step at a time at delta 1e-5, so the terms held at
// each step's Clifford gates (its count on entry: Clifford maps drop nothing) add to the engine's
// updates at the rotations; rate = those updates / the steps' wall time (median of 3 runs).
{
  const cone = lightCone(circuit, observable);
  const perStep = circuit.gates.length / steps;
  const chunks: Gate[][] = Array.from({ length: steps }, () => []);
  cone.keptGates.forEach((gi, k) => chunks[Math.floor(gi / perStep)].push(cone.circuit.gates[k]));
  const rates: number[] = [];
  for (let rep = 0; rep < 3; rep++) {
    let obs = cone.observable!;
    let updates = 0;
    let ms = 0;
    for (let s = steps - 1; s >= 0; s--) {
      const gates = chunks[s];
      const clifford = gates.filter((g) => g.name !== 'rx').length;
      const r = propagate({ nQubits: cone.circuit.nQubits, gates, layers: [] }, obs, { delta: 1e-5, returnTerms: true });
      updates += obs.terms.length * clifford + r.updates;
      ms += r.wallMs;
      obs = { id: obs.id, terms: r.finalTerms! };
    }
    rates.push(updates / (ms / 1000));
  }
  console.log(`planner calibration: cone ${cone.qubits.length} qubits, ${cone.keptGates.length} gates, delta 1e-5, step by step: ${rates.map((r) => r.toExponential(2)).join(', ')} term-gate updates/s`);
  if (!checkRate('PROPAGATION_RATE', PROPAGATION_RATE, median(rates), 'term-gate updates/s')) process.exit(1);
}
