/**
 * Pauli strings bit-packed in typed arrays (PHYSICS.md "Pauli propagation").
 *
 * A string on n qubits is two bit vectors x and z, each ceil(n / 32) 32-bit words (qubit q is bit
 * q & 31 of word q >>> 5), and stands for P(x, z) = i^{x.z} X^x Z^z: per qubit (0,0) = I,
 * (1,0) = X, (0,1) = Z, (1,1) = Y. Every such string is Hermitian.
 *
 * Products: P(x1,z1) P(x2,z2) = i^e P(x1^x2, z1^z2) with
 *   e = |x1&z1| + |x2&z2| + 2|z1&x2| - |(x1^x2)&(z1^z2)|  (mod 4),
 * where |v| is a popcount. Two strings commute iff |x1&z2 ^ z1&x2| is even.
 *
 * Plain TypeScript, no framework or Node imports.
 */
import type { PauliFactor } from './circuit';

export type PauliOp = 'I' | 'X' | 'Y' | 'Z';

/** Number of 32-bit words per bit vector for n qubits. */
export function wordsFor(n: number): number {
  return Math.max(1, (n + 31) >>> 5);
}

/** Population count of a 32-bit word (SWAR). */
export function popcount32(v: number): number {
  v = v - ((v >>> 1) & 0x55555555);
  v = (v & 0x33333333) + ((v >>> 2) & 0x33333333);
  v = (v + (v >>> 4)) & 0x0f0f0f0f;
  return Math.imul(v, 0x01010101) >>> 24;
}

export class PauliString {
  readonly n: number;
  readonly x: Uint32Array;
  readonly z: Uint32Array;

  constructor(n: number, x?: Uint32Array, z?: Uint32Array) {
    if (!Number.isInteger(n) || n < 0) throw new Error(`PauliString: bad qubit count ${n}`);
    const w = wordsFor(n);
    this.n = n;
    this.x = x ?? new Uint32Array(w);
    this.z = z ?? new Uint32Array(w);
    if (this.x.length !== w || this.z.length !== w) throw new Error('PauliString: word count mismatch');
  }

  get words(): number {
    return this.x.length;
  }

  clone(): PauliString {
    return new PauliString(this.n, this.x.slice(), this.z.slice());
  }

  get(q: number): PauliOp {
    this.check(q);
    const w = q >>> 5;
    const b = q & 31;
    const xb = (this.x[w] >>> b) & 1;
    const zb = (this.z[w] >>> b) & 1;
    return xb ? (zb ? 'Y' : 'X') : zb ? 'Z' : 'I';
  }

  set(q: number, op: PauliOp): this {
    this.check(q);
    const w = q >>> 5;
    const m = 1 << (q & 31);
    const xb = op === 'X' || op === 'Y';
    const zb = op === 'Z' || op === 'Y';
    this.x[w] = xb ? this.x[w] | m : this.x[w] & ~m;
    this.z[w] = zb ? this.z[w] | m : this.z[w] & ~m;
    return this;
  }

  private check(q: number): void {
    if (!Number.isInteger(q) || q < 0 || q >= this.n) throw new Error(`qubit ${q} out of range 0..${this.n - 1}`);
  }

  isIdentity(): boolean {
    for (let k = 0; k < this.x.length; k++) if (this.x[k] !== 0 || this.z[k] !== 0) return false;
    return true;
  }

  /** True iff x = 0 (a Z-type string: diagonal, <0...0|P|0...0> = 1). */
  isDiagonal(): boolean {
    for (let k = 0; k < this.x.length; k++) if (this.x[k] !== 0) return false;
    return true;
  }

  equals(o: PauliString): boolean {
    if (o.n !== this.n) return false;
    for (let k = 0; k < this.x.length; k++) if (this.x[k] !== o.x[k] || this.z[k] !== o.z[k]) return false;
    return true;
  }

  toString(): string {
    return pauliToText(this);
  }
}

export function identity(n: number): PauliString {
  return new PauliString(n);
}

/** Build from sparse factors (each qubit at most once). */
export function pauliFromFactors(n: number, factors: readonly PauliFactor[]): PauliString {
  const p = new PauliString(n);
  const seen = new Set<number>();
  for (const f of factors) {
    if (seen.has(f.qubit)) throw new Error(`qubit ${f.qubit} appears twice in a Pauli string`);
    seen.add(f.qubit);
    if (f.op !== 'X' && f.op !== 'Y' && f.op !== 'Z') throw new Error(`bad Pauli op ${String(f.op)}`);
    p.set(f.qubit, f.op);
  }
  return p;
}

export function pauliToFactors(p: PauliString): PauliFactor[] {
  const out: PauliFactor[] = [];
  for (const q of support(p)) out.push({ qubit: q, op: p.get(q) as 'X' | 'Y' | 'Z' });
  return out;
}

/**
 * Parse the sparse text form "X3 Y4 Z5" (0-based qubits, separated by spaces or commas; "I" or
 * "" is the identity). Without n, the qubit count is one more than the largest index.
 */
export function parsePauli(text: string, n?: number): PauliString {
  const toks = text.trim().split(/[\s,]+/).filter((t) => t.length > 0 && t !== 'I');
  const factors: PauliFactor[] = [];
  let maxQ = -1;
  for (const t of toks) {
    const m = /^([XYZxyz])_?(\d+)$/.exec(t);
    if (!m) throw new Error(`bad Pauli factor "${t}" (expected e.g. X3)`);
    const q = Number(m[2]);
    factors.push({ qubit: q, op: m[1].toUpperCase() as 'X' | 'Y' | 'Z' });
    if (q > maxQ) maxQ = q;
  }
  const nn = n ?? maxQ + 1;
  if (maxQ >= nn) throw new Error(`qubit ${maxQ} out of range for ${nn} qubits`);
  return pauliFromFactors(nn, factors);
}

/** Sparse text form, qubits ascending: "X3 Y4 Z5"; the identity prints as "I". */
export function pauliToText(p: PauliString): string {
  const s = support(p);
  if (s.length === 0) return 'I';
  return s.map((q) => `${p.get(q)}${q}`).join(' ');
}

/** Qubits where the string is not the identity, ascending. */
export function support(p: PauliString): number[] {
  const out: number[] = [];
  for (let k = 0; k < p.x.length; k++) {
    let v = (p.x[k] | p.z[k]) >>> 0;
    while (v !== 0) {
      const low = v & -v;
      out.push((k << 5) + 31 - Math.clz32(low));
      v = (v ^ low) >>> 0;
    }
  }
  return out;
}

/** Number of non-identity factors. */
export function weight(p: PauliString): number {
  let w = 0;
  for (let k = 0; k < p.x.length; k++) w += popcount32(p.x[k] | p.z[k]);
  return w;
}

/** Number of X or Y factors (popcount of x). */
export function xyCount(p: PauliString): number {
  let w = 0;
  for (let k = 0; k < p.x.length; k++) w += popcount32(p.x[k]);
  return w;
}

/** True iff the two strings commute: popcount(x1 & z2 ^ z1 & x2) even. */
export function commutes(a: PauliString, b: PauliString): boolean {
  sameSize(a, b);
  let par = 0;
  for (let k = 0; k < a.x.length; k++) par ^= popcount32((a.x[k] & b.z[k]) ^ (a.z[k] & b.x[k])) & 1;
  return par === 0;
}

/** The product a b = i^phase p; phase in 0..3. */
export function multiply(a: PauliString, b: PauliString): { phase: 0 | 1 | 2 | 3; p: PauliString } {
  sameSize(a, b);
  const w = a.x.length;
  const x = new Uint32Array(w);
  const z = new Uint32Array(w);
  let e = 0;
  for (let k = 0; k < w; k++) {
    const x1 = a.x[k], z1 = a.z[k], x2 = b.x[k], z2 = b.z[k];
    const xr = x1 ^ x2, zr = z1 ^ z2;
    x[k] = xr;
    z[k] = zr;
    e += popcount32(x1 & z1) + popcount32(x2 & z2) + 2 * popcount32(z1 & x2) - popcount32(xr & zr);
  }
  return { phase: (((e % 4) + 4) % 4) as 0 | 1 | 2 | 3, p: new PauliString(a.n, x, z) };
}

function sameSize(a: PauliString, b: PauliString): void {
  if (a.n !== b.n) throw new Error(`Pauli strings on ${a.n} and ${b.n} qubits`);
}
