import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  coefficientBound,
  countXY,
  formatPauli,
  ObservableError,
  observableSupport,
  parseObservable,
  parsePauli,
  PauliParseError,
} from '../../../shared/physics/observable';

const err = (s: string, n = 100): PauliParseError => {
  try {
    parsePauli(s, n);
  } catch (e) {
    if (e instanceof PauliParseError) return e;
    throw e;
  }
  throw new Error(`"${s}" parsed without error`);
};

describe('parsePauli', () => {
  it('parses single factors, spaced and juxtaposed products, sorted by qubit', () => {
    expect(parsePauli('Z12', 48)).toEqual([{ qubit: 12, op: 'Z' }]);
    expect(parsePauli('X3 Y4 Z5', 48)).toEqual([
      { qubit: 3, op: 'X' },
      { qubit: 4, op: 'Y' },
      { qubit: 5, op: 'Z' },
    ]);
    expect(parsePauli('Z4Z3', 48)).toEqual([
      { qubit: 3, op: 'Z' },
      { qubit: 4, op: 'Z' },
    ]);
    expect(parsePauli('  X0   Y47 ', 48)).toEqual([
      { qubit: 0, op: 'X' },
      { qubit: 47, op: 'Y' },
    ]);
  });

  it('"I" alone is the identity (no factors)', () => {
    expect(parsePauli('I', 5)).toEqual([]);
    expect(formatPauli([])).toBe('I');
  });

  it('names the position and the problem', () => {
    expect(err('X').message).toBe('at character 2: expected a qubit index after "X"');
    expect(err('Z3 X').message).toBe('at character 5: expected a qubit index after "X"');
    expect(err('Z3 Q4').message).toMatch(/^at character 4: unexpected "Q"/);
    expect(err('z3').message).toMatch(/upper case: write "Z"/);
    expect(err('3').message).toMatch(/qubit index must follow a Pauli letter/);
    expect(err('Z3 I4').message).toMatch(/"I" is only allowed alone/);
    expect(err('Z03').message).toMatch(/leading zero; write 3/);
    expect(err('').message).toMatch(/empty Pauli string/);
    expect(err('Z1,Z2').position).toBe(2);
  });

  it('qubit out of range names the qubit and the register size', () => {
    const e = err('Z0 X48', 48);
    expect(e.message).toBe('at character 5: qubit 48 is out of range: the register has 48 qubits (0 to 47)');
    expect(err('Z99999999999999999999', 10).message).toMatch(/qubit 99999999999999999999 is out of range/);
  });

  it('a repeated qubit in one string is an error', () => {
    expect(err('Z3 X3').message).toBe(
      'at character 4: qubit 3 appears twice (first at character 1); multiply the factors out, one per qubit',
    );
    expect(err('Z3Z3').position).toBe(2);
  });

  it('property: every rejected string gets a message that names the character position (1-based) of the problem', () => {
    // common practice: error messages point at the offending character; the grammar is in observable.ts
    const alphabet = fc.constantFrom(...'XYZIxyz0123456789 ,-.\t'.split(''));
    fc.assert(
      fc.property(fc.array(alphabet, { maxLength: 14, size: 'max' }).map((cs) => cs.join('')), fc.integer({ min: 1, max: 60 }), (s, n) => {
        let factors;
        try {
          factors = parsePauli(s, n);
        } catch (e) {
          expect(e).toBeInstanceOf(PauliParseError);
          const pe = e as PauliParseError;
          if (s.trim() === '') {
            expect(pe.message).toMatch(/^empty Pauli string/);
            return;
          }
          expect(pe.position).toBeGreaterThanOrEqual(0);
          expect(pe.position).toBeLessThanOrEqual(s.length);
          expect(pe.message.startsWith(`at character ${pe.position + 1}: `)).toBe(true);
          const unexpected = /^at character \d+: unexpected "(.)"/s.exec(pe.message);
          if (unexpected) expect(s[pe.position]).toBe(unexpected[1]);
          return;
        }
        // accepted: only the grammar's characters, and the canonical text parses to the same factors
        expect(/^[XYZI0-9 ]*$/.test(s)).toBe(true);
        expect(parsePauli(formatPauli(factors), n)).toEqual(factors);
        for (const f of factors) expect(f.qubit).toBeLessThan(n);
      }),
      { seed: 2718, numRuns: 2000 },
    );
  });

  it('formatPauli round-trips', () => {
    for (const s of ['Z0', 'X3 Y4 Z5', 'Y0 Z9999']) expect(formatPauli(parsePauli(s, 10000))).toBe(s);
    expect(formatPauli(parsePauli('Z5X1', 10))).toBe('X1 Z5');
  });
});

describe('parseObservable', () => {
  it('single string has coef 1; term lists keep coefficients', () => {
    expect(parseObservable({ id: 'z24', pauli: 'Z24' }, 48)).toEqual({ id: 'z24', terms: [{ coef: 1, factors: [{ qubit: 24, op: 'Z' }] }] });
    const o = parseObservable({ id: 'h', terms: [{ coef: 0.5, pauli: 'Z0 Z1' }, { coef: -2, pauli: 'X1' }] }, 4);
    expect(o.terms.map((t) => t.coef)).toEqual([0.5, -2]);
    expect(observableSupport(o)).toEqual([0, 1]);
  });

  it('errors carry a path inside the observable', () => {
    try {
      parseObservable({ id: 'h', terms: [{ coef: 1, pauli: 'Z0' }, { coef: 1, pauli: 'Z9' }] }, 4);
      throw new Error('no error');
    } catch (e) {
      expect(e).toBeInstanceOf(ObservableError);
      expect((e as ObservableError).issue.path).toBe('/terms/1/pauli');
      expect((e as ObservableError).issue.message).toMatch(/qubit 9 is out of range: the register has 4 qubits/);
    }
    expect(() => parseObservable({ id: 'h', terms: [{ coef: 1, pauli: 'Z0 Z1' }, { coef: 2, pauli: 'Z1Z0' }] }, 4)).toThrow(
      /term 1 repeats the Pauli string Z0 Z1 of term 0/,
    );
  });

  it('coefficientBound is the sum of |coef| (triangle inequality, |<P>| <= 1)', () => {
    const o = parseObservable({ id: 'h', terms: [{ coef: 0.5, pauli: 'Z0' }, { coef: -0.25, pauli: 'X1' }, { coef: 2, pauli: 'I' }] }, 2);
    expect(coefficientBound(o)).toBe(2.75);
    // magnetisation over 48 sites with coef 1/48: bound 1 (to rounding)
    const mz = parseObservable({ id: 'mz', terms: Array.from({ length: 48 }, (_, i) => ({ coef: 1 / 48, pauli: `Z${i}` })) }, 48);
    expect(coefficientBound(mz)).toBeCloseTo(1, 14);
  });

  it('countXY counts X and Y factors', () => {
    expect(countXY(parsePauli('X0 Y1 Z2 X3', 4))).toBe(3);
  });
});
