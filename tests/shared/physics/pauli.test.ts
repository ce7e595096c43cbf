import { describe, expect, it } from 'vitest';
import {
  PauliString,
  commutes,
  identity,
  multiply,
  parsePauli,
  pauliFromFactors,
  pauliToFactors,
  pauliToText,
  popcount32,
  support,
  weight,
  wordsFor,
  xyCount,
  type PauliOp,
} from '../../../shared/physics/pauli';

/**
 * Single-qubit Pauli products, from memory (textbook algebra): XY = iZ, YZ = iX, ZX = iY, their
 * reverses carry -i, P P = I. Entry [a][b] = [phase power of i, result] for a b.
 */
const TABLE: Record<PauliOp, Record<PauliOp, [number, PauliOp]>> = {
  I: { I: [0, 'I'], X: [0, 'X'], Y: [0, 'Y'], Z: [0, 'Z'] },
  X: { I: [0, 'X'], X: [0, 'I'], Y: [1, 'Z'], Z: [3, 'Y'] },
  Y: { I: [0, 'Y'], X: [3, 'Z'], Y: [0, 'I'], Z: [1, 'X'] },
  Z: { I: [0, 'Z'], X: [1, 'Y'], Y: [3, 'X'], Z: [0, 'I'] },
};
const OPS: PauliOp[] = ['I', 'X', 'Y', 'Z'];

function rng(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function randomString(r: () => number, n: number): PauliString {
  const p = new PauliString(n);
  for (let q = 0; q < n; q++) p.set(q, OPS[Math.floor(r() * 4)]);
  return p;
}

describe('encoding', () => {
  it('uses ceil(n/32) words and (1,1) is Y (PHYSICS.md encoding)', () => {
    expect(wordsFor(1)).toBe(1);
    expect(wordsFor(32)).toBe(1);
    expect(wordsFor(33)).toBe(2);
    expect(wordsFor(100)).toBe(4);
    const p = parsePauli('X0 Y33 Z64', 70);
    expect(p.x.length).toBe(3);
    expect(p.x[0]).toBe(1);
    expect(p.z[0]).toBe(0);
    expect(p.x[1]).toBe(2); // Y33: bit 1 of word 1 in both x and z
    expect(p.z[1]).toBe(2);
    expect(p.x[2]).toBe(0);
    expect(p.z[2]).toBe(1);
    expect(p.get(33)).toBe('Y');
  });

  it('parses and prints the sparse text form', () => {
    const p = parsePauli('X3 Y4 Z5');
    expect(p.n).toBe(6);
    expect(pauliToText(p)).toBe('X3 Y4 Z5');
    expect(pauliToText(parsePauli('Z5, X3', 10))).toBe('X3 Z5');
    expect(pauliToText(parsePauli('', 4))).toBe('I');
    expect(parsePauli('I', 4).isIdentity()).toBe(true);
    expect(() => parsePauli('X3 Z3')).toThrow();
    expect(() => parsePauli('Q3')).toThrow();
    expect(() => parsePauli('X9', 5)).toThrow();
  });

  it('round-trips through PauliFactor[] and text on many words', () => {
    const r = rng(1);
    for (let rep = 0; rep < 50; rep++) {
      const n = 1 + Math.floor(r() * 150);
      const p = randomString(r, n);
      expect(pauliFromFactors(n, pauliToFactors(p)).equals(p)).toBe(true);
      expect(parsePauli(pauliToText(p), n).equals(p)).toBe(true);
    }
  });

  it('weight, X/Y count and support count per qubit', () => {
    const p = parsePauli('X0 Y31 Z32 Y95 X99', 100);
    expect(weight(p)).toBe(5);
    expect(xyCount(p)).toBe(4);
    expect(support(p)).toEqual([0, 31, 32, 95, 99]);
    expect(weight(identity(100))).toBe(0);
  });

  it('popcount32 matches a naive count, including the sign bit', () => {
    const r = rng(2);
    for (let rep = 0; rep < 1000; rep++) {
      const v = Math.floor(r() * 4294967296);
      let c = 0;
      for (let k = 0; k < 32; k++) c += (v / 2 ** k) & 1 ? 1 : 0;
      expect(popcount32(v)).toBe(c);
      expect(popcount32(v | 0)).toBe(c);
    }
    expect(popcount32(0xffffffff)).toBe(32);
    expect(popcount32(-1)).toBe(32);
  });
});

describe('products and commutation', () => {
  it('single-qubit table (from memory: XY = iZ, YZ = iX, ZX = iY)', () => {
    for (const a of OPS) for (const b of OPS) {
      const { phase, p } = multiply(new PauliString(1).set(0, a), new PauliString(1).set(0, b));
      const [ph, res] = TABLE[a][b];
      expect([phase, p.get(0)]).toEqual([ph, res]);
    }
  });

  it('multi-word products equal the qubit-by-qubit product (phases add)', () => {
    const r = rng(3);
    for (let rep = 0; rep < 200; rep++) {
      const n = 1 + Math.floor(r() * 130);
      const a = randomString(r, n);
      const b = randomString(r, n);
      const { phase, p } = multiply(a, b);
      let ph = 0;
      for (let q = 0; q < n; q++) {
        const [e, res] = TABLE[a.get(q)][b.get(q)];
        ph += e;
        expect(p.get(q)).toBe(res);
      }
      expect(phase).toBe(ph % 4);
    }
  });

  it('commutes iff ab = ba, i.e. the product phases agree (common practice)', () => {
    const r = rng(4);
    const seenBoth = [0, 0];
    for (let rep = 0; rep < 300; rep++) {
      const n = 1 + Math.floor(r() * 70);
      const a = randomString(r, n);
      const b = randomString(r, n);
      const ab = multiply(a, b), ba = multiply(b, a);
      expect(ab.p.equals(ba.p)).toBe(true);
      const c = commutes(a, b);
      expect(c).toBe(ab.phase === ba.phase);
      if (!c) expect((ab.phase - ba.phase + 4) % 4).toBe(2);
      seenBoth[c ? 0 : 1]++;
    }
    expect(seenBoth[0]).toBeGreaterThan(50);
    expect(seenBoth[1]).toBeGreaterThan(50);
  });

  it('Hermitian strings square to the identity with phase 0 (P(x,z) = i^{x.z} X^x Z^z is Hermitian)', () => {
    const r = rng(5);
    for (let rep = 0; rep < 50; rep++) {
      const a = randomString(r, 90);
      const { phase, p } = multiply(a, a);
      expect(phase).toBe(0);
      expect(p.isIdentity()).toBe(true);
    }
  });

  it('rejects strings of different sizes', () => {
    expect(() => multiply(identity(3), identity(4))).toThrow();
  });
});
