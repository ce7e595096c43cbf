import { buildLattice, edgeColouring } from './shared/physics/lattices';
import { kickedIsing } from './shared/physics/kicked-ising';
import { planTerm, contractPlan } from './shared/physics/tensor-network/index';
import { SliceThreads } from './server/jobs/slice-threads';
import { loadavg } from 'node:os';
const g = buildLattice({ kind: 'square', rows: 7, cols: 7 });
const c = kickedIsing(g.n, edgeColouring(g.n, g.edges), { steps: 4, thetaH: 0.77, thetaJ: -Math.PI / 2 });
const [qs, mw] = JSON.parse(process.argv[2]);
const p = planTerm(c, qs.map((q: number) => ({ qubit: q, op: 'Z' })), { memoryBytes: 96 * 2 ** mw });
console.log(qs.join(','), 'cone', p.coneQubits, 'width', p.width, 'log2flops', Math.log2(p.flops).toFixed(2), 'slices', p.slices, 'load', loadavg()[0].toFixed(1));
const pools = [new SliceThreads(1), new SliceThreads(2)];
// warm the threads up (tsx boot) with a one-slice-per-thread run
await pools[1].contract(planTerm(c, [{ qubit: 24, op: 'Z' }], { memoryBytes: 96 * 2 ** 8 }));
for (let rep = 0; rep < Number(process.argv[3] ?? 2); rep++) for (const [k, pool] of pools.entries()) {
  const t = performance.now();
  const cpu = process.cpuUsage();
  const v = pool.contract(p);
  const u = process.cpuUsage(cpu);
  console.log(`threads ${k + 1}: wall ${((performance.now() - t) / 1000).toFixed(2)} s, cpu ${((u.user + u.system) / 1e6).toFixed(2)} s, value ${v[0]}, load ${loadavg()[0].toFixed(1)}`);
}
await Promise.all(pools.map((x) => x.close()));
