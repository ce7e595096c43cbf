/** The engine: propagate() pulls the observable backwards gate by gate. */
import type { CompiledCircuit, ObservableSpec } from '../circuit';
import { pauliFromFactors } from '../pauli';
import type { PropagationOptions, PropagationResult, Stats } from './options';
import { cliffordLocalMap } from './algebra';
import { PauliSum } from './sum';
import { Scratch } from './scratch';
import { applyClifford, applyDiagBlock, applyRotation, buildDiagBlock, diagonalPieces } from './kernels';
import { keepLargest, truncateAll } from './truncation';



/** Propagate `observable` backwards through `circuit` and evaluate it in |0...0>. */
export function propagate(
  circuit: CompiledCircuit,
  observable: ObservableSpec,
  options: PropagationOptions = {},
): PropagationResult {
  const t0 = performance.now();
  const n = circuit.nQubits;
  validate(circuit);
  const delta = options.delta ?? 0;
  const maxWeight = options.maxWeight ?? Infinity;
  const maxXY = options.maxXY ?? Infinity;
  const maxTerms = options.maxTerms ?? Infinity;
  if (!(delta >= 0) || !(maxWeight >= 0) || !(maxXY >= 0) || !(maxTerms >= 1)) {
    throw new Error('bad truncation options');
  }
  const sum = new PauliSum(n, observable.terms.length);
  for (const t of observable.terms) {
    if (!Number.isFinite(t.coef)) throw new Error('observable coefficient must be finite');
    const p = pauliFromFactors(n, t.factors);
    sum.add(p.x, p.z, t.coef);
  }
  const st: Stats = { droppedTerms: 0, droppedWeight: 0, peakTerms: sum.count, peakBytes: sum.storageBytes() };
  const trunc = { delta, maxWeight, maxXY, maxTerms };
  truncateAll(sum, trunc, st);

  let updates = 0;
  let rotations = 0;
  const gates = circuit.gates;
  const total = gates.length;
  const scratch = new Scratch();
  for (let gi = total - 1; gi >= 0; ) {
    const g = gates[gi];
    // a run of >= 2 consecutive diagonal Cliffords is applied as one fused block
    let first = gi;
    const pieces: [number, number, number][] = [];
    for (let p = diagonalPieces(g); p && first >= 0; ) {
      pieces.push(...p);
      first--;
      p = first >= 0 ? diagonalPieces(gates[first]) : null;
    }
    first++;
    if (gi - first >= 1) {
      applyDiagBlock(sum, buildDiagBlock(n, pieces, sum.kz), trunc, st, scratch);
    } else {
      const map = cliffordLocalMap(g);
      if (map) {
        applyClifford(sum, g, map, trunc, st, scratch);
      } else {
        updates += sum.count;
        rotations++;
        applyRotation(sum, g, trunc, st, scratch);
      }
      first = gi;
    }
    if (sum.count > maxTerms) keepLargest(sum, maxTerms, st, scratch);
    if (sum.count > st.peakTerms) st.peakTerms = sum.count;
    const b = sum.storageBytes();
    if (b > st.peakBytes) st.peakBytes = b;
    options.onProgress?.(total - first, total);
    gi = first - 1;
  }
  const value = sum.diagonalSum();
  const res: PropagationResult = {
    value,
    terms: sum.count,
    peakTerms: st.peakTerms,
    droppedTerms: st.droppedTerms,
    droppedWeight: st.droppedWeight,
    updates,
    rotations,
    wallMs: performance.now() - t0,
    exact: st.droppedTerms === 0,
    peakStorageBytes: st.peakBytes,
    bytesPerTerm: st.peakBytes / Math.max(1, st.peakTerms),
  };
  if (options.returnTerms) res.finalTerms = sum.toTerms();
  return res;
}

function validate(c: CompiledCircuit): void {
  for (const g of c.gates) {
    const ar = g.name === 'rzz' || g.name === 'cx' || g.name === 'cz' ? 2 : 1;
    if (g.qubits.length !== ar) throw new Error(`gate ${g.name} needs ${ar} qubits`);
    for (const q of g.qubits) {
      if (!Number.isInteger(q) || q < 0 || q >= c.nQubits) throw new Error(`gate ${g.name}: qubit ${q} out of range`);
    }
    if (ar === 2 && g.qubits[0] === g.qubits[1]) throw new Error(`gate ${g.name} on one qubit twice`);
  }
}

/** Per rotation gate: for each local code, 0 = commutes, +1 / -1 = anticommutes with i G P = sign P ^ G. */
