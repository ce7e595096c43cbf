/**
 * `npm run schema:types`: writes shared/schema.generated.ts from schemas/entry.schema.json and
 * schemas/challenge.schema.json (the single sources of both formats):
 * - every enum of each schema as a readonly tuple (the vocabulary: tracks, method families,
 *   uncertainty kinds, lattice kinds, circuit families, gate names);
 * - every limit (minLength, maxLength, minItems, maxItems, minimum, maximum, maxProperties) by path;
 * - the documents' TypeScript types, as the schema states them.
 * shared/vocabulary.ts names what the code uses; tests/shared/schema-drift.test.ts regenerates the
 * file and fails on a difference, and compares the hand-written document types with these.
 *
 * Paths: a root property is its name ("label"), a nested one is dotted ("method.family"), "[]" is a
 * list's item ("estimates[]"), "$name" a definition ("$estimate.noiseScaled[].scale"), and
 * "<const>" the branch of a oneOf whose discriminator is that constant ("$lattice<ring>.n").
 *
 * The generator covers the keywords these two schemas use; anything else stops it with an error
 * naming the keyword, so a schema that outgrows it cannot produce a silently wrong type.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { fileURLToPath, pathToFileURL } from 'node:url';

type Node = Record<string, unknown> | boolean;
type Obj = Record<string, unknown>;

const LIMIT_KEYS = ['minLength', 'maxLength', 'minItems', 'maxItems', 'minimum', 'maximum', 'maxProperties'] as const;
/** keywords that only constrain values (checked by ajv), with no effect on the TypeScript type */
const VALUE_ONLY = new Set(['$schema', '$id', 'title', 'description', 'format', 'pattern', 'uniqueItems', 'discriminator', ...LIMIT_KEYS]);
const HANDLED = new Set(['type', 'properties', 'required', 'additionalProperties', 'items', 'enum', 'const', '$ref', '$defs', 'oneOf', 'anyOf']);

const pascal = (s: string) => s.replace(/(^|[-_])([a-z])/g, (_m, _p, c: string) => c.toUpperCase()).replace(/^[a-z]/, (c) => c.toUpperCase());
const lit = (v: unknown) => JSON.stringify(v);
const key = (k: string) => (/^[A-Za-z_$][A-Za-z0-9_$]*$/.test(k) ? k : JSON.stringify(k));
const doc = (n: Obj, indent: string) => (typeof n.description === 'string' ? `${indent}/** ${n.description.replace(/\*\//g, '* /')} */\n` : '');

interface Collected { enums: [string, unknown[]][]; limits: [string, Obj][] }

/** Enums and limits of one schema, by path, in document order. */
function collect(schema: Obj): Collected {
  const out: Collected = { enums: [], limits: [] };
  const walk = (n: Node, path: string) => {
    if (typeof n === 'boolean') return;
    if (Array.isArray(n.enum)) out.enums.push([path, n.enum]);
    const lim: Obj = {};
    for (const k of LIMIT_KEYS) if (n[k] !== undefined) lim[k] = n[k];
    if (Object.keys(lim).length) out.limits.push([path, lim]);
    const join = (p: string, k: string) => (p ? `${p}.${k}` : k);
    for (const [k, v] of Object.entries((n.properties ?? {}) as Obj)) walk(v as Node, join(path, k));
    if (n.items && typeof n.items === 'object') walk(n.items as Node, `${path}[]`);
    if (n.additionalProperties && typeof n.additionalProperties === 'object') walk(n.additionalProperties as Node, `${path}{}`);
    for (const kw of ['oneOf', 'anyOf'] as const) {
      (n[kw] as Node[] | undefined)?.forEach((b, i) => {
        const c = typeof b === 'object' ? ((b.properties as Obj | undefined)?.[((n.discriminator as Obj | undefined)?.propertyName as string) ?? ''] as Obj | undefined)?.const : undefined;
        walk(b, c !== undefined ? `${path}<${String(c)}>` : `${path}|${i}`);
      });
    }
    for (const [k, v] of Object.entries((n.$defs ?? {}) as Obj)) walk(v as Node, `$${k}`);
  };
  walk(schema, '');
  return out;
}

/** The TypeScript type of a schema node (`prefix` names the definitions: EntryEstimate, ChallengeLattice). */
function typeOf(n: Node, prefix: string, indent: string, where: string): string {
  if (n === true) return 'unknown';
  if (n === false) return 'never';
  for (const k of Object.keys(n)) if (!HANDLED.has(k) && !VALUE_ONLY.has(k)) throw new Error(`${where}: the keyword "${k}" is not handled by scripts/gen-schema-types.ts`);
  if (typeof n.$ref === 'string') {
    const m = /^#\/\$defs\/(.+)$/.exec(n.$ref);
    if (!m) throw new Error(`${where}: only local $refs (#/$defs/...) are handled, got ${n.$ref}`);
    return prefix + pascal(m[1]);
  }
  if (n.const !== undefined) return lit(n.const);
  if (Array.isArray(n.enum)) return n.enum.map(lit).join(' | ');
  if (Array.isArray(n.anyOf)) return (n.anyOf as Node[]).map((b, i) => typeOf(b, prefix, indent, `${where}/anyOf/${i}`)).join(' | ');
  const props = (n.properties ?? {}) as Obj;
  const required = new Set((n.required ?? []) as string[]);
  if (Array.isArray(n.oneOf)) {
    const branches = n.oneOf as Obj[];
    // a oneOf whose branches only require keys: exactly one of those keys is present
    if (branches.every((b) => Object.keys(b).every((k) => k === 'required' || k === 'properties') && Object.values((b.properties ?? {}) as Obj).every((v) => v === true))) {
      const own = branches.map((b) => new Set((b.required ?? []) as string[]));
      return branches.map((_b, i) => {
        const others = new Set(own.filter((_s, j) => j !== i).flatMap((s) => [...s]).filter((k) => !own[i].has(k)));
        return objectType(Object.fromEntries(Object.entries(props).filter(([k]) => !others.has(k))), new Set([...required, ...own[i]]), undefined, prefix, indent, where);
      }).join(' | ');
    }
    // a discriminated oneOf: the branches carry the whole object
    return branches.map((b, i) => typeOf(b, prefix, indent, `${where}/oneOf/${i}`)).join(' | ');
  }
  const types = Array.isArray(n.type) ? (n.type as string[]) : n.type === undefined ? [] : [n.type as string];
  if (types.length !== 1) throw new Error(`${where}: a node needs exactly one "type" (or $ref, const, enum, anyOf, oneOf)`);
  switch (types[0]) {
    case 'string': return 'string';
    case 'number': case 'integer': return 'number';
    case 'boolean': return 'boolean';
    case 'null': return 'null';
    case 'array': {
      const t = n.items === undefined ? 'unknown' : typeOf(n.items as Node, prefix, indent, `${where}/items`);
      return /[|&]/.test(t) ? `(${t})[]` : `${t}[]`;
    }
    case 'object': return objectType(props, required, n.additionalProperties as Node | undefined, prefix, indent, where);
    default: throw new Error(`${where}: type "${types[0]}" is not handled`);
  }
}

function objectType(props: Obj, required: Set<string>, additional: Node | undefined, prefix: string, indent: string, where: string): string {
  const inner = `${indent}  `;
  const lines = Object.entries(props).map(([k, v]) =>
    `${typeof v === 'object' ? doc(v as Obj, inner) : ''}${inner}${key(k)}${required.has(k) ? '' : '?'}: ${typeOf(v as Node, prefix, inner, `${where}/properties/${k}`)};`);
  if (additional !== undefined && additional !== false) {
    const t = typeOf(additional, prefix, inner, `${where}/additionalProperties`);
    if (!lines.length) return `Record<string, ${t}>`;
    lines.push(`${inner}[k: string]: ${t};`);
  }
  return `{\n${lines.join('\n')}\n${indent}}`;
}

function section(schema: Obj, prefix: string, docName: string, file: string): string {
  const c = collect(schema);
  const enums = c.enums.map(([p, v]) => `  ${lit(p)}: [${v.map(lit).join(', ')}],`).join('\n');
  const limits = c.limits.map(([p, l]) => `  ${lit(p)}: { ${Object.entries(l).map(([k, v]) => `${k}: ${String(v)}`).join(', ')} },`).join('\n');
  const defs = Object.entries((schema.$defs ?? {}) as Obj).map(([name, d]) =>
    `${doc(d as Obj, '')}export type ${prefix}${pascal(name)} = ${typeOf(d as Node, prefix, '', `${file}#/$defs/${name}`)};`).join('\n');
  const { $defs: _d, ...root } = schema;
  void _d;
  return [
    `// ------------------------------------------------------------------ ${file}`,
    `/** Every enum of ${file}, by path. */\nexport const ${prefix.toUpperCase()}_ENUMS = {\n${enums}\n} as const;`,
    `/** Every limit of ${file}, by path. */\nexport const ${prefix.toUpperCase()}_LIMITS = {\n${limits}\n} as const;`,
    defs,
    `${doc(schema, '')}export type ${docName} = ${typeOf(root, prefix, '', file)};`,
  ].join('\n\n');
}

/** The whole generated module, from the two parsed schemas. */
export function generateSchemaModule(entry: Obj, challenge: Obj): string {
  return [
    '// Generated by scripts/gen-schema-types.ts from schemas/entry.schema.json and schemas/challenge.schema.json.',
    '// Do not edit: change the schema and run `npm run schema:types` (tests/shared/schema-drift.test.ts',
    '// fails when this file is not what the schemas give). Names for the code: shared/vocabulary.ts.',
    '',
    section(entry, 'Entry', 'EntryDocumentJson', 'entry.schema.json'),
    '',
    section(challenge, 'Challenge', 'ChallengeSpecJson', 'challenge.schema.json'),
    '',
  ].join('\n');
}

export const GENERATED_PATH = fileURLToPath(new URL('../shared/schema.generated.ts', import.meta.url));
export const readSchema = (name: string): Obj => JSON.parse(readFileSync(new URL(`../schemas/${name}`, import.meta.url), 'utf8')) as Obj;
export const generateFromFiles = () => generateSchemaModule(readSchema('entry.schema.json'), readSchema('challenge.schema.json'));

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  writeFileSync(GENERATED_PATH, generateFromFiles());
  console.log(`wrote ${GENERATED_PATH}`);
}
