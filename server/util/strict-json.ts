/**
 * A strict JSON parser for uploaded documents. JSON.parse silently keeps the last of two
 * duplicate keys, rounds integers beyond 2^53 and recurses as deep as the input goes; for a
 * scientist's entry file each of those is a mistake worth a clear message. This parser reports:
 *  - duplicate keys, with the JSON pointer of the object and the key;
 *  - integers that cannot be represented exactly (|n| > 2^53 - 1), with their pointer;
 *  - nesting deeper than a limit (default 32), without recursing further;
 *  - NUL characters (\u0000) in a key or a string, with their pointer (PostgreSQL text cannot
 *    hold them, and no Parallax text needs one);
 *  - syntax errors with line, column and what was expected.
 * It builds the same values JSON.parse would (objects get a null-free own-property layout).
 *
 * It reads UTF-8 bytes (a string is encoded first), so that a large upload can be parsed straight
 * from a reused buffer without first becoming a string of its own size (server/util/document-body.ts):
 * only the keys, strings and numbers it returns are allocated. Bytes that are not UTF-8 are refused.
 */
import type { FieldProblem } from '../errors';

export interface StrictJsonOptions {
  /** maximum nesting depth of objects and arrays (the document itself is depth 1) */
  maxDepth?: number;
  /** stop after this many problems */
  maxProblems?: number;
}

export type StrictJsonResult = { ok: true; value: unknown } | { ok: false; problems: FieldProblem[]; syntax: boolean };

export const DEFAULT_MAX_DEPTH = 32;

const esc = (k: string) => k.replace(/~/g, '~0').replace(/\//g, '~1');

class SyntaxProblem extends Error {}
class DepthProblem extends Error {}

const utf8 = new TextDecoder('utf-8', { fatal: true });
const lenient = new TextDecoder('utf-8');
/** bytes below 0x80 as text (a long run through the decoder: char by char, a 10 MB string took seconds) */
const latin1 = (b: Uint8Array, from: number, to: number) => {
  if (to - from > 32) return lenient.decode(b.subarray(from, to));
  let out = '';
  for (let k = from; k < to; k++) out += String.fromCharCode(b[k]);
  return out;
};

export function parseStrictJson(input: string | Uint8Array, opts: StrictJsonOptions = {}): StrictJsonResult {
  const maxDepth = opts.maxDepth ?? DEFAULT_MAX_DEPTH;
  const maxProblems = opts.maxProblems ?? 50;
  const problems: FieldProblem[] = [];
  const text: Uint8Array = typeof input === 'string' ? new TextEncoder().encode(input) : input;
  let i = 0;
  const n = text.length;
  // a byte-order mark is harmless; skip it
  if (text[0] === 0xef && text[1] === 0xbb && text[2] === 0xbf) i = 3;

  /** line and column in characters (UTF-8 continuation bytes do not count) */
  const where = (at: number) => {
    let line = 1;
    let col = 1;
    let ch = 0;
    for (let k = 0; k < at && k < n; k++) {
      const c = text[k];
      if ((c & 0xc0) === 0x80) continue;
      ch++;
      if (c === 10) { line++; col = 1; } else col++;
    }
    return { line, col, ch };
  };
  const describe = (at: number) => (at >= n ? 'the end of the document' : `${JSON.stringify(lenient.decode(text.subarray(at, Math.min(n, at + 12))))}`);
  const fail = (expected: string, at = i): never => {
    const w = where(at);
    problems.push({ path: '', message: `not valid JSON at line ${w.line}, column ${w.col} (character ${w.ch + 1}): expected ${expected}, found ${describe(at)}` });
    throw new SyntaxProblem();
  };
  const problem = (p: FieldProblem) => {
    if (problems.length < maxProblems) problems.push(p);
  };

  const ws = () => {
    while (i < n) {
      const c = text[i];
      if (c === 32 || c === 10 || c === 13 || c === 9) i++;
      else break;
    }
  };

  /** a string or key at `ptr` (a key: `key` is true, ptr is its object's pointer) */
  const str = (ptr: string, key = false): string => {
    // i is at the opening quote
    const start = ++i;
    let escaped = false;
    let ascii = true;
    while (i < n) {
      const c = text[i];
      if (c === 34) {
        const end = i;
        let raw: string;
        if (ascii) raw = latin1(text, start, end);
        else {
          try {
            raw = utf8.decode(text.subarray(start, end));
          } catch {
            return fail('text in UTF-8 (the string holds bytes that are not UTF-8: save the file as UTF-8)', start - 1);
          }
        }
        i++;
        if (!escaped) return raw;
        let out: string;
        try {
          out = JSON.parse(`"${raw}"`) as string;
        } catch {
          return fail('a valid escape sequence in the string (\\n, \\t, \\", \\\\, \\uXXXX ...)', start - 1);
        }
        if (out.includes('\u0000')) {
          problem({ path: ptr, message: key
            ? `a key of this object holds a NUL character (\\u0000), which no Parallax field name contains: remove it`
            : `holds a NUL character (\\u0000), which no Parallax text may contain: remove it` });
          out = out.replaceAll('\u0000', '\ufffd'); // the problem is reported; the key path stays printable
        }
        return out;
      }
      if (c === 92) { escaped = true; i += 2; continue; }
      if (c >= 0x80) ascii = false;
      else if (c < 32) fail('the end of the string (control characters such as a line break must be escaped)', i);
      i++;
    }
    return fail('the closing quote " of the string', start - 1);
  };

  const num = (ptr: string): number => {
    const start = i;
    let isInt = true;
    if (text[i] === 45) i++;
    const d0 = i;
    if (text[i] === 48) i++;
    else {
      while (i < n && text[i] >= 48 && text[i] <= 57) i++;
    }
    if (i === d0) fail('a digit', i);
    if (text[i] === 46) {
      isInt = false;
      i++;
      const f0 = i;
      while (i < n && text[i] >= 48 && text[i] <= 57) i++;
      if (i === f0) fail('a digit after the decimal point', i);
    }
    const e = text[i];
    if (e === 101 || e === 69) {
      isInt = false;
      i++;
      const s = text[i];
      if (s === 43 || s === 45) i++;
      const x0 = i;
      while (i < n && text[i] >= 48 && text[i] <= 57) i++;
      if (i === x0) fail('a digit in the exponent', i);
    }
    const lit = latin1(text, start, i);
    const v = Number(lit);
    if (isInt && !Number.isSafeInteger(v)) {
      problem({ path: ptr, message: `the integer ${lit.length > 40 ? lit.slice(0, 40) + '...' : lit} is beyond 2^53 and cannot be stored exactly: write it as a decimal number (e.g. 1.5e20) or as a string if it is an identifier` });
    } else if (!Number.isFinite(v)) {
      problem({ path: ptr, message: `the number ${lit.slice(0, 40)} overflows a 64-bit float: use a value within +/-1e15` });
    }
    return v;
  };

  const lit = (word: string | null, v: unknown) => {
    if (word && latin1(text, i, Math.min(n, i + word.length)) === word) { i += word.length; return v; }
    const bare = /^[A-Za-z+-][A-Za-z0-9.+-]*/.exec(latin1(text, i, Math.min(n, i + 20)))?.[0];
    if (bare && /^[+-]?(NaN|Infinity|inf|nan)$/i.test(bare)) {
      return fail(`a JSON value (${bare} is not JSON: JSON has no NaN or Infinity; leave the estimate out or give a finite number)`);
    }
    return fail('a JSON value (a string in double quotes, a number, true, false, null, an object or an array)');
  };

  const value = (ptr: string, depth: number): unknown => {
    ws();
    const c = text[i];
    if (c === 123) { // {
      if (depth >= maxDepth) {
        problems.push({ path: ptr, message: `the document is nested deeper than ${maxDepth} levels (the limit): entries need at most 5` });
        throw new DepthProblem();
      }
      i++;
      const obj: Record<string, unknown> = {};
      const seen = new Set<string>();
      ws();
      if (text[i] === 125) { i++; return obj; }
      for (;;) {
        ws();
        if (text[i] !== 34) fail('a key in double quotes');
        const key = str(ptr, true);
        ws();
        if (text[i] !== 58) fail('a colon : after the key');
        i++;
        const kp = `${ptr}/${esc(key)}`;
        const v = value(kp, depth + 1);
        if (seen.has(key)) problem({ path: kp, message: `the key "${key}" appears twice in the same object: keep one (JSON readers silently drop one of them)` });
        else seen.add(key);
        if (key === '__proto__') Object.defineProperty(obj, key, { value: v, enumerable: true, writable: true, configurable: true });
        else obj[key] = v;
        ws();
        const d = text[i];
        if (d === 44) { i++; continue; }
        if (d === 125) { i++; return obj; }
        fail('a comma , or the closing brace }');
      }
    }
    if (c === 91) { // [
      if (depth >= maxDepth) {
        problems.push({ path: ptr, message: `the document is nested deeper than ${maxDepth} levels (the limit): entries need at most 5` });
        throw new DepthProblem();
      }
      i++;
      const arr: unknown[] = [];
      ws();
      if (text[i] === 93) { i++; return arr; }
      for (;;) {
        arr.push(value(`${ptr}/${arr.length}`, depth + 1));
        ws();
        const d = text[i];
        if (d === 44) { i++; continue; }
        if (d === 93) { i++; return arr; }
        fail('a comma , or the closing bracket ]');
      }
    }
    if (c === 34) return str(ptr);
    if (c === 45 || (c >= 48 && c <= 57)) return num(ptr);
    if (c === 116) return lit('true', true);
    if (c === 102) return lit('false', false);
    if (c === 110) return lit('null', null);
    return lit(null, undefined);
  };

  try {
    ws();
    if (i >= n) fail('a JSON document (the body is empty)');
    const v = value('', 0);
    ws();
    if (i < n) fail('the end of the document (there is text after the JSON value)');
    if (problems.length) return { ok: false, problems, syntax: false };
    return { ok: true, value: v };
  } catch (e) {
    if (e instanceof SyntaxProblem) return { ok: false, problems: problems.slice(-1).concat(problems.slice(0, -1)).slice(0, maxProblems), syntax: true };
    if (e instanceof DepthProblem) return { ok: false, problems: problems.slice(-1), syntax: false };
    throw e;
  }
}
