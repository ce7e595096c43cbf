import { buildLattice, edgeColouring } from './shared/physics/lattices';
import { kickedIsing } from './shared/physics/kicked-ising';
import { planTerm } from './shared/physics/tensor-network/index';
const g = buildLattice({ kind: 'square', rows: 7, cols: 7 });
const c = kickedIsing(g.n, edgeColouring(g.n, g.edges), { steps: 4, thetaH: 0.77, thetaJ: -Math.PI / 2 });
for (const qs of [[10, 24, 38], [16, 24, 32], [17, 23, 25, 31]]) {
  for (const mw of [0, 21, 20]) {
    const p = planTerm(c, qs.map((q: number) => ({ qubit: q, op: 'Z' })), mw ? { memoryBytes: 96 * 2 ** mw } : {});
    console.log(qs.join(','), 'mw', mw, 'cone', p.coneQubits, 'width', p.width, 'log2flops', Math.log2(p.flops).toFixed(1), 'slices', p.slices);
  }
}
