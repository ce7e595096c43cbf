import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { parseStrictJson } from '../../server/util/strict-json';

describe('strict JSON', () => {
  it('parses what JSON.parse parses, to the same value', () => {
    fc.assert(fc.property(fc.jsonValue({ maxDepth: 6 }), (v) => {
      const text = JSON.stringify(v);
      const r = parseStrictJson(text);
      if (!r.ok) return /beyond 2\^53/.test(r.problems[0].message); // JSON.stringify of 1e21-style integers is allowed to differ
      expect(r.value).toEqual(JSON.parse(text));
      return true;
    }), { numRuns: 300 });
  });
  it('reports duplicate keys, huge integers, depth and syntax with positions', () => {
    expect(parseStrictJson('{"a": {"b": 1, "b": 2}}')).toEqual({ ok: false, syntax: false, problems: [{ path: '/a/b', message: 'the key "b" appears twice in the same object: keep one (JSON readers silently drop one of them)' }] });
    const big = parseStrictJson('{"n": [1, 9007199254740993]}');
    expect(big.ok).toBe(false);
    expect((big as { problems: { path: string }[] }).problems[0].path).toBe('/n/1');
    expect(parseStrictJson('{"n": 9007199254740991, "x": 1.5e300}').ok).toBe(true);
    const deep = parseStrictJson('['.repeat(10_000) + ']'.repeat(10_000));
    expect(deep.ok).toBe(false);
    expect((deep as { problems: { message: string }[] }).problems[0].message).toMatch(/nested deeper than 32 levels/);
    const s = parseStrictJson('{\n  "a": 1,\n  "b": Infinity\n}');
    expect((s as { problems: { message: string }[] }).problems[0].message).toMatch(/^not valid JSON at line 3, column 8 .*Infinity is not JSON/);
    expect((parseStrictJson('{"a": 1} x') as { problems: { message: string }[] }).problems[0].message).toMatch(/there is text after the JSON value/);
    expect((parseStrictJson('') as { problems: { message: string }[] }).problems[0].message).toMatch(/the body is empty/);
    expect(parseStrictJson('{"s": "a\\u00e9\\n"}')).toEqual({ ok: true, value: { s: 'aé\n' } });
  });
  it('reads UTF-8 bytes exactly as it reads the same text (uploads are parsed from a byte buffer)', () => {
    // any Unicode text, lone surrogates included (JSON.stringify escapes them: ES2019 well-formed stringify)
    fc.assert(fc.property(fc.jsonValue({ maxDepth: 4, stringUnit: 'binary' }), fc.boolean(), (v, pretty) => {
      const text = JSON.stringify(v, null, pretty ? 2 : undefined);
      const fromText = parseStrictJson(text);
      const fromBytes = parseStrictJson(new TextEncoder().encode(text));
      expect(fromBytes).toEqual(fromText);
      if (fromText.ok) expect(fromText.value).toEqual(JSON.parse(text));
    }), { numRuns: 300 });
  });
  it('refuses bytes that are not UTF-8, skips a UTF-8 byte-order mark, and counts positions in characters', () => {
    const latin1 = Uint8Array.from([...Buffer.from('{"site": "'), 0xe9, ...Buffer.from('"}')]); // "é" saved as ISO-8859-1
    const r = parseStrictJson(latin1);
    expect(r.ok).toBe(false);
    expect((r as { problems: { message: string }[] }).problems[0].message).toMatch(/not UTF-8: save the file as UTF-8/);
    expect(parseStrictJson(Uint8Array.from([0xef, 0xbb, 0xbf, ...Buffer.from('{"a": 1}')]))).toEqual({ ok: true, value: { a: 1 } });
    // "é" and "→" are 2 and 3 bytes in UTF-8 but one character each: the column is the editor's column
    const e = parseStrictJson('{"é→": x}');
    expect((e as { problems: { message: string }[] }).problems[0].message).toMatch(/^not valid JSON at line 1, column 8 \(character 8\)/);
  });

  it('refuses a NUL character (\\u0000) in a string or a key, naming the field (issue 12, item 14)', () => {
    const r = parseStrictJson('{"label":"a\\u0000b","list":["ok","\\u0000"],"k\\u0000":1,"fine":"\\u0001"}');
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.problems.map((p) => p.path)).toEqual(['/label', '/list/1', '']);
    expect(r.problems[0].message).toMatch(/NUL character/);
    // long ASCII strings are read whole, to the same value
    const long = 'x'.repeat(100_000);
    expect(parseStrictJson(JSON.stringify({ long }))).toEqual({ ok: true, value: { long } });
  });
});
