/**
 * The diagonal plan of one fused pass, shared by the JS and the wasm kernels: the pending diagonal
 * terms split by where their qubits lie relative to the block width W (low: all below, high: all
 * at or above, cross: both sides), the few high qubits that cross terms touch (at most
 * DIAG_MAX_CROSS; terms beyond that wait for an extra pass), and the phase tables
 * table[c][l] = exp(i (angle of the low terms at l + angle of the cross terms at (high bits of c) | l)).
 */
import { termAngle, type DiagTerm } from './matrices';

/** At most this many distinct high qubits may be touched by gates crossing the low/high split. */
export const DIAG_MAX_CROSS = 6;

export interface DiagonalPlan {
  lowTerms: DiagTerm[];
  highTerms: DiagTerm[];
  crossTerms: DiagTerm[];
  /** terms that did not fit (more than DIAG_MAX_CROSS crossing high qubits): applied in a further pass */
  extra: DiagTerm[];
  /** the crossing high qubits; table c gathers their bits */
  cross: number[];
  /** some term is applied in this pass (low, high or cross) */
  hasTerms: boolean;
  /** low or cross terms exist, so the per-block phase tables are needed */
  hasTableTerms: boolean;
}

export function planDiagonal(terms: readonly DiagTerm[], W: number): DiagonalPlan {
  const p: DiagonalPlan = { lowTerms: [], highTerms: [], crossTerms: [], extra: [], cross: [], hasTerms: false, hasTableTerms: false };
  for (const t of terms) {
    const nLow = t.qubits.filter((q) => q < W).length;
    if (nLow === t.qubits.length) p.lowTerms.push(t);
    else if (nLow === 0) p.highTerms.push(t);
    else {
      const hq = t.qubits[0] >= W ? t.qubits[0] : t.qubits[1];
      if (!p.cross.includes(hq)) {
        if (p.cross.length >= DIAG_MAX_CROSS) { p.extra.push(t); continue; }
        p.cross.push(hq);
      }
      p.crossTerms.push(t);
    }
  }
  p.hasTerms = terms.length > p.extra.length;
  p.hasTableTerms = p.lowTerms.length + p.crossTerms.length > 0;
  return p;
}

/** Fills the 2^cross.length phase tables of L amplitudes each (interleaved cos, sin) into the buffers tableFor(c) gives. */
export function fillPhaseTables(p: DiagonalPlan, L: number, tableFor: (c: number) => Float64Array): void {
  const lowAngle = new Float64Array(L);
  for (let l = 0; l < L; l++) {
    let a = 0;
    for (const t of p.lowTerms) a += termAngle(t, l);
    lowAngle[l] = a;
  }
  const C = p.cross.length;
  for (let c = 0; c < 1 << C; c++) {
    let hiBits = 0;
    for (let j = 0; j < C; j++) if (c & (1 << j)) hiBits |= 1 << p.cross[j];
    const tab = tableFor(c);
    for (let l = 0; l < L; l++) {
      let a = lowAngle[l];
      const idx = hiBits | l;
      for (const t of p.crossTerms) a += termAngle(t, idx);
      tab[2 * l] = Math.cos(a);
      tab[2 * l + 1] = Math.sin(a);
    }
  }
}
