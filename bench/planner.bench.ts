/**
 * Reference planner speed: plan every target of 1,000-target challenges (cold planner: lattice,
 * edge colouring and cone caches built inside the timed region; validation outside it).
 * Run: node --import tsx bench/planner.bench.ts
 * Target (brief): < 1000 ms per 1,000-target challenge, on the first (cold) run. Exits 1 on a MISS.
 * Short form (BENCH_SHORT=1): the same challenges, one run each (the target is the cold run).
 */
import { loadChallenge, type ChallengeSpec, type GateJson } from '../shared/physics/challenge';
import { compileLattice } from '../shared/physics/compile';
import { Planner } from '../shared/physics/planner';

const TARGET_MS = 1000;
const HALF_PI = Math.PI / 2;
const grid = (k: number, hi: number) => Array.from({ length: k }, (_, i) => (hi * i) / (k - 1));

function spec(id: string, lattice: ChallengeSpec['lattice'], circuit: ChallengeSpec['circuit'], observables: ChallengeSpec['observables']): ChallengeSpec {
  return { id, version: 1, title: id, description: '', lattice, circuit, observables };
}

const cases: ChallengeSpec[] = [];
// heavy-hex 13 x 14 cells = 1017 qubits; 10 steps x 10 thetaH x (9 single-site observables + the
// 1,017-term magnetisation)
cases.push(
  spec('heavy-hex-1017', { kind: 'heavy-hex', rows: 13, cols: 14 },
    { family: 'kicked-ising', steps: [1, 2, 3, 4, 5, 6, 8, 10, 15, 20], thetaH: grid(10, HALF_PI) },
    [
      ...Array.from({ length: 9 }, (_, i) => (i % 3 === 2 ? { id: `x${i * 97}`, pauli: `X${i * 97}` } : { id: `z${i * 97}`, pauli: `Z${i * 97}` })),
      { id: 'mz', terms: Array.from({ length: 1017 }, (_, i) => ({ coef: 1 / 1017, pauli: `Z${i}` })) },
    ]),
);
// 1000-site chain with magnetisation sums (1,000 terms each): free-fermion and term bounds per term
cases.push(
  spec('chain-1000', { kind: 'chain', n: 1000 },
    { family: 'kicked-ising', steps: [1, 2, 3, 4, 5, 6, 8, 10, 15, 20], thetaH: grid(10, HALF_PI) },
    [
      { id: 'mz', terms: Array.from({ length: 1000 }, (_, i) => ({ coef: 1 / 1000, pauli: `Z${i}` })) },
      { id: 'mx', terms: Array.from({ length: 1000 }, (_, i) => ({ coef: 1 / 1000, pauli: `X${i}` })) },
      ...Array.from({ length: 8 }, (_, i) => ({ id: `zz${i}`, pauli: `Z${100 * i + 50} Z${100 * i + 51}` })),
    ]),
);
// gates family: a 20-layer generic circuit on a 10 x 10 grid, 1,000 observables (one instance)
{
  const lat = compileLattice({ lattice: { kind: 'square', rows: 10, cols: 10 } } as ChallengeSpec);
  const gates: GateJson[] = [];
  for (let layer = 0; layer < 20; layer++) {
    for (let q = 0; q < 100; q++) gates.push({ name: layer % 2 ? 'ry' : 'rx', qubits: [q], params: [0.1 + 0.01 * q] });
    for (const [a, b] of lat.colourLayers[layer % 4]) gates.push({ name: 'cz', qubits: [a, b] });
  }
  const obs: ChallengeSpec['observables'] = [];
  for (let a = 0; a < 100; a++) for (let k = 0; k < 10; k++) obs.push({ id: `o${a}-${k}`, pauli: k === 0 ? `Z${a}` : `Z${a} X${(a + k * 7) % 100 === a ? (a + 1) % 100 : (a + k * 7) % 100}` });
  cases.push(spec('square-gates', { kind: 'square', rows: 10, cols: 10 }, { family: 'gates', qubits: 100, gates }, obs));
}

let missed = 0;
for (const s of cases) {
  const c = loadChallenge(s);
  const runs: number[] = [];
  let summary = '';
  for (let rep = 0; rep < (process.env.BENCH_SHORT === '1' ? 1 : 3); rep++) {
    const t0 = performance.now();
    const planner = new Planner(c);
    const plans = planner.planAll();
    runs.push(performance.now() - t0);
    const by: Record<string, number> = {};
    for (const p of plans) by[p.method ?? 'none'] = (by[p.method ?? 'none'] ?? 0) + 1;
    summary = Object.entries(by).map(([m, k]) => `${m} ${k}`).join(', ');
  }
  const first = runs[0];
  const best = Math.min(...runs);
  const ok = first < TARGET_MS;
  if (!ok) missed++;
  console.log(
    `${s.id}: ${c.targets.length} targets, ${c.nQubits} qubits: first (cold JIT) ${first.toFixed(0)} ms, best ${best.toFixed(0)} ms ` +
      `[target < ${TARGET_MS} ms] ${ok ? 'PASS' : 'MISS'}  (${summary})`,
  );
}
process.exit(missed ? 1 : 0);
