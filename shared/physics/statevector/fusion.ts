/** Greedy fusion of a gate list into [singles, diagonal] pairs. */
import type { Gate } from '../circuit';
import { diagTerm, gateMatrix, isDiagonal1, mat2Mul, type DiagTerm, type Mat2 } from './matrices';

// ------------------------------------------------------------------------------------------------
// Planner: greedy fusion of a gate list into [singles, diagonal] pairs.

const H_MAT = gateMatrix({ name: 'h', qubits: [0] });

export class Planner {
  private singles = new Map<number, Mat2>();
  private diag: DiagTerm[] = [];
  private diagQubits = new Set<number>();
  constructor(private readonly flush: (qubits: number[], mats: Mat2[], diag: DiagTerm[]) => void) {}

  single(q: number, m: Mat2, diagonal: boolean, g?: Gate): void {
    if (this.diagQubits.has(q)) {
      if (diagonal && g) { this.addDiag(diagTerm(g)); return; }
      this.doFlush();
    } else if (diagonal && g && (this.diag.length > 0 || !this.singles.has(q))) {
      this.addDiag(diagTerm(g));
      return;
    }
    const prev = this.singles.get(q);
    this.singles.set(q, prev ? mat2Mul(m, prev) : m);
  }

  addDiag(t: DiagTerm): void {
    this.diag.push(t);
    for (const q of t.qubits) this.diagQubits.add(q);
  }

  gate(g: Gate): void {
    switch (g.name) {
      case 'rzz':
      case 'cz':
        this.addDiag(diagTerm(g));
        return;
      case 'cx': {
        const [c, t] = g.qubits;
        this.single(t, H_MAT, false);
        this.addDiag({ qubits: [c, t], angles: [0, 0, 0, Math.PI] });
        this.single(t, H_MAT, false);
        return;
      }
      default:
        this.single(g.qubits[0], gateMatrix(g), isDiagonal1(g.name), g);
    }
  }

  doFlush(): void {
    if (this.singles.size === 0 && this.diag.length === 0) return;
    const qs = [...this.singles.keys()];
    const ms = qs.map((q) => this.singles.get(q)!);
    const dg = this.diag;
    this.singles = new Map();
    this.diag = [];
    this.diagQubits = new Set();
    this.flush(qs, ms, dg);
  }
}

export function validateGate(g: Gate, n: number, index: number): void {
  const ar = g.name === 'rzz' || g.name === 'cx' || g.name === 'cz' ? 2 : 1;
  if (g.qubits.length !== ar) throw new Error(`statevector: gate ${index} (${g.name}) needs ${ar} qubit(s)`);
  for (const q of g.qubits) {
    if (!Number.isInteger(q) || q < 0 || q >= n) throw new Error(`statevector: gate ${index} (${g.name}) has qubit ${q} outside 0..${n - 1}`);
  }
  if (ar === 2 && g.qubits[0] === g.qubits[1]) throw new Error(`statevector: gate ${index} (${g.name}) acts twice on qubit ${g.qubits[0]}`);
}
