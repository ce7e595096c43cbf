/** The Pauli-sum storage: structure of arrays, Zobrist hashes, an open-addressing table. */
import type { PauliTerm } from '../circuit';
import { popcount32, wordsFor } from '../pauli';

// ---------------------------------------------------------------------------------------------
// Term storage.

function splitmix32(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x9e3779b9) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 16), 0x85ebca6b);
    t = Math.imul(t ^ (t >>> 13), 0xc2b2ae35);
    return (t ^ (t >>> 16)) >>> 0;
  };
}

export const EMPTY = -1;
export const GOLDEN = 0x9e3779b1;

/**
 * A sum of weighted Pauli strings in structure-of-arrays form, with a hash index. Exposed for the
 * engine and for tests; the hot loops live in `propagate` for speed.
 */
export class PauliSum {
  readonly n: number;
  readonly W: number;
  readonly S: number;
  count = 0;
  cap = 0;
  words: Uint32Array;
  coef: Float64Array;
  hash: Int32Array;
  mark: Uint8Array;
  slots: Int32Array;
  shift = 32;
  tableStale = false;
  /** Zobrist keys: kx[q], kz[q]. */
  readonly kx: Int32Array;
  readonly kz: Int32Array;

  constructor(n: number, initialCap = 16) {
    this.n = n;
    this.W = wordsFor(n);
    this.S = 2 * this.W;
    const rnd = splitmix32(0x5eed1234 ^ n);
    this.kx = new Int32Array(n);
    this.kz = new Int32Array(n);
    for (let q = 0; q < n; q++) {
      this.kx[q] = rnd() | 0;
      this.kz[q] = rnd() | 0;
    }
    this.words = new Uint32Array(0);
    this.coef = new Float64Array(0);
    this.hash = new Int32Array(0);
    this.mark = new Uint8Array(0);
    this.slots = new Int32Array(0);
    this.reserve(Math.max(16, initialCap));
  }

  storageBytes(): number {
    return this.cap * (this.S * 4 + 8 + 4 + 1) + this.slots.length * 4;
  }

  /** Ensure capacity >= need (grows by 1.5x); rebuilds the table when it grows. */
  reserve(need: number): void {
    if (need <= this.cap) return;
    const cap = Math.max(need, Math.ceil(this.cap * 1.5), 16);
    const S = this.S;
    const words = new Uint32Array(cap * S);
    words.set(this.words.subarray(0, this.count * S));
    const coef = new Float64Array(cap);
    coef.set(this.coef.subarray(0, this.count));
    const hash = new Int32Array(cap);
    hash.set(this.hash.subarray(0, this.count));
    const mark = new Uint8Array(cap);
    mark.set(this.mark.subarray(0, this.count));
    this.words = words;
    this.coef = coef;
    this.hash = hash;
    this.mark = mark;
    this.cap = cap;
    let size = 16;
    while (size < 2 * cap) size *= 2;
    if (size !== this.slots.length) {
      this.slots = new Int32Array(size);
      this.shift = 32 - Math.log2(size);
      this.tableStale = true;
    }
    if (this.tableStale) this.rebuildTable();
  }

  rebuildTable(): void {
    const slots = this.slots;
    slots.fill(EMPTY);
    const mask = slots.length - 1;
    const shift = this.shift;
    const hash = this.hash;
    for (let i = 0; i < this.count; i++) {
      let s = Math.imul(hash[i], GOLDEN) >>> shift;
      while (slots[s] !== EMPTY) s = (s + 1) & mask;
      slots[s] = i;
    }
    this.tableStale = false;
  }

  hashOfWords(off: number): number {
    const W = this.W, words = this.words;
    let h = 0;
    for (let k = 0; k < this.S; k++) {
      let v = words[off + k];
      const isZ = k >= W;
      const base = (isZ ? k - W : k) << 5;
      while (v !== 0) {
        const low = v & -v;
        const q = base + 31 - Math.clz32(low);
        h ^= isZ ? this.kz[q] : this.kx[q];
        v = (v ^ low) >>> 0;
      }
    }
    return h;
  }

  /** Index of the term equal to the words at srcOff (in `src`), or -1. Table must be fresh. */
  find(src: Uint32Array, srcOff: number, h: number): number {
    const slots = this.slots, mask = slots.length - 1, S = this.S, words = this.words;
    let s = Math.imul(h, GOLDEN) >>> this.shift;
    for (;;) {
      const j = slots[s];
      if (j === EMPTY) return -1;
      if (this.hash[j] === h) {
        const jb = j * S;
        let k = 0;
        while (k < S && words[jb + k] === src[srcOff + k]) k++;
        if (k === S) return j;
      }
      s = (s + 1) & mask;
    }
  }

  /** Add c to the string given by (x, z) words; merges duplicates. */
  add(x: Uint32Array, z: Uint32Array, c: number): void {
    if (this.tableStale) this.rebuildTable();
    const S = this.S, W = this.W;
    const tmp = new Uint32Array(S);
    tmp.set(x, 0);
    tmp.set(z, W);
    this.reserve(this.count + 1);
    const i = this.count;
    this.words.set(tmp, i * S);
    const h = this.hashOfWords(i * S);
    const j = this.find(tmp, 0, h);
    if (j >= 0) {
      this.coef[j] += c;
      return;
    }
    this.coef[i] = c;
    this.hash[i] = h;
    this.mark[i] = 0;
    this.count++;
    this.insertSlot(i);
  }

  insertSlot(i: number): void {
    const slots = this.slots, mask = slots.length - 1;
    let s = Math.imul(this.hash[i], GOLDEN) >>> this.shift;
    while (slots[s] !== EMPTY) s = (s + 1) & mask;
    slots[s] = i;
  }

  /** Keep only the terms with keep(i) true, preserving order; marks the table stale. */
  compact(drop: Uint8Array): void {
    const S = this.S, words = this.words, coef = this.coef, hash = this.hash;
    let w = 0;
    for (let i = 0; i < this.count; i++) {
      if (drop[i]) continue;
      if (w !== i) {
        const wb = w * S, ib = i * S;
        for (let k = 0; k < S; k++) words[wb + k] = words[ib + k];
        coef[w] = coef[i];
        hash[w] = hash[i];
      }
      w++;
    }
    this.count = w;
    this.tableStale = true;
  }

  /** Sum of the coefficients of strings with x = 0. */
  diagonalSum(): number {
    const S = this.S, W = this.W, words = this.words, coef = this.coef;
    let v = 0;
    for (let i = 0; i < this.count; i++) {
      const b = i * S;
      let any = 0;
      for (let k = 0; k < W; k++) any |= words[b + k];
      if (any === 0) v += coef[i];
    }
    return v;
  }

  weightOf(i: number): number {
    const b = i * this.S, W = this.W;
    let w = 0;
    for (let k = 0; k < W; k++) w += popcount32(this.words[b + k] | this.words[b + W + k]);
    return w;
  }

  xyOf(i: number): number {
    const b = i * this.S;
    let w = 0;
    for (let k = 0; k < this.W; k++) w += popcount32(this.words[b + k]);
    return w;
  }

  toTerms(): PauliTerm[] {
    const out: PauliTerm[] = [];
    const S = this.S, W = this.W;
    for (let i = 0; i < this.count; i++) {
      const b = i * S;
      const factors: PauliTerm['factors'] = [];
      for (let q = 0; q < this.n; q++) {
        const w = q >>> 5, bit = q & 31;
        const xb = (this.words[b + w] >>> bit) & 1;
        const zb = (this.words[b + W + w] >>> bit) & 1;
        if (xb || zb) factors.push({ qubit: q, op: xb ? (zb ? 'Y' : 'X') : 'Z' });
      }
      out.push({ coef: this.coef[i], factors });
    }
    return out;
  }
}
