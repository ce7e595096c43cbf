/**
 * Sparse Pauli strings and observables.
 *
 * Grammar of a Pauli string (decided here, documented in schemas/challenge.schema.json):
 *   string  := "I" | factor (sep? factor)*
 *   factor  := ("X" | "Y" | "Z") index        index := 0 | [1-9][0-9]*   (0-based qubit)
 *   sep     := one or more spaces
 * So "Z12", "X3 Y4 Z5" and the juxtaposed "Z3Z4" are all accepted; "I" alone is the identity.
 * Lower-case letters, leading zeros ("Z03"), "I" inside a product, a repeated qubit ("Z3 X3")
 * and qubits outside the register are errors. Leading and trailing spaces are allowed.
 */
import type { ObservableSpec, PauliFactor, PauliTerm } from './circuit';
import { CHALLENGE_FORMAT_LIMITS } from '../vocabulary';

export class PauliParseError extends Error {
  constructor(
    message: string,
    /** 0-based character position of the problem in the string, -1 if not positional */
    readonly position: number,
  ) {
    super(message);
    this.name = 'PauliParseError';
  }
}

/** The longest accepted Pauli string (also the schema's maxLength). */
export const MAX_PAULI_LENGTH = CHALLENGE_FORMAT_LIMITS.pauliLength;

/**
 * Parse one sparse Pauli string. Factors are returned sorted by qubit.
 * @param nQubits register size; qubits >= nQubits are an error. Pass Infinity to skip the check.
 * Error messages count characters from 1, as a reader does.
 */
export function parsePauli(s: string, nQubits: number): PauliFactor[] {
  if (s.length > MAX_PAULI_LENGTH) {
    throw new PauliParseError(`Pauli string is ${s.length} characters long (limit ${MAX_PAULI_LENGTH})`, -1);
  }
  const at = (i: number) => `at character ${i + 1}`;
  const trimmed = s.trim();
  if (trimmed === '') throw new PauliParseError('empty Pauli string: write "I" for the identity or e.g. "Z0"', 0);
  if (trimmed === 'I') return [];
  const factors: PauliFactor[] = [];
  const seen = new Map<number, number>();
  let i = 0;
  while (i < s.length) {
    const ch = s[i];
    if (ch === ' ') {
      i++;
      continue;
    }
    if (ch !== 'X' && ch !== 'Y' && ch !== 'Z') {
      const hint =
        ch === 'I'
          ? '"I" is only allowed alone (the identity); omit identity factors'
          : 'x/y/z'.includes(ch)
            ? `Pauli letters are upper case: write "${ch.toUpperCase()}"`
            : /[0-9]/.test(ch)
              ? 'a qubit index must follow a Pauli letter X, Y or Z'
              : 'expected X, Y or Z';
      throw new PauliParseError(`${at(i)}: unexpected "${ch}" (${hint})`, i);
    }
    const start = i + 1;
    let j = start;
    while (j < s.length && s.charCodeAt(j) >= 48 && s.charCodeAt(j) <= 57) j++;
    if (j === start) throw new PauliParseError(`${at(start)}: expected a qubit index after "${ch}"`, start);
    const digits = s.slice(start, j);
    if (digits.length > 1 && digits[0] === '0') {
      throw new PauliParseError(`${at(start)}: qubit index "${digits}" has a leading zero; write ${Number(digits)}`, start);
    }
    const q = Number(digits);
    if (!Number.isSafeInteger(q) || q >= nQubits) {
      throw new PauliParseError(
        `${at(start)}: qubit ${digits} is out of range: the register has ${nQubits} qubits (0 to ${nQubits - 1})`,
        start,
      );
    }
    const prev = seen.get(q);
    if (prev !== undefined) {
      throw new PauliParseError(
        `${at(i)}: qubit ${q} appears twice (first at character ${prev + 1}); multiply the factors out, one per qubit`,
        i,
      );
    }
    seen.set(q, i);
    factors.push({ qubit: q, op: ch });
    i = j;
  }
  factors.sort((a, b) => a.qubit - b.qubit);
  return factors;
}

/** Canonical text of a Pauli string: factors by qubit, space separated; "I" for the identity. */
export function formatPauli(factors: readonly PauliFactor[]): string {
  if (factors.length === 0) return 'I';
  return [...factors]
    .sort((a, b) => a.qubit - b.qubit)
    .map((f) => `${f.op}${f.qubit}`)
    .join(' ');
}

/** The JSON form of an observable in a challenge spec. */
export type ObservableJson =
  | { id: string; pauli: string; label?: string }
  | { id: string; terms: { coef: number; pauli: string }[]; label?: string };

export interface ObservableIssue {
  /** JSON pointer relative to the observable object, e.g. "/terms/3/pauli" or "/pauli" */
  path: string;
  message: string;
}

/**
 * Parse a JSON observable into an ObservableSpec. Throws ObservableError (with a path relative to
 * the observable) on the first problem.
 */
export class ObservableError extends Error {
  constructor(readonly issue: ObservableIssue) {
    super(issue.message);
    this.name = 'ObservableError';
  }
}

export function parseObservable(o: ObservableJson, nQubits: number): ObservableSpec {
  const one = (pauli: string, path: string): PauliFactor[] => {
    try {
      return parsePauli(pauli, nQubits);
    } catch (e) {
      if (e instanceof PauliParseError) throw new ObservableError({ path, message: `Pauli string "${clip(pauli)}" ${e.message}` });
      throw e;
    }
  };
  if ('pauli' in o) return { id: o.id, terms: [{ coef: 1, factors: one(o.pauli, '/pauli') }] };
  const terms: PauliTerm[] = [];
  const seen = new Map<string, number>();
  o.terms.forEach((t, k) => {
    const factors = one(t.pauli, `/terms/${k}/pauli`);
    const key = formatPauli(factors);
    const prev = seen.get(key);
    if (prev !== undefined) {
      throw new ObservableError({
        path: `/terms/${k}/pauli`,
        message: `term ${k} repeats the Pauli string ${key} of term ${prev}; add the coefficients into one term`,
      });
    }
    seen.set(key, k);
    if (!Number.isFinite(t.coef)) {
      throw new ObservableError({ path: `/terms/${k}/coef`, message: `term ${k}: coef must be a finite number` });
    }
    terms.push({ coef: t.coef, factors });
  });
  return { id: o.id, terms };
}

function clip(s: string): string {
  return s.length > 40 ? `${s.slice(0, 40)}...` : s;
}

/** Sum of |coef|: the bound on |<O>| for any state (each Pauli string has |<P>| <= 1). */
export function coefficientBound(obs: ObservableSpec): number {
  let s = 0;
  for (const t of obs.terms) s += Math.abs(t.coef);
  return s;
}

/** Sorted union of the qubits an observable acts on. */
export function observableSupport(obs: ObservableSpec): number[] {
  const s = new Set<number>();
  for (const t of obs.terms) for (const f of t.factors) s.add(f.qubit);
  return [...s].sort((a, b) => a - b);
}

/** Number of X and Y factors of a string (the sign in <P>(-thetaH) = (-1)^{#X+#Y} <P>(thetaH)). */
export function countXY(factors: readonly PauliFactor[]): number {
  let k = 0;
  for (const f of factors) if (f.op !== 'Z') k++;
  return k;
}
