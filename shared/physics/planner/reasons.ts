/**
 * The one place where the planner's structured reasons become sentences: reasonText for one
 * reason, infeasibleSentence for a plan with no feasible method, and the number formats they use.
 */
import type { ExactMethod, MethodEstimate, Reason } from './types';

export const METHOD_NAMES: Record<ExactMethod, string> = {
  'pauli-propagation': 'Pauli propagation',
  'free-fermion': 'free-fermion',
  'light-cone-statevector': 'light-cone statevector',
  'tensor-network': 'tensor-network contraction',
  statevector: 'statevector',
};

const LATTICE_NAMES: Record<string, string> = {
  chain: 'a chain',
  ring: 'a ring',
  square: 'a square grid',
  'heavy-hex': 'a heavy-hex patch',
  edges: 'an explicit edge list',
};

/** One reason as a sentence. */
export function reasonText(r: Reason): string {
  switch (r.code) {
    case 'term-bound':
      return `Pauli propagation could need up to ${fmtPow2(r.log2Terms)} terms (budget ${fmtInt(r.budget)}) from ${fmtInt(r.nonClifford)} non-Clifford rotations in the light cone${r.largestTerm ? `, the largest single term up to ${fmtPow2(r.largestTerm.log2Terms)} (term ${r.largestTerm.index + 1})` : ''}`;
    case 'over-time':
      return `${METHOD_NAMES[r.method]}${r.qubits !== undefined ? ` on ${fmtInt(r.qubits)} qubits` : ''}${r.terms ? ` per term (${r.terms} terms)` : ''} would take about ${fmtSeconds(r.seconds)} (budget ${fmtSeconds(r.budget)})`;
    case 'not-chain':
      return `free-fermion needs an open chain (the lattice is ${LATTICE_NAMES[r.lattice] ?? r.lattice})`;
    case 'not-kicked-ising':
      return 'free-fermion needs the kicked-ising family';
    case 'free-fermion-unsupported':
      return `free-fermion: ${r.text}`;
    case 'free-fermion-no-cost':
      return 'free-fermion: not supported for this instance';
    case 'cone-limit':
      return `light cone has ${fmtInt(r.qubits)} qubits (limit ${r.limit}) and ${fmtInt(r.nonClifford)} non-Clifford rotations${r.widestTerm ? `, the widest single-term cone ${fmtInt(r.widestTerm.qubits)} qubits (term ${r.widestTerm.index + 1})` : ''}`;
    case 'register-limit':
      return `the register has ${fmtInt(r.qubits)} qubits (statevector limit ${r.limit})`;
    case 'tn-not-needed':
      return `tensor network not costed: a method known to finish in about ${fmtSeconds(r.seconds)} is cheaper`;
    case 'tn-not-searched':
      return 'tensor-network contraction not costed here: its order search runs with the reference computation';
    case 'tn-network-too-large':
      return `tensor network not searched: a term's light cone holds ${fmtInt(r.gates)} gates (limit ${fmtInt(r.limit)})`;
    case 'tn-over-memory':
      return `tensor-network contraction${r.term >= 0 ? ` of term ${r.term + 1} of ${r.terms}` : ''} has width ${r.width} even after slicing: about ${fmtBytes(r.bytes)} (budget ${fmtBytes(r.budget)})`;
    case 'tn-over-time':
      return `tensor-network contraction${r.term >= 0 ? ` of term ${r.term + 1} of ${r.terms}` : ''} has width ${r.width}${r.slices > 1 ? ` over ${fmtInt(r.slices)} slices` : ''} and 2^${r.log2Flops.toFixed(1)} flops: about ${fmtSeconds(r.seconds)} in all (budget ${fmtSeconds(r.budget)})`;
  }
}

/** The sentence of a plan without a feasible method: the reasons that matter, in a fixed order. */
export function infeasibleSentence(est: readonly MethodEstimate[]): string {
  const by = (m: ExactMethod) => est.find((e) => e.method === m) as MethodEstimate;
  const parts: string[] = [];
  const lc = by('light-cone-statevector').why;
  const pp = by('pauli-propagation');
  const coneWide = lc?.code === 'cone-limit';
  if (lc) parts.push(reasonText(lc));
  // the cone sentence already counts the non-Clifford rotations
  if (pp.why && !(coneWide && pp.why.code === 'term-bound')) parts.push(reasonText(pp.why));
  if (pp.attempt) parts.push(`exact Pauli propagation is attempted under the budget of ${fmtInt(pp.size)} terms`);
  const tn = by('tensor-network').why;
  if (tn && tn.code !== 'tn-not-needed') parts.push(reasonText(tn));
  const ff = by('free-fermion').why;
  if (ff) parts.push(ff.code === 'not-chain' ? 'not a chain' : reasonText(ff));
  const sv = by('statevector').why;
  if (sv && !(coneWide && sv.code === 'register-limit')) parts.push(reasonText(sv));
  return parts.join('; ');
}

/** Integer with thousands separators ("1,000,000"); toLocaleString is slow in a hot loop. */
export function fmtInt(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  const neg = x < 0;
  let d = String(Math.round(Math.abs(x)));
  if (d.includes('e')) return (neg ? '-' : '') + d;
  let out = '';
  while (d.length > 3) {
    out = ',' + d.slice(-3) + out;
    d = d.slice(0, -3);
  }
  return (neg ? '-' : '') + d + out;
}

function fmtPow2(log2: number): string {
  if (log2 <= 20) return fmtInt(2 ** log2);
  return `2^${Math.round(log2)}`;
}

export function fmtBytes(b: number): string {
  if (b < 1024 ** 2) return `${(b / 1024).toPrecision(2)} KiB`;
  if (b < 1024 ** 3) return `${(b / 1024 ** 2).toPrecision(2)} MiB`;
  if (b < 1024 ** 4) return `${(b / 1024 ** 3).toPrecision(2)} GiB`;
  return `2^${Math.log2(b).toFixed(0)} bytes`;
}

export function fmtSeconds(s: number): string {
  if (!Number.isFinite(s)) return 'forever';
  if (s < 1) return `${(s * 1000).toPrecision(2)} ms`;
  if (s < 120) return `${s.toPrecision(2)} s`;
  if (s < 7200) return `${(s / 60).toPrecision(2)} min`;
  if (s < 3 * 86400) return `${(s / 3600).toPrecision(2)} h`;
  return `${(s / 86400).toPrecision(2)} days`;
}
