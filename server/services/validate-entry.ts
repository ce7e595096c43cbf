/**
 * Validating an entry document: strict JSON (duplicate keys, huge integers, depth), the JSON
 * Schema (schemas/entry.schema.json, the single source of the format), then the checks that need
 * the challenge version: checksum, target ids, duplicates, physical bounds (+/- 3 sigma rule) and
 * coverage. Every problem names its field by JSON pointer and says how to fix it. Nothing here
 * writes to the database.
 */
import { readFileSync } from 'node:fs';
import { and, asc, eq, isNotNull, lte, or, isNull } from 'drizzle-orm';
import { Ajv2020, type ErrorObject } from 'ajv/dist/2020.js';
import addFormatsModule from 'ajv-formats';
import { scoreAgainstReference, scoreSweep, type SweepItem } from '@shared/scoring';
import type { Db, DbOrTx } from '../db/client';
import { challengeVersions, challenges, observables, references, targets } from '../db/schema';
import { invalid, type FieldProblem } from '../errors';
import { parseStrictJson, DEFAULT_MAX_DEPTH } from '../util/strict-json';

export const ENTRY_SCHEMA = JSON.parse(readFileSync(new URL('../../schemas/entry.schema.json', import.meta.url), 'utf8')) as Record<string, unknown>;
export const MAX_ESTIMATES = 100_000;
export const MAX_PROBLEMS = 50;
export const MAX_DEPTH = DEFAULT_MAX_DEPTH;

export type UncertaintyKind = 'statistical' | 'systematic' | 'bound' | 'none';
export interface EntryEstimate {
  target: string;
  value: number;
  uncertainty: number;
  uncertaintyKind: UncertaintyKind;
  unmitigated?: number;
  noiseScaled?: { scale: number; value: number; uncertainty: number; shots?: number }[];
  convergence?: { parameter: number; value: number; cost?: number }[];
}
export interface EntryDocument {
  $schema?: string;
  challenge: { id: string; version: number; checksum: string };
  track: 'hardware' | 'classical';
  label: string;
  method: { family: string; description?: string; settings?: Record<string, unknown> };
  resources?: Record<string, unknown>;
  links?: Record<string, string>;
  license?: string;
  notes?: string;
  estimates: EntryEstimate[];
}

const addFormats = ((addFormatsModule as unknown as { default?: typeof addFormatsModule }).default ?? addFormatsModule) as unknown as (a: Ajv2020) => void;
const ajv = new Ajv2020({ allErrors: true, verbose: true, strict: false });
addFormats(ajv);
const validateSchema = ajv.compile(ENTRY_SCHEMA);

// ------------------------------------------------------------------ schema problems
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
const esc = (k: string) => k.replace(/~/g, '~0').replace(/\//g, '~1');
const show = (v: unknown) => {
  if (v === null) return 'null';
  if (Array.isArray(v)) return 'a list';
  if (typeof v === 'object') return 'an object';
  if (typeof v === 'string') return `the string ${JSON.stringify(v.length > 40 ? v.slice(0, 40) + '...' : v)}`;
  return String(v);
};
const article = (t: string) => (/^[aeiou]/.test(t) ? `an ${t}` : `a ${t}`);
const last = (p: string) => p.slice(p.lastIndexOf('/') + 1);

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
  uncertaintyKind: 'say what kind of uncertainty this is: "statistical", "systematic", "bound" or "none"',
  scale: 'give the noise-scale factor (>= 1)',
  parameter: 'give the control parameter of this point (bond dimension, threshold ...)',
  name: 'give the software name',
};

function schemaMessage(e: ErrorObject, doc: unknown): FieldProblem {
  const path = e.instancePath;
  const v = at(doc, path);
  const p = e.params as Record<string, unknown>;
  switch (e.keyword) {
    case 'required': {
      const k = String(p.missingProperty);
      return { path: `${path}/${esc(k)}`, message: `is missing: ${REQUIRED_HINT[k] ?? 'add it'}` };
    }
    case 'additionalProperties': {
      const k = String(p.additionalProperty);
      const allowed = Object.keys(((e.parentSchema as { properties?: object })?.properties) ?? {});
      return { path: `${path}/${esc(k)}`, message: `unknown field "${k}": remove it or check the spelling${allowed.length ? ` (allowed here: ${allowed.join(', ')})` : ''}` };
    }
    case 'type': {
      const t = String(p.type);
      if ((t === 'number' || t === 'integer') && typeof v === 'string') {
        const nan = /^\s*[+-]?(nan|inf|infinity)\s*$/i.test(v);
        return { path, message: `${last(path)} must be a number, not ${show(v)}: ${nan ? 'JSON has no NaN or Infinity; leave this estimate out, or give a finite value with an honest uncertainty' : 'write the number without quotes'}` };
      }
      if (t === 'integer' && typeof v === 'number') return { path, message: `${last(path) || 'the value'} must be a whole number, not ${v}` };
      if (path === '') return { path, message: 'the document must be a JSON object {"challenge": ..., "track": ..., "label": ..., "method": ..., "estimates": [...]} (schemas/entry.schema.json)' };
      return { path, message: `${last(path)} must be ${t === 'array' ? 'a list [...]' : article(t)}, not ${show(v)}` };
    }
    case 'enum': {
      const allowed = (p.allowedValues as unknown[]).map((x) => JSON.stringify(x)).join(', ');
      return { path, message: `must be one of ${allowed}; got ${typeof v === 'string' ? JSON.stringify(v) : show(v)}` };
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

export function schemaProblems(doc: unknown): FieldProblem[] {
  if (validateSchema(doc)) return [];
  const out: FieldProblem[] = [];
  const seen = new Set<string>();
  for (const e of validateSchema.errors ?? []) {
    if (e.schemaPath.includes('/anyOf/')) continue; // the anyOf error itself says it once
    const p = schemaMessage(e, doc);
    if (seen.has(p.path)) continue;
    seen.add(p.path);
    out.push(p);
  }
  return out;
}

// ------------------------------------------------------------------ the challenge version
export interface VersionTargets {
  versionId: string;
  slug: string;
  version: number;
  checksum: string;
  /** target key -> [bound, observable key] */
  targets: Map<string, { bound: number; observable: string }>;
}

/** Published versions never change, so their targets are cached by version id. */
const targetCache = new Map<string, VersionTargets>();

export async function loadVersionTargets(db: DbOrTx, v: { id: string; challengeSlug: string; version: number; checksum: string }): Promise<VersionTargets> {
  const hit = targetCache.get(v.id);
  if (hit) return hit;
  const rows = await db.select({ key: targets.key, bound: observables.bound, observable: observables.key })
    .from(targets).innerJoin(observables, eq(observables.id, targets.observableId)).where(eq(targets.versionId, v.id)).orderBy(asc(targets.key));
  const out: VersionTargets = { versionId: v.id, slug: v.challengeSlug, version: v.version, checksum: v.checksum, targets: new Map(rows.map((r) => [r.key, { bound: r.bound, observable: r.observable }])) };
  if (targetCache.size > 20) targetCache.delete(targetCache.keys().next().value as string);
  targetCache.set(v.id, out);
  return out;
}

async function resolveVersion(db: Db, doc: EntryDocument, urlSlug: string | undefined): Promise<{ problems: FieldProblem[]; version?: VersionTargets }> {
  const slug = doc.challenge.id;
  if (urlSlug !== undefined && urlSlug !== slug) {
    return { problems: [{ path: '/challenge/id', message: `this entry answers "${slug}" but was posted to /api/challenges/${urlSlug}/entries: post it to /api/challenges/${slug}/entries, or fix the id` }] };
  }
  const [c] = await db.select().from(challenges).where(eq(challenges.slug, slug)).limit(1);
  if (!c || c.state === 'draft') return { problems: [{ path: '/challenge/id', message: `there is no published challenge "${slug}" (GET /api/challenges lists them)` }] };
  const versions = await db.select().from(challengeVersions).where(eq(challengeVersions.challengeSlug, slug));
  const current = versions.find((x) => x.id === c.currentVersionId);
  const currentHint = current ? `the current version ${current.version} has checksum "sha256:${current.checksum}" (GET /api/challenges/${slug})` : '';
  const given = doc.challenge.checksum.replace(/^sha256:/, '');
  const v = versions.find((x) => x.checksum === given && x.state !== 'draft');
  if (!v) return { problems: [{ path: '/challenge/checksum', message: `"${doc.challenge.checksum}" is not the checksum of a published version of ${slug}; ${currentHint}` }] };
  if (v.state === 'superseded') {
    return { problems: [{ path: '/challenge/checksum', message: `version ${v.version} of ${slug} was superseded${current ? ` by version ${current.version}` : ''}${v.supersededReason ? ` (${v.supersededReason})` : ''} and takes no new entries; answer the current version: ${currentHint}` }] };
  }
  if (v.version !== doc.challenge.version) {
    return { problems: [{ path: '/challenge/version', message: `the checksum is that of version ${v.version} of ${slug}, not version ${doc.challenge.version}: fix one of the two` }] };
  }
  if (c.state === 'closed') return { problems: [{ path: '/challenge/id', message: `${slug} is closed and takes no new entries` }] };
  return { problems: [], version: await loadVersionTargets(db, v) };
}

function suggestTarget(given: string, vt: VersionTargets): string {
  const [inst, obs] = given.split(':');
  let best = '';
  let bestScore = -1;
  for (const key of vt.targets.keys()) {
    const [ki, ko] = key.split(':');
    let s = 0;
    while (s < ki.length && s < (inst ?? '').length && ki[s] === inst[s]) s++;
    const score = s + (ko === obs ? 1000 : 0);
    if (score > bestScore) { bestScore = score; best = key; }
  }
  return best;
}

const fmt = (x: number) => String(Number(x.toPrecision(6)));

// ------------------------------------------------------------------ the whole check
export interface EntryCheck {
  document: EntryDocument;
  version: VersionTargets;
  warnings: FieldProblem[];
  coverage: { targets: number; covered: number; fraction: number };
}

export function problemsOrThrow(problems: FieldProblem[], total = problems.length): void {
  if (!problems.length) return;
  const listed = problems.slice(0, MAX_PROBLEMS);
  if (total > listed.length) listed.push({ path: '', message: `... and ${total - listed.length} more problem(s) not listed; fix these first` });
  throw invalid(listed);
}

/** The request body as text (or an already parsed value) to a checked document, or a 400 naming the fields. */
export function parseEntryDocument(input: string | unknown): EntryDocument {
  let doc: unknown = input;
  if (typeof input === 'string') {
    const r = parseStrictJson(input, { maxDepth: MAX_DEPTH, maxProblems: MAX_PROBLEMS });
    if (!r.ok) problemsOrThrow(r.problems);
    doc = (r as { value: unknown }).value;
  }
  const sp = schemaProblems(doc);
  problemsOrThrow(sp);
  return doc as EntryDocument;
}

export async function checkEntry(db: Db, doc: EntryDocument, opts: { slug?: string } = {}): Promise<EntryCheck> {
  const rv = await resolveVersion(db, doc, opts.slug);
  problemsOrThrow(rv.problems);
  const vt = rv.version!;
  const problems: FieldProblem[] = [];
  const warnings: FieldProblem[] = [];
  let total = 0;
  const add = (p: FieldProblem) => { total++; if (problems.length < MAX_PROBLEMS) problems.push(p); };
  const seen = new Map<string, number>();
  const ests = doc.estimates;
  for (let k = 0; k < ests.length; k++) {
    const e = ests[k];
    const t = vt.targets.get(e.target);
    if (!t) {
      add({ path: `/estimates/${k}/target`, message: problems.length < MAX_PROBLEMS
        ? `"${e.target}" is not a target of ${vt.slug} v${vt.version}; target ids look like "${suggestTarget(e.target, vt)}" (GET /api/challenges/${vt.slug}/targets lists them)`
        : 'not a target' });
      continue;
    }
    const first = seen.get(e.target);
    if (first !== undefined) {
      add({ path: `/estimates/${k}/target`, message: `"${e.target}" appears twice (first at /estimates/${first}): give one estimate per target` });
      continue;
    }
    seen.set(e.target, k);
    const a = Math.abs(e.value);
    if (a > t.bound + 3 * e.uncertainty) {
      add({ path: `/estimates/${k}/value`, message: `|value| = ${fmt(a)} exceeds the physical bound ${fmt(t.bound)} of observable ${t.observable} by more than 3 uncertainties; check the sign convention or the normalisation` });
    } else if (a > t.bound && warnings.length < MAX_PROBLEMS) {
      warnings.push({ path: `/estimates/${k}/value`, message: `|value| = ${fmt(a)} exceeds the physical bound ${fmt(t.bound)} of observable ${t.observable}, within 3 uncertainties (u = ${fmt(e.uncertainty)}): accepted, but worth a second look` });
    }
  }
  problemsOrThrow(problems, total);
  const covered = seen.size;
  const n = vt.targets.size;
  const coverage = { targets: n, covered, fraction: n ? covered / n : 0 };
  if (covered < n) {
    warnings.unshift({ path: '/estimates', message: `covers ${covered} of the ${n} targets of ${vt.slug} v${vt.version} (${(100 * coverage.fraction).toFixed(1)}%): a partial sweep is accepted, and moderators and the standings show the coverage` });
  }
  const hw = doc.method.family === 'error-mitigated-hardware';
  if (doc.track === 'classical' && hw) warnings.push({ path: '/track', message: 'track "classical" with method family "error-mitigated-hardware": use track "hardware" for results from a quantum processor' });
  if (doc.track === 'hardware' && !hw && doc.method.family !== 'other') warnings.push({ path: '/method/family', message: `track "hardware" with method family "${doc.method.family}": hardware entries normally use "error-mitigated-hardware"` });
  return { document: doc, version: vt, warnings, coverage };
}

// ------------------------------------------------------------------ dry-run score preview
/** Scores against the references the public can see (exact and not sealed), as the dry run shows them. */
export async function previewScores(db: Db, check: EntryCheck, now: Date, listLimit = 1000) {
  const refs = await db.select({ key: targets.key, value: references.value, uncertainty: references.uncertainty })
    .from(references).innerJoin(targets, eq(targets.id, references.targetId))
    .where(and(eq(targets.versionId, check.version.versionId), isNotNull(references.value), or(isNull(references.sealedUntil), lte(references.sealedUntil, now))));
  const refMap = new Map(refs.map((r) => [r.key, r.uncertainty > 0 ? { value: r.value!, uncertainty: r.uncertainty } : { value: r.value! }]));
  const est = new Map(check.document.estimates.map((e) => [e.target, e]));
  const items: SweepItem[] = [];
  for (const key of check.version.targets.keys()) {
    const e = est.get(key);
    items.push({ targetId: key, estimate: e ? { value: e.value, uncertainty: e.uncertainty } : undefined, reference: refMap.get(key) });
  }
  const sweep = scoreSweep(items);
  const perTarget: { target: string; value: number; uncertainty: number; reference: number; error: number; z: number | null; covered: boolean }[] = [];
  for (const e of check.document.estimates) {
    if (perTarget.length >= listLimit) break;
    const r = refMap.get(e.target);
    if (!r) continue;
    const s = scoreAgainstReference(e, r);
    perTarget.push({ target: e.target, value: e.value, uncertainty: e.uncertainty, reference: r.value, error: s.error, z: Number.isFinite(s.z) ? s.z : null, covered: s.covered });
  }
  return { exactReferences: refMap.size, sweep, targets: perTarget, listed: perTarget.length < sweep.verifiable.scored ? `the first ${perTarget.length} of ${sweep.verifiable.scored}` : 'all' };
}
