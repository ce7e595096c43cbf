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
import { AppError, invalid, notFound, type FieldProblem } from '../errors';
import { parseStrictJson, DEFAULT_MAX_DEPTH } from '../util/strict-json';

export const ENTRY_SCHEMA = JSON.parse(readFileSync(new URL('../../schemas/entry.schema.json', import.meta.url), 'utf8')) as Record<string, unknown>;
export const MAX_ESTIMATES = 100_000;
/** problems listed in one answer: enough that a realistic upload shows all of its errors at once (issue 13) */
export const MAX_PROBLEMS = 500;
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

const isObject = (v: unknown): v is Record<string, unknown> => v !== null && typeof v === 'object' && !Array.isArray(v);
const isFiniteNumber = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);
const CHALLENGE_ID = /^[a-z0-9][a-z0-9-]*$/;
const CHECKSUM = /^(sha256:)?[0-9a-f]{64}$/;

/**
 * The challenge reference of a document that may have failed the schema, as far as it is
 * well-formed enough to look up: an id in the schema's shape, then (optionally) a well-formed
 * checksum and an integer version. Whatever is malformed the schema problems already name.
 */
interface ChallengeRef { id: string; checksum?: string; version?: number }
function challengeRef(doc: unknown): ChallengeRef | undefined {
  if (!isObject(doc) || !isObject(doc.challenge)) return undefined;
  const { id, checksum, version } = doc.challenge;
  if (typeof id !== 'string' || id.length > 80 || !CHALLENGE_ID.test(id)) return undefined;
  return {
    id,
    checksum: typeof checksum === 'string' && CHECKSUM.test(checksum) ? checksum : undefined,
    version: typeof version === 'number' && Number.isInteger(version) ? version : undefined,
  };
}

interface Resolved { problems: FieldProblem[]; challenge?: ChallengeGate; version?: VersionTargets }

async function resolveVersion(db: DbOrTx, ref: ChallengeRef, urlSlug: string | undefined): Promise<Resolved> {
  const slug = ref.id;
  if (urlSlug !== undefined && urlSlug !== slug) {
    return { problems: [{ path: '/challenge/id', message: `this entry answers "${slug}" but was posted to /api/challenges/${urlSlug}/entries: post it to /api/challenges/${slug}/entries, or fix the id` }] };
  }
  const [c] = await db.select().from(challenges).where(eq(challenges.slug, slug)).limit(1);
  if (!c || c.state === 'draft') return { problems: [{ path: '/challenge/id', message: `there is no published challenge "${slug}" (GET /api/challenges lists them)` }] };
  const challenge: ChallengeGate = { slug: c.slug, state: c.state, settings: c.settings };
  if (ref.checksum === undefined) return { problems: [], challenge }; // the schema names the checksum; no version to check the targets against
  const versions = await db.select().from(challengeVersions).where(eq(challengeVersions.challengeSlug, slug));
  const current = versions.find((x) => x.id === c.currentVersionId);
  const currentHint = current ? `the current version ${current.version} has checksum "sha256:${current.checksum}" (GET /api/challenges/${slug})` : '';
  const given = ref.checksum.replace(/^sha256:/, '');
  const v = versions.find((x) => x.checksum === given && x.state !== 'draft');
  if (!v) return { challenge, problems: [{ path: '/challenge/checksum', message: `"${ref.checksum}" is not the checksum of a published version of ${slug}; ${currentHint}` }] };
  if (v.state === 'superseded') {
    return { challenge, problems: [{ path: '/challenge/checksum', message: `version ${v.version} of ${slug} was superseded${current ? ` by version ${current.version}` : ''}${v.supersededReason ? ` (${v.supersededReason})` : ''} and takes no new entries; answer the current version: ${currentHint}` }] };
  }
  if (ref.version !== undefined && v.version !== ref.version) {
    return { challenge, problems: [{ path: '/challenge/version', message: `the checksum is that of version ${v.version} of ${slug}, not version ${ref.version}: fix one of the two` }] };
  }
  return { problems: [], challenge, version: await loadVersionTargets(db, v) };
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

// ------------------------------------------------------------------ challenge settings
/*
 * What a moderator's settings (challenges.state, challenges.settings.tracks and
 * challenges.settings.submissionWindow, see update-challenge-settings.ts) mean for entries:
 *
 * - state "closed" (the "Submissions: closed" switch): no new entries, no submissions to review and
 *   no new revisions of published entries, until a moderator opens the challenge again.
 * - tracks: the tracks that take entries; a track not listed is closed. No "tracks" setting means
 *   both are open (the default of a new challenge).
 * - submissionWindow {opensAt, closesAt}: submissions are taken from opensAt (inclusive) until
 *   closesAt (exclusive); a missing end is unbounded. Before opensAt a team may already create and
 *   edit drafts (prepared in advance, e.g. for a blind round, and submitted the moment the window
 *   opens): the answers warn when submissions open, and the submission and new revisions are
 *   refused until then. After closesAt: no new entries, no submissions, no new revisions, as for a
 *   closed challenge.
 *
 * Drafts that exist when a track, the window or the challenge closes stay editable (PUT): editing
 * harms nobody and the draft is ready if a moderator reopens or extends; the gate is the
 * submission, which is refused (409) while the settings forbid it, and the PUT answer warns so.
 * A draft may keep a track that closed after it was created, but no edit moves an entry into a
 * closed track. A returned entry is the exception: it was submitted while the challenge took it
 * and a moderator sent it back for a fix, so its resubmission continues that review and is not
 * held back by the settings (the moderator who returned it reviews the result).
 *
 * A refusal by the settings is a 409 (the document is fine; the challenge's state conflicts with
 * it, and the request can succeed once that changes); the dry run reports the same problems as
 * warnings with acceptsDrafts / acceptsSubmissions, so a team learns them before posting and
 * still gets the score preview. The rules are gateReasons and REFUSES below, and nowhere else: the
 * enforcement (gateProblems) and the public status (entryGateStatus) both apply them. The clock is
 * always the request's (ctx.now()), never the process's.
 */
export const TRACKS = ['hardware', 'classical'] as const;
export type GateAction = 'create' | 'submit' | 'revise';
/** A challenge as its settings see it. */
export interface ChallengeGate { slug: string; state: string; settings: unknown }

export function openTracks(settings: unknown): string[] {
  const t = isObject(settings) ? settings.tracks : undefined;
  if (!Array.isArray(t)) return [...TRACKS];
  return TRACKS.filter((x) => t.includes(x));
}

export function submissionWindow(settings: unknown): { opensAt: Date | null; closesAt: Date | null } {
  const w = isObject(settings) ? settings.submissionWindow : undefined;
  const date = (v: unknown) => {
    if (typeof v !== 'string') return null;
    const ms = Date.parse(v);
    return Number.isFinite(ms) ? new Date(ms) : null;
  };
  return isObject(w) ? { opensAt: date(w.opensAt), closesAt: date(w.closesAt) } : { opensAt: null, closesAt: null };
}

const TAKES_NO: Record<GateAction, string> = { create: 'takes no new entries', submit: 'takes no submissions', revise: 'takes no new revisions' };

/** The problem with a closed track, or null when the track is open (or not a track at all: the schema says so). */
export function closedTrackProblem(c: ChallengeGate, track: unknown, action: GateAction | 'move', from?: string): FieldProblem | null {
  if (typeof track !== 'string' || !(TRACKS as readonly string[]).includes(track)) return null;
  const open = openTracks(c.settings);
  if (open.includes(track)) return null;
  const fix = {
    create: ' (the track says how the values were obtained: change it only if it is wrong)',
    move: `: this entry is in the ${from ?? 'other'} track, and an edit cannot move it into a closed one`,
    submit: ': the draft cannot be submitted while its track is closed',
    revise: `: no new revision of a ${track} entry while its track is closed; the published entry stays as it is`,
  }[action];
  return { path: '/track', message: `the ${track} track of ${c.slug} is closed; open tracks: ${open.join(', ') || 'none'}${fix}` };
}

/** Why the settings hold something back now, in a form a page can phrase briefly. */
export type GateReason =
  | { kind: 'state'; state: string }
  | { kind: 'before-window'; at: Date }
  | { kind: 'after-window'; at: Date }
  | { kind: 'track-closed'; track: string };

/**
 * The one rule set: every reason the settings hold against an entry in this track now: the
 * challenge's state, the submission window (when a clock is given; the writing services always
 * give theirs) and the track. Which of them refuse which action is REFUSES'.
 */
export function gateReasons(c: ChallengeGate, track: unknown, now: Date | undefined): GateReason[] {
  const out: GateReason[] = [];
  if (c.state !== 'open') out.push({ kind: 'state', state: c.state });
  if (now) {
    const w = submissionWindow(c.settings);
    if (w.opensAt && now.getTime() < w.opensAt.getTime()) out.push({ kind: 'before-window', at: w.opensAt });
    else if (w.closesAt && now.getTime() >= w.closesAt.getTime()) out.push({ kind: 'after-window', at: w.closesAt });
  }
  if (typeof track === 'string' && (TRACKS as readonly string[]).includes(track) && !openTracks(c.settings).includes(track)) out.push({ kind: 'track-closed', track });
  return out;
}

/**
 * Which reasons refuse which action. Every reason refuses a submission and a revision; before the
 * window opens a new draft is still taken (a team prepares it and submits from opensAt on), so a
 * new entry is refused by every reason but that one.
 */
const REFUSES: Record<GateAction, (r: GateReason) => boolean> = {
  create: (r) => r.kind !== 'before-window',
  submit: () => true,
  revise: () => true,
};

function gateMessage(c: ChallengeGate, r: GateReason, action: GateAction): FieldProblem {
  const s = c.slug;
  const no = TAKES_NO[action];
  switch (r.kind) {
    case 'state':
      if (r.state !== 'closed') return { path: '/challenge/id', message: `${s} is not open (state "${r.state}") and ${no}` };
      return { path: '/challenge/id', message: `${s} is closed and ${no}${{
        create: '; a moderator can open it again',
        submit: '; the draft stays editable, and can be submitted if a moderator opens the challenge again',
        revise: '; the published entry stays as it is (a moderator can open the challenge again)',
      }[action]}` };
    case 'before-window':
      // never a refusal of a new entry (REFUSES): its warning is the submission's message
      return { path: '/challenge/id', message: `${s} ${no} before its submission window opens at ${r.at.toISOString()}${{
        create: '; a draft can be saved meanwhile',
        submit: '; a draft can be saved and edited meanwhile, and submitted from then on',
        revise: '',
      }[action]}` };
    case 'after-window':
      return { path: '/challenge/id', message: `${s} ${no} since its submission window closed at ${r.at.toISOString()}${{
        create: '; a moderator can extend the window',
        submit: '; the draft stays editable, and can be submitted if a moderator extends the window',
        revise: '; the published entry stays as it is (a moderator can extend the window)',
      }[action]}` };
    case 'track-closed':
      return closedTrackProblem(c, r.track, action)!;
  }
}

/** Every reason the settings refuse this action now (409), each naming its field. */
export function gateProblems(c: ChallengeGate, track: unknown, now: Date | undefined, action: GateAction): FieldProblem[] {
  return gateReasons(c, track, now).filter(REFUSES[action]).map((r) => gateMessage(c, r, action));
}

/**
 * What the settings let this action do now but would refuse of the draft's submission: for a new
 * entry before the window opens, that it cannot be submitted until then. Said as the submission's
 * refusal would say it; the answers carry these as warnings.
 */
export function gateWarnings(c: ChallengeGate, track: unknown, now: Date | undefined, action: GateAction): FieldProblem[] {
  return gateReasons(c, track, now).filter((r) => !REFUSES[action](r)).map((r) => gateMessage(c, r, 'submit'));
}

export interface EntryGateStatus {
  /** a new entry in at least one track would be submitted now (created and sent to review) */
  acceptsEntries: boolean;
  /** a new draft in at least one track would be stored now (before the window opens: yes, but not submitted) */
  acceptsDrafts: boolean;
  openTracks: string[];
  window: { opensAt: Date | null; closesAt: Date | null };
  /** reasons: why a submission in this track is not taken now (empty when it is) */
  tracks: Record<(typeof TRACKS)[number], { acceptsEntries: boolean; acceptsDrafts: boolean; reasons: GateReason[] }>;
}

/**
 * Whether the challenge takes submissions and new drafts now, per track and in any track, for the
 * public pages: gateReasons and REFUSES on the clock given, as gateProblems applies them to a
 * submission ('submit') and a new entry ('create'), so a page and the enforcement cannot disagree.
 */
export function entryGateStatus(c: ChallengeGate, now: Date): EntryGateStatus {
  const one = (track: (typeof TRACKS)[number]) => {
    const reasons = gateReasons(c, track, now);
    return { acceptsEntries: !reasons.some(REFUSES.submit), acceptsDrafts: !reasons.some(REFUSES.create), reasons };
  };
  const tracks = { hardware: one('hardware'), classical: one('classical') };
  return {
    acceptsEntries: tracks.hardware.acceptsEntries || tracks.classical.acceptsEntries,
    acceptsDrafts: tracks.hardware.acceptsDrafts || tracks.classical.acceptsDrafts,
    openTracks: openTracks(c.settings), window: submissionWindow(c.settings), tracks,
  };
}

/** A refusal by the challenge settings: 409, with the problems naming their fields. */
export function refuse(problems: FieldProblem[]): void {
  if (!problems.length) return;
  throw new AppError('conflict', `${problems[0].path}: ${problems[0].message}`, problems.slice(0, MAX_PROBLEMS));
}

/**
 * The challenge's state and settings inside a writing transaction, under a share lock: a moderator
 * changing the settings meanwhile (update-challenge-settings takes the row for update) waits for
 * this write, or this write sees the new settings.
 */
export async function loadGate(tx: DbOrTx, slug: string): Promise<ChallengeGate> {
  const [c] = await tx.select({ slug: challenges.slug, state: challenges.state, settings: challenges.settings }).from(challenges).where(eq(challenges.slug, slug)).for('share');
  if (!c) throw notFound(`The challenge "${slug}"`);
  return c;
}

// ------------------------------------------------------------------ the whole check
export interface EntryCheck {
  document: EntryDocument;
  version: VersionTargets;
  warnings: FieldProblem[];
  coverage: { targets: number; covered: number; fraction: number };
  /**
   * What the challenge settings refuse now: for a dry run, posting this entry; for an edit, the
   * draft's submission. Both are also in the warnings. Empty when the settings allow it.
   */
  refusals: FieldProblem[];
  /**
   * What the settings take now (gateProblems): drafts, whether this entry is stored as a new draft
   * (dry run, create) or the edit saved (update); submissions, whether it could then be sent to
   * review (a returned entry always can).
   */
  accepts: { drafts: boolean; submissions: boolean };
}

/** dry-run: settings refusals are warnings; create: they refuse (409); update: only a move into a closed track refuses, the rest warn. */
export type CheckPurpose = 'dry-run' | 'create' | 'update';
export interface CheckOptions {
  /** the challenge of the URL (create) or of the stored entry (update) */
  slug?: string;
  /** the request's clock (ctx.now()); without one the submission window is not checked here (the writing services check it with theirs) */
  now?: Date;
  /** default "create" */
  purpose?: CheckPurpose;
  /** update: the stored entry, whose track and state decide what the settings allow */
  entry?: { track: string; state: string };
}

export function problemsOrThrow(problems: FieldProblem[], total = problems.length): void {
  if (!problems.length) return;
  const listed = problems.slice(0, MAX_PROBLEMS);
  if (total > listed.length) listed.push({ path: '', message: `... and ${total - listed.length} more problem(s) not listed; fix these first` });
  throw invalid(listed);
}

/** Strict JSON from text (an already parsed value passes through), or a 400 naming the places. */
function parseStrict(input: string | Uint8Array | unknown): unknown {
  if (typeof input !== 'string' && !(input instanceof Uint8Array)) return input;
  const r = parseStrictJson(input, { maxDepth: MAX_DEPTH, maxProblems: MAX_PROBLEMS });
  if (!r.ok) problemsOrThrow(r.problems);
  return (r as { value: unknown }).value;
}

/** The request body as text (or an already parsed value) to a checked document, or a 400 naming the fields. */
export function parseEntryDocument(input: string | unknown): EntryDocument {
  const doc = parseStrict(input);
  const sp = schemaProblems(doc);
  problemsOrThrow(sp);
  return doc as EntryDocument;
}

/**
 * The whole validation in one pass: strict JSON first (a document that is not JSON has nothing
 * more to check), then the schema and the checks against the challenge together, so that one
 * answer lists every independent problem: a schema error in one estimate does not hide an unknown
 * target id in another, or a wrong checksum.
 */
export async function validateEntryDocument(db: Db, input: string | unknown, opts: CheckOptions = {}): Promise<EntryCheck> {
  const doc = parseStrict(input);
  return inspect(db, doc, schemaProblems(doc), opts);
}

/** The checks against the challenge for a document that already passed the schema (parseEntryDocument). */
export async function checkEntry(db: Db, doc: EntryDocument, opts: CheckOptions = {}): Promise<EntryCheck> {
  return inspect(db, doc, [], opts);
}

/**
 * The checks that need the challenge, over a document that may have failed the schema: each runs
 * on the parts well-formed enough for it (a well-formed challenge reference; estimates that are
 * objects with a string target; values and uncertainties that are finite numbers) and never
 * assumes more. A problem at a path the schema already names is not repeated.
 */
async function inspect(db: Db, doc: unknown, schema: FieldProblem[], opts: CheckOptions): Promise<EntryCheck> {
  const purpose = opts.purpose ?? 'create';
  const problems: FieldProblem[] = [];
  const warnings: FieldProblem[] = [];
  let total = 0;
  const add = (p: FieldProblem) => { total++; if (problems.length < MAX_PROBLEMS) problems.push(p); };

  const ref = challengeRef(doc);
  const rv: Resolved = ref ? await resolveVersion(db, ref, opts.slug) : { problems: [] };
  rv.problems.forEach(add);
  const vt = rv.version;

  const seen = new Map<string, number>();
  const raw = isObject(doc) ? doc.estimates : undefined;
  // an over-long list is one problem (the schema's), not one per estimate
  const ests: unknown[] = Array.isArray(raw) && raw.length <= MAX_ESTIMATES ? raw : [];
  if (vt) {
    for (let k = 0; k < ests.length; k++) {
      const e = ests[k];
      if (!isObject(e) || typeof e.target !== 'string' || e.target.length > 200) continue;
      const key = e.target;
      const t = vt.targets.get(key);
      if (!t) {
        add({ path: `/estimates/${k}/target`, message: problems.length < MAX_PROBLEMS
          ? `"${key}" is not a target of ${vt.slug} v${vt.version}; target ids look like "${suggestTarget(key, vt)}" (GET /api/challenges/${vt.slug}/targets lists them)`
          : 'not a target' });
        continue;
      }
      const first = seen.get(key);
      if (first !== undefined) {
        add({ path: `/estimates/${k}/target`, message: `"${key}" appears twice (first at /estimates/${first}): give one estimate per target` });
        continue;
      }
      seen.set(key, k);
      if (!isFiniteNumber(e.value) || !isFiniteNumber(e.uncertainty) || e.uncertainty < 0) continue;
      const a = Math.abs(e.value);
      if (a > t.bound + 3 * e.uncertainty) {
        add({ path: `/estimates/${k}/value`, message: `|value| = ${fmt(a)} exceeds the physical bound ${fmt(t.bound)} of observable ${t.observable} by more than 3 uncertainties; check the sign convention or the normalisation` });
      } else if (a > t.bound && warnings.length < MAX_PROBLEMS) {
        warnings.push({ path: `/estimates/${k}/value`, message: `|value| = ${fmt(a)} exceeds the physical bound ${fmt(t.bound)} of observable ${t.observable}, within 3 uncertainties (u = ${fmt(e.uncertainty)}): accepted, but worth a second look` });
      }
    }
  }

  // the challenge settings (see the section above): what refuses now, what only warns
  const track = isObject(doc) ? doc.track : undefined;
  let refusing: FieldProblem[] = [];
  let refusals: FieldProblem[] = [];
  // what a new draft may do but its submission may not yet (before the window opens): warnings only
  let heldBack: FieldProblem[] = [];
  let accepts = { drafts: true, submissions: true };
  const c = rv.challenge;
  if (c) {
    if (purpose === 'create' || purpose === 'dry-run') {
      refusals = gateProblems(c, track, opts.now, 'create');
      if (purpose === 'create') refusing = refusals;
      heldBack = gateWarnings(c, track, opts.now, 'create');
      accepts = { drafts: refusals.length === 0, submissions: gateProblems(c, track, opts.now, 'submit').length === 0 };
    } else {
      const e = opts.entry;
      const move = e && track !== e.track ? closedTrackProblem(c, track, 'move', e.track) : null;
      if (move) refusing = [move];
      // a returned entry's resubmission is not held back (see above); a draft's is
      if (!e || e.state === 'draft') refusals = gateProblems(c, track, opts.now, 'submit').filter((p) => !(move && p.path === '/track'));
      accepts = { drafts: !move, submissions: !move && refusals.length === 0 };
    }
  }

  const named = new Set(schema.map((p) => p.path));
  const beyond = problems.filter((p) => !named.has(p.path));
  if (schema.length || beyond.length) {
    const first = refusing.filter((p) => !named.has(p.path));
    problemsOrThrow([...first, ...schema, ...beyond], first.length + schema.length + total - (problems.length - beyond.length));
  }
  refuse(refusing);
  if (!vt || !c) throw invalid([{ path: '/challenge', message: 'name the challenge version this entry answers' }]); // unreachable: a document that passes the schema resolves or has a problem
  const document = doc as EntryDocument;

  const covered = seen.size;
  const n = vt.targets.size;
  const coverage = { targets: n, covered, fraction: n ? covered / n : 0 };
  if (covered < n) {
    warnings.unshift({ path: '/estimates', message: `covers ${covered} of the ${n} targets of ${vt.slug} v${vt.version} (${(100 * coverage.fraction).toFixed(1)}%): a partial sweep is accepted, and moderators and the standings show the coverage` });
  }
  const hw = document.method.family === 'error-mitigated-hardware';
  if (document.track === 'classical' && hw) warnings.push({ path: '/track', message: 'track "classical" with method family "error-mitigated-hardware": use track "hardware" for results from a quantum processor' });
  if (document.track === 'hardware' && !hw && document.method.family !== 'other') warnings.push({ path: '/method/family', message: `track "hardware" with method family "${document.method.family}": hardware entries normally use "error-mitigated-hardware"` });
  warnings.unshift(...refusals, ...heldBack);
  return { document, version: vt, warnings, coverage, refusals, accepts };
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
