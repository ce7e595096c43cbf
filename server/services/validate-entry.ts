/**
 * Validating an entry document, the whole check in one place: strict JSON (duplicate keys, huge
 * integers, depth, NUL characters), the JSON Schema (schemas/entry.schema.json, the single source
 * of the format), then the checks that need the challenge version: checksum, target ids,
 * duplicates, physical bounds (+/- 3 sigma rule), coverage, and what the challenge settings allow
 * now. Every problem names its field by JSON pointer and says how to fix it; at most MAX_PROBLEMS
 * are listed, the rest counted. Nothing here writes to the database.
 *
 * The concerns live in entry-validation/: the schema (schema.ts), the checks against the version's
 * targets (checks.ts), the challenge settings (gate.ts: gateReasons and REFUSES, the one rule set),
 * the version look-up (version.ts), the score preview (preview.ts). The document-sized steps run in
 * a document thread (server/jobs/thread-pool.ts, ctx.threads) holding the parsed document, so no
 * document of any size the limits allow holds the event loop; only the look-ups run here.
 */
import type { Db } from '../db/client';
import { PUBLIC_VIEWER, visibleReferences } from '../queries/visibility';
import { invalid, type FieldProblem } from '../errors';
import type { ThreadPool } from '../jobs/thread-pool';
import { documentWarnings, type EstimateChecks } from './entry-validation/checks';
import { closedTrackProblem, gateProblems, gateWarnings, refuse } from './entry-validation/gate';
import { scorePreview, type PublicReference, type ScorePreview } from './entry-validation/preview';
import { EntryDocumentSession, type ParseOutcome } from './entry-validation/session';
import { MAX_PROBLEMS, type EntryDocument, type VersionTargets } from './entry-validation/types';
import { resolveVersion, type Resolved } from './entry-validation/version';

export * from './entry-validation/types';
export * from './entry-validation/gate';
export { ENTRY_SCHEMA, schemaProblems } from './entry-validation/schema';
export { loadVersionTargets } from './entry-validation/version';

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
  /** the dry run's score preview (CheckOptions.preview), computed beside the document */
  preview?: ScorePreview;
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
  /** where the document-sized steps run (ctx.threads); without it, in this thread (tests, benches) */
  threads?: ThreadPool;
  /** compute the score preview against the public references at this moment (the dry run) */
  preview?: { now: Date; listLimit?: number };
}

/** A 400 listing at most MAX_PROBLEMS problems, and how many more there were. */
export function problemsOrThrow(problems: FieldProblem[], total = problems.length): void {
  if (!problems.length) return;
  const listed = problems.slice(0, MAX_PROBLEMS);
  if (total > listed.length) listed.push({ path: '', message: `... and ${total - listed.length} more problem(s) not listed; fix these first` });
  throw invalid(listed);
}

/** The steps of a check on one held document, in a document thread or here. */
interface Steps {
  parse(input: unknown): Promise<ParseOutcome>;
  check(vt: VersionTargets): Promise<EstimateChecks>;
  document(): Promise<EntryDocument>;
  preview(a: { targetKeys: string[]; refs: Map<string, PublicReference>; listLimit?: number }): Promise<ScorePreview>;
  end(): void;
}

function localSteps(): Steps {
  const s = new EntryDocumentSession();
  return {
    parse: async (input) => s.parse(input), check: async (vt) => s.check(vt), document: async () => s.document(),
    preview: async (a) => s.preview(a), end: () => s.end(),
  };
}

async function threadSteps(pool: ThreadPool): Promise<Steps> {
  const t = await pool.session();
  return {
    parse: async (input) => {
      if (!(input instanceof Uint8Array) && typeof input !== 'string') throw new Error('a document thread parses bytes or text');
      // a copy of exactly the document's bytes, moved (not copied again) to the thread: the request's
      // buffer is a view of a reused slot buffer that may be larger
      const bytes = typeof input === 'string' ? new TextEncoder().encode(input) : new Uint8Array(input);
      return t.call('entry.parse', bytes, [bytes.buffer as ArrayBuffer]);
    },
    check: (vt) => t.call('entry.check', vt),
    document: () => t.call('entry.document', null),
    preview: (a) => t.call('entry.preview', a),
    end: () => { void t.call('entry.end', null).catch(() => undefined).finally(() => t.release()); },
  };
}

/**
 * The whole validation in one pass: strict JSON first (a document that is not JSON has nothing
 * more to check), then the schema and the checks against the challenge together, so that one
 * answer lists every independent problem: a schema error in one estimate does not hide an unknown
 * target id in another, or a wrong checksum.
 */
export async function validateEntryDocument(db: Db, input: string | Uint8Array | unknown, opts: CheckOptions = {}): Promise<EntryCheck> {
  const steps = opts.threads && (typeof input === 'string' || input instanceof Uint8Array) ? await threadSteps(opts.threads) : localSteps();
  try {
    return await inspect(db, steps, input, opts);
  } finally {
    steps.end();
  }
}

/** The request body as text (or an already parsed value) to a document that passed the schema, or a 400 naming the fields. */
export function parseEntryDocument(input: string | unknown): EntryDocument {
  const s = new EntryDocumentSession();
  const r = s.parse(input);
  if (!r.ok) problemsOrThrow(r.problems, r.total);
  else problemsOrThrow(r.schema.problems, r.schema.total);
  return s.document();
}

/** The checks against the challenge for a document that already passed the schema (parseEntryDocument). */
export async function checkEntry(db: Db, doc: EntryDocument, opts: CheckOptions = {}): Promise<EntryCheck> {
  return validateEntryDocument(db, doc, { ...opts, threads: undefined });
}

async function inspect(db: Db, steps: Steps, input: unknown, opts: CheckOptions): Promise<EntryCheck> {
  const purpose = opts.purpose ?? 'create';
  const parsed = await steps.parse(input);
  if (!parsed.ok) problemsOrThrow(parsed.problems, parsed.total);
  const { summary, schema } = parsed as Extract<ParseOutcome, { ok: true }>;

  const rv: Resolved = summary.ref ? await resolveVersion(db, summary.ref, opts.slug) : { problems: [] };
  const vt = rv.version;
  const est: EstimateChecks = vt ? await steps.check(vt) : { problems: [], total: 0, warnings: [], covered: 0 };
  const problems = [...rv.problems, ...est.problems];
  const total = rv.problems.length + est.total;

  // the challenge settings (entry-validation/gate.ts): what refuses now, what only warns
  const track = summary.track;
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
      // a returned entry's resubmission is not held back (see gate.ts); a draft's is
      if (!e || e.state === 'draft') refusals = gateProblems(c, track, opts.now, 'submit').filter((p) => !(move && p.path === '/track'));
      accepts = { drafts: !move, submissions: !move && refusals.length === 0 };
    }
  }

  // a problem at a path the schema already names is not repeated
  const named = new Set(schema.problems.map((p) => p.path));
  const beyond = problems.filter((p) => !named.has(p.path));
  if (schema.total || beyond.length) {
    const first = refusing.filter((p) => !named.has(p.path));
    problemsOrThrow([...first, ...schema.problems, ...beyond], first.length + schema.total + total - (problems.length - beyond.length));
  }
  refuse(refusing);
  if (!vt || !c) throw invalid([{ path: '/challenge', message: 'name the challenge version this entry answers' }]); // unreachable: a document that passes the schema resolves or has a problem

  const { warnings: docWarnings, coverage } = documentWarnings(summary, vt, est);
  const warnings = [...refusals, ...heldBack, ...docWarnings];
  const preview = opts.preview ? await steps.preview({ targetKeys: [...vt.targets.keys()], refs: await publicReferences(db, vt.versionId, opts.preview.now), listLimit: opts.preview.listLimit }) : undefined;
  const document = await steps.document();
  return { document, version: vt, warnings, coverage, refusals, accepts, preview };
}

// ------------------------------------------------------------------ dry-run score preview
/** The exact references the public can see now (exact and not sealed), by target key. */
async function publicReferences(db: Db, versionId: string, now: Date): Promise<Map<string, PublicReference>> {
  const refs = await visibleReferences(db, versionId, PUBLIC_VIEWER, now);
  return new Map([...refs.exact].map(([key, r]) => [key, r.uncertainty > 0 ? { value: r.value, uncertainty: r.uncertainty } : { value: r.value }]));
}

/** Scores against the references the public can see (exact and not sealed), as the dry run shows them. */
export async function previewScores(db: Db, check: EntryCheck, now: Date, listLimit = 1000): Promise<ScorePreview> {
  if (check.preview) return check.preview;
  return scorePreview(check.document, check.version.targets.keys(), await publicReferences(db, check.version.versionId, now), listLimit);
}
