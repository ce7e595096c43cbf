/**
 * The API reference page's helpers (src/features/api-docs): the Python example in README.md is the
 * one the page shows, character for character; the entry document's fields come from the schema.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import schema from '../../schemas/entry.schema.json';
import { PYTHON_EXAMPLE, curlExamples } from '@/features/api-docs/examples';
import { fieldRows, groupOperations } from '@/features/api-docs/lib/operations';
import type { JsonSchema, OpenApiDocument } from '@/features/api-docs/api/get-openapi';

describe('API reference helpers', () => {
  it("README.md's Python example is the page's", () => {
    // (jsdom gives import.meta.url an http scheme here: the file is read from the project root)
    const readme = readFileSync(path.join(process.cwd(), 'README.md'), 'utf8');
    const block = /```python\n([\s\S]*?)```/.exec(readme);
    expect(block?.[1]).toBe(PYTHON_EXAMPLE);
    expect(PYTHON_EXAMPLE).not.toMatch(/^import requests|^from requests/m);
    expect(readme).not.toMatch(/--data @/);
    expect(curlExamples('http://x', 'c')).toContain('--data-binary @my-entry.json');
  });

  it('lists the entry fields from the schema, nested ones with dotted names, with their enums and limits', () => {
    const rows = fieldRows(schema as unknown as JsonSchema);
    const by = new Map(rows.map((r) => [r.name, r]));
    expect(by.get('estimates[].uncertaintyKind')?.type).toBe('"statistical" | "systematic" | "bound" | "none"');
    expect(by.get('estimates[].target')?.required).toBe(true);
    expect(by.get('challenge.checksum')?.notes).toContain('pattern');
    expect(by.get('label')?.notes).toBe('at most 120 characters');
    expect(by.has('$schema')).toBe(false);
  });

  it('groups operations by resource, GET before the writes on one path', () => {
    const doc = { paths: {
      '/api/entries/{entryId}': { delete: { summary: 'd' }, get: { summary: 'g' }, put: { summary: 'p', requestBody: { content: { 'application/json': { schema: { $ref: '#/components/schemas/Entry' } } } } } },
      '/api/challenges': { get: { summary: 'c' } },
    } } as unknown as OpenApiDocument;
    const g = groupOperations(doc);
    expect(g.map((x) => x.name)).toEqual(['challenges', 'entries']);
    expect(g[1].operations.map((o) => [o.method, o.body])).toEqual([['get', null], ['put', 'Entry'], ['delete', null]]);
  });
});
