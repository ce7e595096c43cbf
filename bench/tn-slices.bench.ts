/**
 * One sliced tensor-network contraction on 1 and on 2 slice threads (issue 15): a weight-15 X/Y/Z
 * string on a 106-qubit heavy-hex patch after 5 kicked-Ising steps (thetaJ 0.3, so no Clifford
 * simplification), planned under a memory budget two below its unsliced width, which gives 8
 * or more slices (2^35 flops). Prints wall and CPU time of each, the speed-up and the values (identical: the
 * blocks are summed in the same order). Target: the values are equal, and with at least two cores
 * the speed-up of 2 threads is at least 1.4x, judged when the machine's load before the runs left
 * a core free for the second thread (load average below cores - 0.5); on a busier machine the
 * figure is printed and marked not judged. CPU time over wall time says how many cores were busy.
 * Short form: the same (one run each).
 * Run: node --import tsx bench/tn-slices.bench.ts
 */
import { availableParallelism, loadavg } from 'node:os';
import type { PauliFactor } from '../shared/physics/circuit';
import { heavyHex, edgeColouring } from '../shared/physics/lattices';
import { graphBall } from '../shared/physics/light-cone';
import { kickedIsing } from '../shared/physics/kicked-ising';
import { planTerm } from '../shared/physics/tensor-network/index';
import { SliceThreads } from '../server/jobs/slice-threads';

const g = heavyHex(3, 5);
const c = kickedIsing(g.n, edgeColouring(g.n, g.edges), { steps: 5, thetaH: 0.7, thetaJ: 0.3 });
let qs = [20];
for (let r = 1; qs.length < 15; r++) qs = graphBall(g.n, g.edges, [20], r);
const factors: PauliFactor[] = qs.slice(0, 15).map((qubit, i) => ({ qubit, op: (['X', 'Y', 'Z'] as const)[i % 3] }));
const full = planTerm(c, factors, { memoryBytes: 2 ** 40 });
const plan = planTerm(c, factors, { memoryBytes: 96 * 2 ** (full.width - 2) });
console.log(`heavy-hex 106q, 5 steps, weight-15 X/Y/Z: cone ${plan.coneQubits} qubits, unsliced width ${full.width}; width ${plan.width}, 2^${Math.log2(plan.flops).toFixed(1)} flops, ${plan.slices} slices; ${availableParallelism()} cores, load ${loadavg()[0].toFixed(1)}`);
if (plan.slices < 8) {
  console.log('MISS: the memory budget should have cut the plan into 8 or more slices');
  process.exit(1);
}
const load0 = loadavg()[0];
const pools = [new SliceThreads(1), new SliceThreads(2)];
// start the threads (their TypeScript loader) before timing
pools[1].contract(planTerm(c, [{ qubit: 24, op: 'Z' }], { memoryBytes: 96 * 2 ** 8 }));
const rows: { threads: number; wall: number; cpu: number; value: number }[] = [];
for (const [k, pool] of pools.entries()) {
  const t0 = performance.now();
  const cpu0 = process.cpuUsage();
  const [value] = pool.contract(plan);
  const u = process.cpuUsage(cpu0);
  rows.push({ threads: k + 1, wall: (performance.now() - t0) / 1000, cpu: (u.user + u.system) / 1e6, value });
}
for (const r of rows) console.log(`  ${r.threads} thread(s): wall ${r.wall.toFixed(2)} s, CPU ${r.cpu.toFixed(2)} s (${(r.cpu / r.wall).toFixed(2)} cores busy), value ${r.value}`);
const speedup = rows[0].wall / rows[1].wall;
const equal = rows[0].value === rows[1].value;
const judged = availableParallelism() >= 2 && load0 < availableParallelism() - 0.5;
const fast = !judged || speedup >= 1.4;
console.log(`  speed-up 2 threads / 1: ${speedup.toFixed(2)}x [target: >= 1.4x] ${judged ? (fast ? 'PASS' : 'MISS') : `not judged (load ${load0.toFixed(1)} on ${availableParallelism()} cores)`}; values equal: ${equal} [target: equal] ${equal ? 'PASS' : 'MISS'}`);
await Promise.all(pools.map((p) => p.close()));
if (!equal || !fast) process.exit(1);
