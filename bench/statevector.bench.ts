/**
 * Statevector engine speed against a plain copy of the same state (same arrays, same run).
 * Run: node --import tsx --expose-gc bench/statevector.bench.ts
 * Targets: one single-qubit gate pass over 2^24 amplitudes <= 1.3 x copy;
 * a whole kicked-Ising step on a 24-qubit chain (24 RX + 23 RZZ) <= 0.6 x 47 copy times.
 */
import type { CompiledCircuit, Gate } from '../shared/physics/circuit';
import { Statevector, gateMatrix, statevectorBytes } from '../shared/physics/statevector';

const N_QUBITS = 24;
const gc = (globalThis as { gc?: () => void }).gc;

function timeIt(fn: () => void, reps: number): { min: number; median: number } {
  fn(); // warm-up (JIT, page faults)
  const t: number[] = [];
  for (let i = 0; i < reps; i++) {
    const t0 = performance.now();
    fn();
    t.push(performance.now() - t0);
  }
  t.sort((a, b) => a - b);
  return { min: t[0], median: t[Math.floor(t.length / 2)] };
}

function step(n: number, thetaJ: number, thetaH: number): CompiledCircuit {
  const gates: Gate[] = [];
  for (let q = 0; q < n; q++) gates.push({ name: 'rx', qubits: [q], params: [thetaH] });
  const start = gates.length;
  for (let q = 0; q + 1 < n; q++) gates.push({ name: 'rzz', qubits: [q, q + 1], params: [thetaJ] });
  return { nQubits: n, gates, layers: [{ kind: 'rx', start: 0, end: start }, { kind: 'rzz', start, end: gates.length }] };
}

const fmt = (x: number) => x.toFixed(1).padStart(7);
const verdict = (ok: boolean) => (ok ? 'PASS' : 'MISS');

const t00 = performance.now();
const sv = new Statevector(N_QUBITS);
// a generic state so nothing is trivially zero
sv.apply(step(N_QUBITS, 0.7, 0.4));
const copy = new Float64Array(sv.data.length);
gc?.();
console.log(`statevector bench: ${N_QUBITS} qubits, 2^${N_QUBITS} amplitudes, ${statevectorBytes(N_QUBITS) / 2 ** 20} MiB per state (complex128, interleaved Float64Array)`);

const REPS = 7;
const tCopy = timeIt(() => copy.set(sv.data), REPS);
console.log(`plain copy (TypedArray.set)        ${fmt(tCopy.median)} ms median (${fmt(tCopy.min)} min)  = ${((2 * statevectorBytes(N_QUBITS)) / (tCopy.median * 1e6)).toFixed(1)} GB/s read+write`);
const copyMs = tCopy.median;

let allPass = true;
const rxm = gateMatrix({ name: 'rx', qubits: [0], params: [0.37] });
const hm = gateMatrix({ name: 'h', qubits: [0] });
for (const q of [0, 12, 23]) {
  for (const [label, m] of [['rx', rxm], ['h (general kernel)', hm]] as const) {
    const t = timeIt(() => sv.applyMatrix(q, m), REPS);
    const ratio = t.median / copyMs;
    const ok = ratio <= 1.3;
    allPass &&= ok;
    console.log(`1-qubit ${label.padEnd(18)} on q${String(q).padEnd(2)} ${fmt(t.median)} ms median  ratio ${ratio.toFixed(2)} x copy  (target <= 1.30)  ${verdict(ok)}`);
  }
}

const ki = step(N_QUBITS, 0.7, 0.4);
const tStep = timeIt(() => sv.apply(ki), 5);
const stepRatio = tStep.median / copyMs;
const stepOk = stepRatio <= 0.6 * 47;
allPass &&= stepOk;
console.log(`kicked-Ising step (24 RX + 23 RZZ, fused, layered) ${fmt(tStep.median)} ms median  ratio ${stepRatio.toFixed(2)} x copy  (target <= ${(0.6 * 47).toFixed(1)})  ${verdict(stepOk)}`);
const flat: CompiledCircuit = { ...ki, layers: [] };
const tFlat = timeIt(() => sv.apply(flat), 3);
const flatRatio = tFlat.median / copyMs;
console.log(`kicked-Ising step, flat gate list (no layer hints) ${fmt(tFlat.median)} ms median  ratio ${flatRatio.toFixed(2)} x copy  (target <= ${(0.6 * 47).toFixed(1)})  ${verdict(flatRatio <= 0.6 * 47)}`);
const tPlain = timeIt(() => sv.apply(ki, { noFusion: true }), 1);
console.log(`kicked-Ising step, unfused (47 passes, reference)  ${fmt(tPlain.median)} ms  ratio ${(tPlain.median / copyMs).toFixed(2)} x copy`);

// Largest light cone within 1 GiB and 60 s: an ESTIMATE from 16 bytes per amplitude and the measured
// step time, scaled by 2^(k-24) (memory-bound passes) and k/24 (gates per step), with t steps.
const stepMs24 = tStep.median;
const budgetBytes = 2 ** 30, budgetMs = 60_000;
const est = (k: number, t: number) => t * stepMs24 * 2 ** (k - N_QUBITS) * (k / N_QUBITS);
function largest(stepsFor: (k: number) => number): { k: number; ms: number; t: number } {
  let best = { k: 0, ms: 0, t: 0 };
  for (let k = 2; k <= 30; k++) {
    const t = stepsFor(k);
    const ms = est(k, t);
    if (statevectorBytes(k) <= budgetBytes && ms <= budgetMs) best = { k, ms, t };
  }
  return best;
}
const zCone = largest((k) => Math.ceil((k + 1) / 2)); // chain Z-site cone: k = 2t - 1 sites
const fixed20 = largest(() => 20);
console.log(`largest light cone within 1 GiB and 60 s (ESTIMATE, not measured at that size):`);
console.log(`  chain Z-site cone (k = 2t - 1): ${zCone.k} qubits, t = ${zCone.t}, ~${(zCone.ms / 1000).toFixed(1)} s, ${statevectorBytes(zCone.k) / 2 ** 20} MiB`);
console.log(`  any cone with 20 kicked-Ising steps: ${fixed20.k} qubits, ~${(fixed20.ms / 1000).toFixed(1)} s, ${statevectorBytes(fixed20.k) / 2 ** 20} MiB`);
console.log(`  (memory alone caps it at 26 qubits = 1 GiB; the default engine limit is 26)`);
console.log(`bench total ${((performance.now() - t00) / 1000).toFixed(1)} s; ${allPass ? 'all targets PASS' : 'some targets MISS'}`);
