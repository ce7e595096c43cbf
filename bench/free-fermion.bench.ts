/**
 * Free-fermion solver speed against its own cost model: wall time of freeFermionExpectation on
 * open chains against freeFermionCost's operation count (the planner's estimate of the method).
 * Run: node --import tsx bench/free-fermion.bench.ts
 * Target: the measured multiply-adds per second within RATE_TOLERANCE (3x) of the planner's
 * FREE_FERMION_RATE (shared/physics/planner/rates.ts). Exits 1 on a FAIL.
 */
import type { ObservableSpec } from '../shared/physics/circuit';
import { freeFermionCost, freeFermionExpectation } from '../shared/physics/free-fermion';
import { FREE_FERMION_RATE } from '../shared/physics/planner/rates';
import { checkRate } from './rate-check';

const magnetisation = (n: number, op: 'Z' | 'X'): ObservableSpec => ({ id: `m${op}`, terms: Array.from({ length: n }, (_, q) => ({ coef: 1 / n, factors: [{ qubit: q, op }] })) });
const cases: { label: string; n: number; steps: number; obs: ObservableSpec; lightCone: boolean }[] = [
  { label: 'chain 1000, 20 steps, mean Z', n: 1000, steps: 20, obs: magnetisation(1000, 'Z'), lightCone: true },
  { label: 'chain 1000, 40 steps, mean X', n: 1000, steps: 40, obs: magnetisation(1000, 'X'), lightCone: true },
  { label: 'chain 120, 10 steps, mean Z, whole chain', n: 120, steps: 10, obs: magnetisation(120, 'Z'), lightCone: false },
  { label: 'chain 400, 30 steps, Z200', n: 400, steps: 30, obs: { id: 'z', terms: [{ coef: 1, factors: [{ qubit: 200, op: 'Z' }] }] }, lightCone: false },
];
const rates: number[] = [];
for (const c of cases) {
  const spec = { n: c.n, thetaJ: -0.9, thetaH: 0.7, steps: c.steps };
  const cost = freeFermionCost(spec, c.obs, { lightCone: c.lightCone })!;
  freeFermionExpectation(spec, c.obs, { lightCone: c.lightCone }); // warm-up (JIT)
  const times: number[] = [];
  for (let rep = 0; rep < 3; rep++) {
    const t0 = performance.now();
    const r = freeFermionExpectation(spec, c.obs, { lightCone: c.lightCone });
    times.push(performance.now() - t0);
    if (!r.ok) throw new Error(r.reason);
  }
  const ms = [...times].sort((a, b) => a - b)[1];
  const rate = cost.operations / (ms / 1000);
  rates.push(rate);
  console.log(`${c.label.padEnd(42)} ${cost.operations.toExponential(2)} operations (cost model), ${ms.toFixed(1)} ms (median of 3): ${rate.toExponential(2)} per second`);
}
const median = [...rates].sort((a, b) => a - b)[Math.floor(rates.length / 2)];
process.exit(checkRate('FREE_FERMION_RATE', FREE_FERMION_RATE, median, 'multiply-adds/s') ? 0 : 1);
