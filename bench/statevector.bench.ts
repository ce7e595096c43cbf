/**
 * Statevector engine speed against a plain copy of the same state (same arrays, same run).
 * Run: node --import tsx --expose-gc bench/statevector.bench.ts. Exits 1 when a target of the
 * default (WebAssembly) engine is missed. Short form (BENCH_SHORT=1): the same 24-qubit state and
 * the same paired timings against the copy, with fewer repetitions (3 instead of 7 per gate, 3
 * instead of 5 per step), and without the plain JavaScript engine (for comparison only, no targets).
 * Targets (brief): one single-qubit gate pass over 2^24 amplitudes <= 1.3 x copy;
 * a whole kicked-Ising step on a 24-qubit chain (24 RX + 23 RZZ) <= 0.6 x 47 copy times.
 *
 * The copy is TypedArray.prototype.set (memcpy speed, about 19-21 GB/s here, the figure in
 * PHYSICS.md). Each timing is interleaved with a copy timing; the ratio is the median over the
 * repetitions of (time / the copy just before it), which holds up when other processes share the
 * CPU; the min/min ratio is printed as well.
 */
import type { CompiledCircuit, Gate } from '../shared/physics/circuit';
import { Statevector, gateMatrix, statevectorBytes, type Mat2 } from '../shared/physics/statevector';
import { STATEVECTOR_RATE } from '../shared/physics/planner/rates';
import { checkRate } from './rate-check';

const N_QUBITS = 24;
const gc = (globalThis as { gc?: () => void }).gc;
const t00 = performance.now();

function step(n: number, thetaJ: number, thetaH: number, layers: boolean): CompiledCircuit {
  const gates: Gate[] = [];
  for (let q = 0; q < n; q++) gates.push({ name: 'rx', qubits: [q], params: [thetaH] });
  const start = gates.length;
  for (let q = 0; q + 1 < n; q++) gates.push({ name: 'rzz', qubits: [q, q + 1], params: [thetaJ] });
  return { nQubits: n, gates, layers: layers ? [{ kind: 'rx', start: 0, end: start }, { kind: 'rzz', start, end: gates.length }] : [] };
}

interface Timing { min: number; median: number; copyMin: number; copyMedian: number; pairedRatio: number }

/** Alternate fn and a copy of the same state, reps times each (after one warm-up of each). */
function timeVsCopy(sv: Statevector, copy: Float64Array, fn: () => void, reps: number): Timing {
  const doCopy = () => copy.set(sv.data);
  fn();
  doCopy();
  const a: number[] = [], c: number[] = [];
  for (let i = 0; i < reps; i++) {
    let t0 = performance.now();
    doCopy();
    c.push(performance.now() - t0);
    t0 = performance.now();
    fn();
    a.push(performance.now() - t0);
  }
  const med = (x: number[]) => [...x].sort((p, q) => p - q)[Math.floor(x.length / 2)];
  return { min: Math.min(...a), median: med(a), copyMin: Math.min(...c), copyMedian: med(c), pairedRatio: med(a.map((x, i) => x / c[i])) };
}

const fmt = (x: number) => x.toFixed(1).padStart(7);
let allPass = true;
function report(label: string, t: Timing, target: number, counts = true): number {
  const ratio = t.pairedRatio;
  const ratioMin = t.min / t.copyMin;
  const ok = ratio <= target;
  if (counts) allPass &&= ok;
  console.log(
    `${label.padEnd(52)} ${fmt(t.min)} ms min ${fmt(t.median)} ms med | copy ${fmt(t.copyMin)} min ${fmt(t.copyMedian)} med | ratio ${ratio.toFixed(2)} x copy (paired median; min/min ${ratioMin.toFixed(2)}), target <= ${target.toFixed(2)}  ${ok ? 'PASS' : 'MISS'}`,
  );
  return ratio;
}

console.log(`statevector bench: ${N_QUBITS} qubits, 2^${N_QUBITS} amplitudes, ${statevectorBytes(N_QUBITS) / 2 ** 20} MiB per state (complex128, interleaved)`);
const results: Record<string, number> = {};
let stepMs = 0;
let stepMedianMs = 0;
const SHORT = process.env.BENCH_SHORT === '1';
for (const engine of SHORT ? (['wasm'] as const) : (['wasm', 'js'] as const)) {
  const sv = new Statevector(N_QUBITS, { engine });
  sv.apply(step(N_QUBITS, 0.7, 0.4, true)); // a generic state
  const copy = new Float64Array(sv.data.length);
  gc?.();
  const main = engine === 'wasm';
  console.log(`\n--- engine: ${sv.engine}${main ? ' (default: WebAssembly SIMD kernels)' : ' (plain typed-array fallback, for comparison; targets not counted)'} ---`);
  const rxm = gateMatrix({ name: 'rx', qubits: [0], params: [0.37] });
  const hm = gateMatrix({ name: 'h', qubits: [0] });
  const reps = main ? (SHORT ? 3 : 7) : 3;
  for (const q of [0, 12, 23]) {
    for (const [label, m] of [['RX', rxm], ['H (general 2x2 kernel)', hm]] as [string, Mat2][]) {
      const t = timeVsCopy(sv, copy, () => sv.applyMatrix(q, m), reps);
      results[`${engine} ${label} q${q}`] = report(`1-qubit ${label} on q${q}`, t, 1.3, main);
    }
  }
  const ki = step(N_QUBITS, 0.7, 0.4, true);
  const t = timeVsCopy(sv, copy, () => sv.apply(ki), main ? (SHORT ? 3 : 5) : 2);
  if (main) {
    stepMs = t.min;
    stepMedianMs = t.median;
  }
  report('kicked-Ising step, 24 RX + 23 RZZ (layered)', t, 0.6 * 47, main);
  if (main) {
    report('kicked-Ising step, flat gate list (no layer hints)', timeVsCopy(sv, copy, () => sv.apply(step(N_QUBITS, 0.7, 0.4, false)), 3), 0.6 * 47, true);
    report('kicked-Ising step, unfused (47 passes; reference)', timeVsCopy(sv, copy, () => sv.apply(ki, { noFusion: true }), 1), 47, false);
  }
  gc?.();
}

// Largest light cone within 1 GiB and 60 s: an ESTIMATE from 16 bytes per amplitude and the
// measured 24-qubit step time, scaled by 2^(k-24) (the passes are memory-bound) and by k/24 (gates
// per step), times the step count t.
const budgetBytes = 2 ** 30, budgetMs = 60_000;
const est = (k: number, t: number) => t * stepMs * 2 ** (k - N_QUBITS) * (k / N_QUBITS);
function largest(stepsFor: (k: number) => number): { k: number; ms: number; t: number } {
  let best = { k: 0, ms: 0, t: 0 };
  for (let k = 2; k <= 30; k++) {
    const t = stepsFor(k);
    const ms = est(k, t);
    if (statevectorBytes(k) <= budgetBytes && ms <= budgetMs) best = { k, ms, t };
  }
  return best;
}
const zCone = largest((k) => Math.ceil((k + 1) / 2));
const fixed20 = largest(() => 20);
console.log(`\nlargest light cone within 1 GiB and 60 s (ESTIMATE from ${stepMs.toFixed(0)} ms per 24-qubit step and 16 B per amplitude; not measured at that size):`);
console.log(`  chain Z-site cone (k = 2t - 1 qubits after t steps): ${zCone.k} qubits (t = ${zCone.t}), ~${(zCone.ms / 1000).toFixed(1)} s, ${statevectorBytes(zCone.k) / 2 ** 20} MiB`);
console.log(`  a cone of k qubits after 20 steps: ${fixed20.k} qubits, ~${(fixed20.ms / 1000).toFixed(1)} s, ${statevectorBytes(fixed20.k) / 2 ** 20} MiB`);
console.log(`  (1 GiB alone caps any cone at 26 qubits, the engine's default limit)`);
console.log(`\nbench total ${((performance.now() - t00) / 1000).toFixed(1)} s; default engine: ${allPass ? 'all targets PASS' : 'some targets MISS'}`);
if (!allPass) process.exitCode = 1;

// Planner calibration (shared/physics/planner/rates.ts STATEVECTOR_RATE, amplitude-gate updates/s):
// the layered kicked-Ising step on the default (WebAssembly) kernel, 2^24 amplitudes x 47 gates /
// the step's median time.
const svRate = (2 ** N_QUBITS * (2 * N_QUBITS - 1)) / (stepMedianMs / 1000);
if (!checkRate('STATEVECTOR_RATE', STATEVECTOR_RATE, svRate, 'amplitude-gate updates/s')) process.exit(1);
