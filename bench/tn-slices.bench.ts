/**
 * One sliced tensor-network contraction on 1 and on 2 slice threads (issue 15): Z17 Z23 Z25 Z31 on
 * a 7 x 7 square lattice after 4 kicked-Ising steps (light cone 37 qubits), planned under a memory
 * budget of width 22, which gives 16 slices of 2^34.6 flops in all. Prints wall and CPU time of
 * each, the speed-up and the values (identical: the blocks are summed in the same order). The
 * speed-up is bounded by the cores free on the machine: CPU time over wall time says how many were.
 * Run: node --import tsx bench/tn-slices.bench.ts
 */
import { availableParallelism, loadavg } from 'node:os';
import { buildLattice, edgeColouring } from '../shared/physics/lattices';
import { kickedIsing } from '../shared/physics/kicked-ising';
import { planTerm } from '../shared/physics/tensor-network/index';
import { SliceThreads } from '../server/jobs/slice-threads';

const g = buildLattice({ kind: 'square', rows: 7, cols: 7 });
const c = kickedIsing(g.n, edgeColouring(g.n, g.edges), { steps: 4, thetaH: 0.77, thetaJ: -Math.PI / 2 });
const plan = planTerm(c, [17, 23, 25, 31].map((q) => ({ qubit: q, op: 'Z' as const })), { memoryBytes: 96 * 2 ** 22 });
console.log(`square 7x7, 4 steps, Z17 Z23 Z25 Z31: cone ${plan.coneQubits} qubits, width ${plan.width}, 2^${Math.log2(plan.flops).toFixed(1)} flops, ${plan.slices} slices; ${availableParallelism()} cores, load ${loadavg()[0].toFixed(1)}`);
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
console.log(`  speed-up 2 threads / 1: ${(rows[0].wall / rows[1].wall).toFixed(2)}x; values equal: ${rows[0].value === rows[1].value}`);
await Promise.all(pools.map((p) => p.close()));
if (rows[0].value !== rows[1].value) process.exit(1);
