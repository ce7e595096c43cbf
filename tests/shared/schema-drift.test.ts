/**
 * The TypeScript side of the two formats cannot drift from schemas/*.schema.json:
 * - shared/schema.generated.ts (the vocabulary, the limits and the document types) is exactly what
 *   scripts/gen-schema-types.ts makes of the schemas today;
 * - the hand-written document types (ChallengeSpec and its parts) have the generated types' shape,
 *   checked by the TypeScript compiler on tests/shared/schema-drift.types.ts;
 * - and both checks fail on a property added to a schema alone, or to a TypeScript type alone.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import ts from 'typescript';
import { describe, expect, it } from 'vitest';
import { GENERATED_PATH, generateFromFiles, generateSchemaModule, readSchema } from '../../scripts/gen-schema-types';
import { CHALLENGE_FORMAT_LIMITS, GATE_NAMES, MAX_ESTIMATES, METHOD_FAMILIES, TRACKS, TRACK_VIEWS, UNCERTAINTY_KINDS } from '@shared/vocabulary';
import { GATE_ARITY } from '@shared/physics/circuit';

const ROOT = fileURLToPath(new URL('../..', import.meta.url));
const TYPES_FILE = path.join(ROOT, 'tests/shared/schema-drift.types.ts');
const CHALLENGE_SPEC_FILE = path.join(ROOT, 'shared/physics/challenge-spec.ts');
type Obj = Record<string, any>;
/** parsed files shared by the type checks (each check builds a new program over them) */
const parsed = new Map<string, ts.SourceFile>();

/**
 * Type-checks tests/shared/schema-drift.types.ts (and only reports that file's errors), with some
 * files' text replaced in memory. Returns the errors as "line: message".
 */
function typeErrors(replace: Record<string, string> = {}): string[] {
  const cfg = ts.parseJsonConfigFileContent(ts.readConfigFile(path.join(ROOT, 'tsconfig.json'), ts.sys.readFile).config, ts.sys, ROOT);
  // the DOM and the ambient packages play no part in these types: leaving them out halves the time
  const options = { ...cfg.options, types: [], lib: ['lib.es2023.d.ts'] };
  const host = ts.createCompilerHost(options);
  const read = host.readFile.bind(host);
  host.readFile = (f) => replace[path.resolve(f)] ?? read(f);
  const getSourceFile = host.getSourceFile.bind(host);
  host.getSourceFile = (f, lang, onError) => {
    const text = replace[path.resolve(f)];
    if (text !== undefined) return ts.createSourceFile(f, text, lang);
    if (!parsed.has(f)) { const sf = getSourceFile(f, lang, onError); if (sf) parsed.set(f, sf); }
    return parsed.get(f);
  };
  const program = ts.createProgram({ rootNames: [TYPES_FILE], options, host });
  const sf = program.getSourceFile(TYPES_FILE)!;
  return [...program.getSyntacticDiagnostics(sf), ...program.getSemanticDiagnostics(sf)].map((d) => {
    const line = d.start !== undefined ? sf.getLineAndCharacterOfPosition(d.start).line : -1;
    return `${line + 1}: ${sf.text.split('\n')[line]?.trim()} -- ${ts.flattenDiagnosticMessageText(d.messageText, ' ')}`;
  });
}

describe('schema drift', () => {
  it('shared/schema.generated.ts is what the schemas give (else: npm run schema:types)', () => {
    expect(readFileSync(GENERATED_PATH, 'utf8'), 'shared/schema.generated.ts is stale: run `npm run schema:types`').toBe(generateFromFiles());
  });

  it('the hand-written document types have the shape of the schemas', () => {
    expect(typeErrors()).toEqual([]);
  });

  it('a property added to the challenge schema only, or to ChallengeSpec only, fails the type check', () => {
    const challenge = readSchema('challenge.schema.json') as Obj;
    challenge.properties.difficulty = { type: 'string', maxLength: 40 };
    const withSchemaProperty = generateSchemaModule(readSchema('entry.schema.json'), challenge);
    expect(withSchemaProperty).toContain('difficulty?: string;');
    const schemaOnly = typeErrors({ [GENERATED_PATH]: withSchemaProperty });
    expect(schemaOnly.join('\n')).toMatch(/Same<ChallengeSpec, ChallengeSpecJson>/);

    const spec = readFileSync(CHALLENGE_SPEC_FILE, 'utf8');
    const typeOnly = typeErrors({ [CHALLENGE_SPEC_FILE]: spec.replace('  citation?: string;\n', '  citation?: string;\n  difficulty?: string;\n') });
    expect(typeOnly.join('\n')).toMatch(/Same<ChallengeSpec, ChallengeSpecJson>/);

    // a required property the TypeScript type calls optional, and an enum value the schema lacks
    const optional = typeErrors({ [CHALLENGE_SPEC_FILE]: spec.replace('  title: string;', '  title?: string;') });
    expect(optional.join('\n')).toMatch(/Same<ChallengeSpec, ChallengeSpecJson>/);
    challenge.$defs.lattice.properties.kind.enum.push('torus');
    challenge.$defs.lattice.oneOf.push({ type: 'object', additionalProperties: false, required: ['kind', 'n'], properties: { kind: { const: 'torus' }, n: { type: 'integer' } } });
    const lattice = typeErrors({ [GENERATED_PATH]: generateSchemaModule(readSchema('entry.schema.json'), challenge) });
    expect(lattice.join('\n')).toMatch(/Same<LatticeSpec, ChallengeLattice>/);
  });

  it('a property added to the entry schema changes the generated file, and so fails the first check', () => {
    const entry = readSchema('entry.schema.json') as Obj;
    entry.$defs.estimate.properties.shots = { type: 'integer', minimum: 0 };
    const changed = generateSchemaModule(entry, readSchema('challenge.schema.json'));
    expect(changed).not.toBe(generateFromFiles());
    expect(changed).toMatch(/ {2}shots\?: number;/);
    expect(changed).toContain('"$estimate.shots": { minimum: 0 }');
  });

  it('the generator refuses a keyword it does not translate instead of guessing', () => {
    const entry = readSchema('entry.schema.json') as Obj;
    entry.properties.label.if = { minLength: 3 };
    expect(() => generateSchemaModule(entry, readSchema('challenge.schema.json'))).toThrow(/"if" is not handled/);
  });

  it('the vocabulary is the schemas\' lists and limits', () => {
    const entry = readSchema('entry.schema.json') as Obj;
    const challenge = readSchema('challenge.schema.json') as Obj;
    expect(TRACKS).toEqual(entry.properties.track.enum);
    expect(TRACK_VIEWS).toEqual(['all', ...entry.properties.track.enum]);
    expect(METHOD_FAMILIES).toEqual(entry.properties.method.properties.family.enum);
    expect(UNCERTAINTY_KINDS).toEqual(entry.$defs.estimate.properties.uncertaintyKind.enum);
    expect(MAX_ESTIMATES).toBe(entry.properties.estimates.maxItems);
    expect(CHALLENGE_FORMAT_LIMITS.qubits).toBe(challenge.$defs.qubitCount.maximum);
    expect(CHALLENGE_FORMAT_LIMITS.pauliLength).toBe(challenge.$defs.pauli.maxLength);
    // the engine's gate table covers exactly the schema's gate names
    expect(Object.keys(GATE_ARITY).sort()).toEqual([...GATE_NAMES].sort());
  });
});
