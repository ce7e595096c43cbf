/**
 * Pauli propagation throughput on a ~100-qubit heavy-hex kicked-Ising circuit (PHYSICS.md).
 * Run: node --import tsx --expose-gc bench/pauli-propagation.bench.ts [--quick]
 *
 * 20 steps of RX(pi/16) on every qubit then RZZ(-pi/2) on every edge (colour layers), single-site
 * Z in the middle of the patch, truncation thresholds 1e-3, 1e-4, 1e-5 after every gate.
 */
import type { CompiledCircuit, Gate, Layer } from '../shared/physics/circuit';
import { propagate } from '../shared/physics/pauli-propagation';

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
const quick = process.argv.includes('--quick');
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
let worstRate = Infinity;
const deltas = quick ? [1e-3, 1e-4] : [1e-3, 1e-4, 1e-5];
for (const delta of deltas) {
  gc?.();
  const heap0 = process.memoryUsage();
  const r = propagate(circuit, observable, { delta });
  const heap1 = process.memoryUsage();
  const rate = r.updates / (r.wallMs / 1000);
  if (delta <= 1e-4) worstRate = Math.min(worstRate, rate); // the target is stated for 1e-4 and 1e-5
  const rssPerTerm = (heap1.arrayBuffers - heap0.arrayBuffers) / Math.max(1, r.terms);
  console.log(
    [
      `delta ${delta.toExponential(0)}:`,
      `value ${r.value.toFixed(8)}`,
      `terms ${r.terms}`,
      `peak ${r.peakTerms}`,
      `updates ${r.updates.toExponential(3)}`,
      `time ${(r.wallMs / 1000).toFixed(2)} s`,
      `rate ${rate.toExponential(3)} updates/s`,
      `storage ${r.bytesPerTerm.toFixed(1)} B/term at peak (array buffers after run: ${rssPerTerm.toFixed(1)} B/final term)`,
      `dropped ${r.droppedTerms} terms, weight ${r.droppedWeight.toExponential(3)}`,
    ].join('  '),
  );
}
const verdict = worstRate >= TARGET ? 'PASS' : 'MISS';
console.log(
  `target >= 5e7 updates/s on one core; the rate of a plain C implementation measured on this machine kind ` +
    `(PHYSICS.md: 2e7 to 9e7): measured ${worstRate.toExponential(3)} (worst of delta 1e-4, 1e-5): ${verdict}`,
);
