/** 2x2 gate matrices and diagonal phase terms (circuit.ts conventions). */
import type { Gate } from '../circuit';

// ------------------------------------------------------------------------------------------------
// 2x2 matrices: Float64Array(8) = [m00r, m00i, m01r, m01i, m10r, m10i, m11r, m11i]

export type Mat2 = Float64Array;

function mat2(a: number, b: number, c: number, d: number, e: number, f: number, g: number, h: number): Mat2 {
  const m = new Float64Array(8);
  m[0] = a; m[1] = b; m[2] = c; m[3] = d; m[4] = e; m[5] = f; m[6] = g; m[7] = h;
  return m;
}

/** a * b (apply b first, then a). */
export function mat2Mul(a: Mat2, b: Mat2): Mat2 {
  const r = new Float64Array(8);
  for (let i = 0; i < 2; i++) {
    for (let j = 0; j < 2; j++) {
      let re = 0;
      let im = 0;
      for (let k = 0; k < 2; k++) {
        const ar = a[4 * i + 2 * k], ai = a[4 * i + 2 * k + 1];
        const br = b[4 * k + 2 * j], bi = b[4 * k + 2 * j + 1];
        re += ar * br - ai * bi;
        im += ar * bi + ai * br;
      }
      r[4 * i + 2 * j] = re;
      r[4 * i + 2 * j + 1] = im;
    }
  }
  return r;
}

const SQRT1_2 = Math.SQRT1_2;

function param(g: Gate): number {
  const t = g.params?.[0];
  if (typeof t !== 'number' || !Number.isFinite(t)) throw new Error(`statevector: gate ${g.name} needs a finite angle`);
  return t;
}

/** The 2x2 matrix of a single-qubit gate (circuit.ts conventions). */
export function gateMatrix(g: Gate): Mat2 {
  switch (g.name) {
    case 'x': return mat2(0, 0, 1, 0, 1, 0, 0, 0);
    case 'y': return mat2(0, 0, 0, -1, 0, 1, 0, 0);
    case 'z': return mat2(1, 0, 0, 0, 0, 0, -1, 0);
    case 'h': return mat2(SQRT1_2, 0, SQRT1_2, 0, SQRT1_2, 0, -SQRT1_2, 0);
    case 's': return mat2(1, 0, 0, 0, 0, 0, 0, 1);
    case 'sdg': return mat2(1, 0, 0, 0, 0, 0, 0, -1);
    case 'sx': return mat2(0.5, 0.5, 0.5, -0.5, 0.5, -0.5, 0.5, 0.5);
    case 'rx': {
      const t = param(g), c = Math.cos(t / 2), s = Math.sin(t / 2);
      return mat2(c, 0, 0, -s, 0, -s, c, 0);
    }
    case 'ry': {
      const t = param(g), c = Math.cos(t / 2), s = Math.sin(t / 2);
      return mat2(c, 0, -s, 0, s, 0, c, 0);
    }
    case 'rz': {
      const t = param(g), c = Math.cos(t / 2), s = Math.sin(t / 2);
      return mat2(c, -s, 0, 0, 0, 0, c, s);
    }
    default:
      throw new Error(`statevector: ${g.name} is not a single-qubit gate`);
  }
}

// ------------------------------------------------------------------------------------------------
// Diagonal terms: a diagonal gate is exp(i * angle(bits)). One qubit: angles [a0, a1];
// two qubits (qa, qb): angles [a00, a01, a10, a11] indexed by 2*b_qa + b_qb.

export interface DiagTerm {
  qubits: number[];
  angles: number[];
}

export function isDiagonal1(name: string): boolean {
  return name === 'z' || name === 's' || name === 'sdg' || name === 'rz';
}

export function diagTerm(g: Gate): DiagTerm {
  const q = g.qubits;
  switch (g.name) {
    case 'z': return { qubits: [q[0]], angles: [0, Math.PI] };
    case 's': return { qubits: [q[0]], angles: [0, Math.PI / 2] };
    case 'sdg': return { qubits: [q[0]], angles: [0, -Math.PI / 2] };
    case 'rz': { const t = param(g); return { qubits: [q[0]], angles: [-t / 2, t / 2] }; }
    case 'rzz': { const t = param(g); return { qubits: [q[0], q[1]], angles: [-t / 2, t / 2, t / 2, -t / 2] }; }
    case 'cz': return { qubits: [q[0], q[1]], angles: [0, 0, 0, Math.PI] };
    default: throw new Error(`statevector: ${g.name} is not diagonal`);
  }
}

export function termAngle(t: DiagTerm, index: number): number {
  if (t.qubits.length === 1) return t.angles[(index >>> t.qubits[0]) & 1];
  return t.angles[(((index >>> t.qubits[0]) & 1) << 1) | ((index >>> t.qubits[1]) & 1)];
}
