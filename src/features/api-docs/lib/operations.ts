/**
 * The OpenAPI document as the reference page lists it: operations grouped by resource (the first
 * path segment after /api), in path order, GET before the writes; the fields of a JSON Schema
 * object as rows (name, type, required, limits, description).
 */
import type { JsonSchema, OpenApiDocument, OpenApiOperation } from '../api/get-openapi';

export interface Operation { id: string; method: string; path: string; op: OpenApiOperation; body: string | null }
export interface Group { name: string; operations: Operation[] }

const METHOD_ORDER = ['get', 'post', 'put', 'patch', 'delete'];
const GROUP_ORDER = ['challenges', 'entries', 'teams', 'follows', 'me', 'moderation', 'audit', 'admin', 'jobs', 'health', 'openapi.json'];

export function groupOperations(doc: OpenApiDocument): Group[] {
  const groups = new Map<string, Operation[]>();
  for (const [path, ops] of Object.entries(doc.paths)) {
    const name = path.split('/')[2] ?? '';
    for (const [method, op] of Object.entries(ops)) {
      const ref = op.requestBody?.content['application/json']?.schema?.$ref;
      const body = ref ? ref.split('/').pop()! : op.requestBody ? 'JSON object' : null;
      const id = `${method}-${path}`.replace(/[^A-Za-z0-9]+/g, '-').replace(/-+$/, '');
      (groups.get(name) ?? groups.set(name, []).get(name)!).push({ id, method, path, op, body });
    }
  }
  const rank = (g: string) => (GROUP_ORDER.includes(g) ? GROUP_ORDER.indexOf(g) : GROUP_ORDER.length);
  return [...groups.entries()]
    .sort(([a], [b]) => rank(a) - rank(b) || a.localeCompare(b))
    .map(([name, operations]) => ({
      name,
      operations: operations.sort((a, b) => a.path.localeCompare(b.path) || METHOD_ORDER.indexOf(a.method) - METHOD_ORDER.indexOf(b.method)),
    }));
}

export interface FieldRow { name: string; type: string; required: boolean; notes: string; description: string }

function typeOf(s: JsonSchema, defs: Record<string, JsonSchema>): string {
  if (s.$ref) return typeOf(defs[s.$ref.split('/').pop()!] ?? {}, defs);
  if (s.enum) return s.enum.map((x) => JSON.stringify(x)).join(' | ');
  if (s.anyOf) return s.anyOf.map((x) => typeOf(x, defs)).join(' | ');
  if (s.type === 'array') return `array of ${s.items ? typeOf(s.items, defs) : 'values'}`;
  return Array.isArray(s.type) ? s.type.join(' | ') : s.type ?? 'value';
}

function notesOf(s: JsonSchema, defs: Record<string, JsonSchema>): string {
  const r = s.$ref ? defs[s.$ref.split('/').pop()!] ?? s : s;
  const out: string[] = [];
  if (r.minimum !== undefined) out.push(`>= ${r.minimum}`);
  if (r.maximum !== undefined) out.push(`<= ${r.maximum}`);
  if (r.maxLength !== undefined) out.push(`at most ${r.maxLength} characters`);
  if (r.maxItems !== undefined) out.push(`at most ${r.maxItems} items`);
  if (r.pattern) out.push(`pattern ${r.pattern}`);
  if (r.format) out.push(r.format);
  return out.join(', ');
}

/** the fields of an object schema, nested objects as dotted names (estimates[].value) */
export function fieldRows(schema: JsonSchema, prefix = '', defs: Record<string, JsonSchema> = schema.$defs ?? {}): FieldRow[] {
  const rows: FieldRow[] = [];
  for (const [name, raw] of Object.entries(schema.properties ?? {})) {
    if (name === '$schema') continue;
    const s = raw.$ref ? defs[raw.$ref.split('/').pop()!] ?? raw : raw;
    const full = prefix + name;
    const isObject = s.type === 'object' && s.properties;
    const itemObj = s.type === 'array' && s.items ? (s.items.$ref ? defs[s.items.$ref.split('/').pop()!] : s.items) : null;
    rows.push({ name: full, type: isObject ? 'object' : itemObj?.properties ? 'array of objects' : typeOf(raw, defs), required: (schema.required ?? []).includes(name), notes: notesOf(raw, defs), description: s.description ?? raw.description ?? '' });
    if (isObject) rows.push(...fieldRows(s, `${full}.`, defs));
    if (itemObj?.properties) rows.push(...fieldRows(itemObj, `${full}[].`, defs));
  }
  return rows;
}
