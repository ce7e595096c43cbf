/**
 * The JSON Schema check of an entry document (schemas/entry.schema.json, the single source of the
 * format), in linear time and with at most MAX_PROBLEMS problems described.
 *
 * ajv compiled with allErrors over the whole document concatenated its error list once per invalid
 * estimate (a non-inlined $ref): 80,000 empty estimates took minutes of one thread (issue 12, item
 * 1). So the envelope is validated without the estimates' items, and each estimate by its own
 * compiled validator, one by one; after MAX_PROBLEMS problems the rest are only counted.
 */
import { readFileSync } from 'node:fs';
import { Ajv2020, type ErrorObject, type ValidateFunction } from 'ajv/dist/2020.js';
import addFormatsModule from 'ajv-formats';
import type { FieldProblem } from '../../errors';
import { MAX_ESTIMATES, MAX_PROBLEMS, type Problems } from './types';
import { UNCERTAINTY_KINDS } from '@shared/vocabulary';

export const ENTRY_SCHEMA = JSON.parse(readFileSync(new URL('../../../schemas/entry.schema.json', import.meta.url), 'utf8')) as Record<string, unknown>;

const addFormats = ((addFormatsModule as unknown as { default?: typeof addFormatsModule }).default ?? addFormatsModule) as unknown as (a: Ajv2020) => void;
const ajv = new Ajv2020({ allErrors: true, verbose: true, strict: false });
addFormats(ajv);

const props = ENTRY_SCHEMA.properties as Record<string, Record<string, unknown>>;
const { items: _items, ...estimatesList } = props.estimates;
void _items;
/** the document with the list of estimates checked as a list only (type, minItems, maxItems) */
const validateEnvelope: ValidateFunction = ajv.compile({ ...ENTRY_SCHEMA, $id: String(ENTRY_SCHEMA.$id).replace(/\.schema\.json$/, ".envelope.schema.json"), properties: { ...props, estimates: estimatesList } });
ajv.addSchema(ENTRY_SCHEMA);
/** one estimate ($defs/estimate) */
const validateEstimate = ajv.getSchema(`${String(ENTRY_SCHEMA.$id)}#/$defs/estimate`)!;

// ------------------------------------------------------------------ messages
function at(doc: unknown, pointer: string): unknown {
  if (!pointer) return doc;
  let cur: unknown = doc;
  for (const raw of pointer.slice(1).split('/')) {
    const k = raw.replace(/~1/g, '/').replace(/~0/g, '~');
    if (cur === null || typeof cur !== 'object') return undefined;
    cur = (cur as Record<string, unknown>)[k];
  }
  return cur;
}
export const esc = (k: string) => k.replace(/~/g, '~0').replace(/\//g, '~1');
const show = (v: unknown) => {
  if (v === null) return 'null';
  if (Array.isArray(v)) return 'a list';
  if (typeof v === 'object') return 'an object';
  if (typeof v === 'string') return `the string ${JSON.stringify(v.length > 40 ? v.slice(0, 40) + '...' : v)}`;
  return String(v);
};
const article = (t: string) => (/^[aeiou]/.test(t) ? `an ${t}` : `a ${t}`);
const last = (p: string) => p.slice(p.lastIndexOf('/') + 1);
const clip = (k: string) => (k.length > 60 ? `${k.slice(0, 60)}...` : k);

/** '"a", "b" or "c"' */
const orList = (xs: readonly string[]) => `${xs.slice(0, -1).map((x) => JSON.stringify(x)).join(', ')} or ${JSON.stringify(xs[xs.length - 1])}`;

const REQUIRED_HINT: Record<string, string> = {
  challenge: 'name the challenge version this entry answers: {"id": "...", "version": N, "checksum": "sha256:..."} (GET /api/challenges/<id> shows them)',
  id: 'give the challenge id, e.g. "kicked-chain-60"',
  version: 'give the version number of the challenge',
  checksum: 'give the checksum of the challenge version, "sha256:<64 hex digits>" (GET /api/challenges/<id> shows it)',
  track: 'say which track: "hardware" (quantum hardware) or "classical" (classical simulation)',
  label: 'give a short name for this method configuration, shown in the standings',
  method: 'describe the method: {"family": "tensor-network", "settings": {...}}',
  family: 'give the method family, e.g. "tensor-network" or "error-mitigated-hardware"',
  estimates: 'give the list of estimates: [{"target": "...", "value": 0.5, "uncertainty": 0.01, "uncertaintyKind": "statistical"}]',
  target: 'give the target id, "<instance id>:<observable id>" (GET /api/challenges/<id>/targets lists them)',
  value: 'give the estimated expectation value',
  uncertainty: 'give the standard uncertainty (1 sigma); use 0 with uncertaintyKind "none" for a value you claim is exact',
  uncertaintyKind: `say what kind of uncertainty this is: ${orList(UNCERTAINTY_KINDS)}`,
  scale: 'give the noise-scale factor (>= 1)',
  parameter: 'give the control parameter of this point (bond dimension, threshold ...)',
  name: 'give the software name',
};

/** One ajv error as a problem; `base` is the pointer of the validated value inside the document. */
function schemaMessage(e: ErrorObject, value: unknown, base: string): FieldProblem {
  const path = base + e.instancePath;
  const v = at(value, e.instancePath);
  const p = e.params as Record<string, unknown>;
  switch (e.keyword) {
    case 'required': {
      const k = String(p.missingProperty);
      return { path: `${path}/${esc(k)}`, message: `is missing: ${REQUIRED_HINT[k] ?? 'add it'}` };
    }
    case 'additionalProperties': {
      const k = String(p.additionalProperty);
      const allowed = Object.keys(((e.parentSchema as { properties?: object })?.properties) ?? {});
      return { path: `${path}/${esc(k)}`, message: `unknown field "${clip(k)}": remove it or check the spelling${allowed.length ? ` (allowed here: ${allowed.join(', ')})` : ''}` };
    }
    case 'type': {
      const t = String(p.type);
      if ((t === 'number' || t === 'integer') && typeof v === 'string') {
        const nan = /^\s*[+-]?(nan|inf|infinity)\s*$/i.test(v);
        return { path, message: `${last(path)} must be a number, not ${show(v)}: ${nan ? 'JSON has no NaN or Infinity; leave this estimate out, or give a finite value with an honest uncertainty' : 'write the number without quotes'}` };
      }
      if (t === 'integer' && typeof v === 'number') return { path, message: `${last(path) || 'the value'} must be a whole number, not ${v}` };
      if (path === '') return { path, message: 'the document must be a JSON object {"challenge": ..., "track": ..., "label": ..., "method": ..., "estimates": [...]} (schemas/entry.schema.json)' };
      if (base && !e.instancePath) return { path, message: `each estimate must be an object {"target": ..., "value": ..., "uncertainty": ..., "uncertaintyKind": ...}, not ${show(v)}` };
      return { path, message: `${last(path)} must be ${t === 'array' ? 'a list [...]' : article(t)}, not ${show(v)}` };
    }
    case 'enum': {
      const allowed = (p.allowedValues as unknown[]).map((x) => JSON.stringify(x)).join(', ');
      return { path, message: `must be one of ${allowed}; got ${typeof v === 'string' ? JSON.stringify(v.length > 40 ? v.slice(0, 40) + '...' : v) : show(v)}` };
    }
    case 'minimum':
    case 'maximum':
    case 'exclusiveMinimum':
    case 'exclusiveMaximum': {
      const lim = p.limit as number;
      const cmp = String(p.comparison);
      if (last(path) === 'uncertainty' && e.keyword === 'minimum') return { path, message: `uncertainty must be >= 0 (a standard uncertainty, 1 sigma); got ${String(v)}` };
      return { path, message: `must be ${cmp} ${lim}; got ${String(v)}${Math.abs(lim) >= 1e15 ? ' (the limit in schemas/entry.schema.json)' : ''}` };
    }
    case 'maxItems': {
      const n = Array.isArray(v) ? v.length : 0;
      if (path === '/estimates') return { path, message: `has ${n} estimates; the limit is ${MAX_ESTIMATES} per entry (schemas/entry.schema.json): split the sweep into several entries` };
      return { path, message: `has ${n} items; at most ${String(p.limit)} are allowed here (schemas/entry.schema.json)` };
    }
    case 'minItems':
      return { path, message: path === '/estimates' ? 'is empty: give at least one estimate' : `needs at least ${String(p.limit)} item(s)` };
    case 'maxLength':
      return { path, message: `is ${typeof v === 'string' ? v.length : '?'} characters long; at most ${String(p.limit)} are allowed (schemas/entry.schema.json)` };
    case 'minLength':
      return { path, message: 'must not be empty' };
    case 'maxProperties':
      return { path, message: `has ${v && typeof v === 'object' ? Object.keys(v).length : '?'} fields; at most ${String(p.limit)} are allowed (schemas/entry.schema.json)` };
    case 'pattern': {
      const k = last(path);
      if (k === 'checksum') return { path, message: `must be the SHA-256 checksum of the challenge version: 64 lower-case hex digits, optionally prefixed "sha256:" (GET /api/challenges/<id> shows it); got ${show(v)}` };
      if (k === 'code' || k === 'preprint') return { path, message: `must be an http:// or https:// address such as "https://github.com/team/code" (no javascript:, data: or other schemes); got ${show(v)}` };
      if (k === 'doi') return { path, message: `must be a DOI such as "10.1103/PhysRevLett.130.010601" (without https://doi.org/); got ${show(v)}` };
      if (path === '/challenge/id') return { path, message: `must be a challenge id: lower-case letters, digits and dashes, e.g. "kicked-chain-60"; got ${show(v)}` };
      return { path, message: `must match the pattern ${String(p.pattern)}; got ${show(v)}` };
    }
    case 'format':
      return { path, message: `must be a full URL such as "https://github.com/team/code"; got ${show(v)}` };
    case 'anyOf':
      return { path, message: `a method setting must be a string, a number, true/false or a list of those; got ${show(v)}` };
    default:
      return { path, message: e.message ?? 'is not valid' };
  }
}

/** Collects problems, one per path, describing at most MAX_PROBLEMS and counting the rest. */
class Collector {
  readonly problems: FieldProblem[] = [];
  private readonly seen = new Set<string>();
  total = 0;
  constructor(readonly limit: number) {}
  get full() { return this.problems.length >= this.limit; }
  errors(errors: ErrorObject[] | null | undefined, value: unknown, base: string) {
    for (const e of errors ?? []) {
      if (e.schemaPath.includes('/anyOf/')) continue; // the anyOf error itself says it once
      if (this.full) { this.total++; continue; } // counted, not described
      const p = schemaMessage(e, value, base);
      if (this.seen.has(p.path)) continue;
      this.seen.add(p.path);
      this.problems.push(p);
      this.total++;
    }
  }
}

/**
 * The schema problems of a parsed document: the envelope, then each estimate one by one. At most
 * `limit` are described; `total` counts every one (an over-long list of estimates is one problem,
 * its items are not looked at).
 */
export function schemaProblems(doc: unknown, limit = MAX_PROBLEMS): Problems {
  const c = new Collector(limit);
  if (!validateEnvelope(doc)) c.errors(validateEnvelope.errors, doc, '');
  const ests = doc !== null && typeof doc === 'object' && !Array.isArray(doc) ? (doc as { estimates?: unknown }).estimates : undefined;
  if (Array.isArray(ests) && ests.length <= MAX_ESTIMATES) {
    for (let k = 0; k < ests.length; k++) {
      if (!validateEstimate(ests[k])) c.errors(validateEstimate.errors, ests[k], `/estimates/${k}`);
    }
  }
  return { problems: c.problems, total: c.total };
}
