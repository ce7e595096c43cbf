/**
 * Entries: create (JSON body or multipart field "file"), dry-run validation with a score preview,
 * edit a draft, submit, withdraw, revise, and the public and team views.
 *
 * Which team: a team API key (x-api-key) implies its team; a signed-in user in exactly one team
 * posts for that team; a user in several teams says which with ?team=<teamId>.
 *
 * The document routes declare their own body reader (documentBody, see server/routes/registry.ts)
 * and hand the raw bytes to a document thread (ctx.threads), where the strict parser reports
 * duplicate keys, integers beyond 2^53, deep nesting and NUL characters, which JSON.parse would
 * hide, and the checks run without holding the event loop.
 */
import { createHash } from 'node:crypto';
import { type Request, type Response } from 'express';
import { and, desc, eq, inArray } from 'drizzle-orm';
import { z } from 'zod';
import type { AppContext } from '../context';
import { entries, member, organization } from '../db/schema';
import { AppError, badRequest, forbidden, notFound, type FieldProblem } from '../errors';
import { entrySummary, presentEntry } from '../presenters/entry';
import { entryListContext, isPublicEntry, versionEntries } from '../queries/entries';
import { isModeratorActor, loadChallengeVersion } from '../queries/challenge-version';
import { viewerOf } from '../queries/visibility';
import { validateEntryDocument, previewScores, MAX_ESTIMATES, MAX_DEPTH } from '../services/validate-entry';
import { createEntry, createIncompleteEntry, type Idempotency } from '../services/create-entry';
import { updateEntry, updateIncompleteEntry } from '../services/update-entry';
import { deleteDraft } from '../services/delete-entry';
import { parseStrictJson } from '../util/strict-json';
import { submitEntry } from '../services/submit-entry';
import { withdrawEntry } from '../services/withdraw-entry';
import { reviseEntry } from '../services/revise-entry';
import { parseBody } from '../validate';
import { documentBody as readDocumentBody } from '../util/document-body';
import type { RouteTable } from './registry';
import { entryAccess } from '../queries/entry-access';
import { teamTrack as teamTrackOf } from '../util/team-meta';
import { reply } from '../effects';
import type { Track } from '@shared/vocabulary';

/** A draft with problems is stored only up to this size (its parse runs on the event loop: ~1 MiB is a few ms). */
export const INCOMPLETE_DRAFT_MAX_BYTES = 1024 * 1024;

/**
 * The Idempotency-Key header of an entry creation (1 to 200 visible ASCII characters, e.g. a UUID)
 * with the SHA-256 of the body, or null when none is sent.
 */
export function idempotencyOf(req: Request, body: Uint8Array): Idempotency | null {
  const raw = req.get('idempotency-key');
  if (raw === undefined) return null;
  const key = raw.trim();
  if (!/^[\x21-\x7e]{1,200}$/.test(key)) throw badRequest('The Idempotency-Key header must be 1 to 200 visible ASCII characters without spaces, e.g. a UUID from uuid.uuid4().', [{ path: '', message: 'Idempotency-Key header malformed' }]);
  return { key, hash: createHash('sha256').update(body).digest('hex') };
}

const withdrawBody = z.object({ reason: z.string().trim().min(1, 'say why the entry is withdrawn (it stays visible with the reason)').max(2000) }).strict();
const mib = (b: number) => `${(b / 1024 / 1024).toFixed(b % (1024 * 1024) ? 1 : 0)} MiB`;

export function registerEntryRoutes(routes: RouteTable, ctx: AppContext): void {
  const { db } = ctx;
  const limit = ctx.config.uploadLimitBytes;
  const tooLarge = () => new AppError('payload_too_large', `The entry document is larger than the limit of ${mib(limit)} (${limit} bytes). Write it without indentation, or split the sweep into several entries (at most ${MAX_ESTIMATES} estimates each).`);

  /** Reads the entry document (multipart field "file", or the raw body) to disk, then as text under a slot. */
  const documentBody = readDocumentBody({ limit, slots: ctx.documentSlots, tooLarge, rawBody: true, wrongField: 'Upload the entry document in the multipart field "file" (curl -F file=@entry.json), one file only.' });

  /** the document's UTF-8 bytes (a view of a reused buffer: parse it, never keep it) */
  const documentText = (res: Response): Uint8Array => {
    const bytes = res.locals.document as Buffer | undefined;
    if (bytes?.length) return bytes;
    throw badRequest('Send the entry document (schemas/entry.schema.json) as the JSON body with Content-Type: application/json, or as the multipart field "file".', [{ path: '', message: 'the body is empty' }]);
  };

  /** The team an entry is created for (see the header comment). */
  const postingTeam = async (req: Request): Promise<string | null> => {
    const q = typeof req.query.team === 'string' && req.query.team ? req.query.team : null;
    const a = req.actor;
    if (a.kind === 'api-key') return q ?? a.teamId;
    if (a.kind !== 'user') return null;
    if (q) return q;
    const mine = await db.select({ id: member.organizationId, name: organization.name }).from(member).innerJoin(organization, eq(organization.id, member.organizationId)).where(eq(member.userId, a.user.id));
    if (mine.length === 1) return mine[0].id;
    if (!mine.length) throw forbidden('Entries belong to teams and you are in none: create a team or accept an invitation first.');
    throw badRequest(`You are a member of ${mine.length} teams (${mine.map((m) => `${m.name}: ${m.id}`).join(', ')}): say which one this entry is for with ?team=<teamId>.`);
  };

  const { loadEntry, entryTeam, privileged } = entryAccess(db);

  /** the team's kind (hardware or classical) from its metadata; classical when unstated */
  const teamTrack = async (teamId: string): Promise<Track> => {
    const [o] = await db.select({ metadata: organization.metadata }).from(organization).where(eq(organization.id, teamId));
    return teamTrackOf(o?.metadata ?? null);
  };

  /** ?incomplete=1: a draft is stored even when the document has problems (it cannot be submitted then) */
  const incompleteWanted = (req: Request) => req.query.incomplete === '1' || req.query.incomplete === 'true';

  /**
   * The document of a request that failed validation, when it is saved as an incomplete draft: the
   * strictly parsed value (a body that is not JSON, or too deep, cannot be stored) and its problems.
   */
  const incompleteOf = (bytes: Uint8Array, err: unknown): { raw: unknown; problems: FieldProblem[] } | null => {
    if (!(err instanceof AppError) || err.code !== 'validation_failed') return null;
    // parsed here, on the event loop: only documents small enough to parse in a few milliseconds
    // (a larger one with problems must be fixed before it is stored)
    if (bytes.byteLength > INCOMPLETE_DRAFT_MAX_BYTES) return null;
    const parsed = parseStrictJson(bytes, { maxDepth: MAX_DEPTH, maxProblems: 1 });
    if (!parsed.ok || !parsed.value || typeof parsed.value !== 'object' || Array.isArray(parsed.value)) return null;
    return { raw: parsed.value, problems: err.problems };
  };

  routes.add({
    method: 'post', path: '/challenges/:slug/entries', access: 'team-member', apiKey: true, team: postingTeam,
    summary: 'Create a draft entry from a document (schemas/entry.schema.json) as the JSON body or multipart field "file"; ?team=<teamId> when you are in several teams. Idempotency-Key header: a retry with the same key and body returns the same entry (200), the same key with another body is refused (409). ?incomplete=1 stores a document with problems as a draft that cannot be submitted until fixed',
    body: documentBody,
    handler: async (req, res) => {
      const now = ctx.now();
      const bytes = documentText(res);
      const teamId = (await postingTeam(req))!;
      const idem = idempotencyOf(req, bytes);
      const replay = async () => {
        if (!idem) return null;
        const [prior] = await db.select({ id: entries.id, state: entries.state, hash: entries.idempotencyHash, slug: entries.challengeSlug }).from(entries)
          .where(and(eq(entries.teamId, teamId), eq(entries.idempotencyKey, idem.key)));
        if (!prior) return null;
        if (prior.hash !== idem.hash) {
          throw new AppError('conflict', `The Idempotency-Key header "${idem.key}" was already used by this team for another request body (entry ${prior.id}): send a new key for a new entry, or the same body to get that entry back.`, [{ path: '', message: 'Idempotency-Key reused with a different body' }]);
        }
        res.status(200);
        return { id: prior.id, state: prior.state, replayed: true, challenge: { slug: prior.slug }, next: `GET /api/entries/${prior.id}` };
      };
      const first = await replay();
      if (first) return first;
      try {
        let out: { id: string; state: 'draft' };
        let extra: Record<string, unknown>;
        try {
          const check = await validateEntryDocument(db, bytes, { slug: String(req.params.slug), now, purpose: 'create', threads: ctx.threads });
          out = await createEntry(db, { check, teamId, actor: req.actor, now, idempotency: idem });
          extra = { challenge: { slug: check.version.slug, version: check.version.version }, estimates: check.document.estimates.length, coverage: check.coverage, warnings: check.warnings, next: `POST /api/entries/${out.id}/submit sends it to review` };
        } catch (err) {
          const inc = incompleteWanted(req) ? incompleteOf(bytes, err) : null;
          if (!inc) throw err;
          const { version: v } = await loadChallengeVersion(db, req);
          if (v.state !== 'published') throw err;
          out = await createIncompleteEntry(db, { slug: v.challengeSlug, versionId: v.id, raw: inc.raw, problems: inc.problems, teamId, teamTrack: await teamTrack(teamId), actor: req.actor, now, idempotency: idem });
          extra = { challenge: { slug: v.challengeSlug, version: v.version }, incomplete: true, problems: inc.problems, next: `PUT /api/entries/${out.id} with a valid document; a draft with problems cannot be submitted` };
        }
        res.status(201);
        return { ...out, ...extra };
      } catch (err) {
        // two retries with one key at once: the unique index lets one through; the other returns it
        if (idem && /entries_idempotency_uq|duplicate key/.test(String((err as Error).message) + String((err as { cause?: Error }).cause?.message ?? ''))) {
          const again = await replay();
          if (again) return again;
        }
        throw err;
      }
    },
  });

  routes.add({
    method: 'post', path: '/entries/validate', access: 'public',
    summary: 'Dry run: validate a document and preview its scores against the public exact references; stores nothing. acceptsDrafts: POST /api/challenges/<id>/entries would store it now; acceptsSubmissions: it could also be submitted now; acceptsEntries: the same as acceptsSubmissions (kept for compatibility)',
    body: documentBody,
    handler: async (req, res) => {
      const now = ctx.now();
      const check = await validateEntryDocument(db, documentText(res), { now, purpose: 'dry-run', threads: ctx.threads, preview: { now } });
      const doc = check.document;
      const scores = await previewScores(db, check, now);
      // what the challenge settings take now (the warnings say why not):
      // acceptsDrafts: POST /api/challenges/<id>/entries would store it as a draft (before the window opens it would);
      // acceptsSubmissions: that draft could also be submitted now (POST /api/entries/<id>/submit);
      // acceptsEntries: kept for compatibility, = acceptsSubmissions (a submission would be taken now)
      const { drafts: acceptsDrafts, submissions: acceptsSubmissions } = check.accepts;
      return { valid: true, stored: false, acceptsEntries: acceptsSubmissions, acceptsDrafts, acceptsSubmissions, challenge: { slug: check.version.slug, version: check.version.version, checksum: check.version.checksum }, estimates: doc.estimates.length, coverage: check.coverage, warnings: check.warnings, scores };
    },
  });

  routes.add({
    method: 'get', path: '/entries/:entryId', access: 'public',
    summary: 'One entry with its document, revisions and history (the public sees published, superseded and withdrawn-after-publication entries; the team and moderators see all)',
    handler: async (req) => {
      const e = await loadEntry(req);
      const priv = await privileged(req, e.teamId);
      if (!priv && !isPublicEntry(e)) throw notFound('The entry');
      return presentEntry(db, e, { document: true, privileged: priv, now: ctx.now(), viewer: await viewerOf(db, req.actor) });
    },
  });

  routes.add({
    method: 'put', path: '/entries/:entryId', access: 'team-member', apiKey: true, team: entryTeam,
    summary: "Replace a draft's (or returned entry's) whole document; submitted and published entries are frozen. ?incomplete=1 saves a draft with problems (not submittable)",
    body: documentBody,
    handler: async (req, res) => {
      const e = await loadEntry(req);
      const now = ctx.now();
      const bytes = documentText(res);
      try {
        const check = await validateEntryDocument(db, bytes, { slug: e.challengeSlug, now, purpose: 'update', entry: { track: e.track, state: e.state }, threads: ctx.threads });
        const out = await updateEntry(db, { entryId: e.id, check, actor: req.actor, now });
        return { ...out, estimates: check.document.estimates.length, coverage: check.coverage, warnings: check.warnings };
      } catch (err) {
        const inc = incompleteWanted(req) ? incompleteOf(bytes, err) : null;
        if (!inc) throw err;
        const out = await updateIncompleteEntry(db, { entryId: e.id, raw: inc.raw, problems: inc.problems, actor: req.actor, now });
        return { ...out, incomplete: true, problems: inc.problems };
      }
    },
  });

  routes.add({
    method: 'delete', path: '/entries/:entryId', access: 'team-member', apiKey: true, team: entryTeam,
    summary: 'Delete a draft (never submitted) with its estimates; an audit line records it. Submitted entries are withdrawn instead',
    handler: async (req) => {
      const e = await loadEntry(req);
      return deleteDraft(db, { entryId: e.id, actor: req.actor, now: ctx.now() });
    },
  });

  routes.add({
    method: 'post', path: '/entries/:entryId/submit', access: 'team-member', apiKey: true, team: entryTeam,
    summary: 'Send a draft (or returned) entry to review; it is frozen from then on',
    handler: async (req) => submitEntry(db, { entryId: String(req.params.entryId), actor: req.actor, now: ctx.now() }),
  });

  routes.add({
    method: 'post', path: '/entries/:entryId/withdraw', access: 'team-member', apiKey: true, team: entryTeam,
    summary: 'Withdraw an entry with a reason (a recorded state, never a deletion)',
    handler: async (req) => {
      const body = parseBody(withdrawBody, req.body);
      const { result, effects } = await withdrawEntry(db, { entryId: String(req.params.entryId), reason: body.reason, actor: req.actor, now: ctx.now() });
      return reply(effects, result);
    },
  });

  routes.add({
    method: 'post', path: '/entries/:entryId/revise', access: 'team-member', apiKey: true, team: entryTeam,
    summary: 'Start a new draft revision of a published entry (the published one stays until the revision is published)',
    handler: async (req, res) => {
      const out = await reviseEntry(db, { entryId: String(req.params.entryId), actor: req.actor, now: ctx.now() });
      res.status(201);
      return out;
    },
  });

  routes.add({
    method: 'get', path: '/teams/:teamId/entries', access: 'public',
    summary: "A team's entries: all states for its members and moderators, published and superseded ones for everyone else",
    handler: async (req) => {
      const teamId = String(req.params.teamId);
      const priv = await privileged(req, teamId);
      const rows = await db.select().from(entries)
        .where(priv ? eq(entries.teamId, teamId) : and(eq(entries.teamId, teamId), inArray(entries.state, ['published', 'superseded'])))
        .orderBy(desc(entries.updatedAt)).limit(500);
      const list = await entryListContext(db, rows);
      return { entries: rows.map((e) => entrySummary(e, list)) };
    },
  });

  routes.add({
    method: 'get', path: '/challenges/:slug/entries', access: 'public',
    summary: 'The published entries of a challenge version (?version=N) with a summary of their estimates; entries hidden by the moderators are left out (moderators see them, marked hidden with the reason)',
    handler: async (req) => {
      const { version: v } = await loadChallengeVersion(db, req);
      // a fixed number of queries whatever the number of entries: the rows, then teams, versions and estimate statistics in one batch
      const rows = await versionEntries(db, v.id, isModeratorActor(req.actor));
      const list = await entryListContext(db, rows);
      const out = rows.map((e) => {
        const st = list.stats.get(e.id);
        return { ...entrySummary(e, list), summary: { estimates: st?.estimates ?? 0, medianUncertainty: st?.medianUncertainty ?? null, resources: (e.document as { resources?: unknown }).resources ?? null } };
      });
      return { challenge: v.challengeSlug, version: v.version, checksum: v.checksum, entries: out };
    },
  });
}

export const ENTRY_LIMIT_NOTE = `Entries: at most ${MAX_ESTIMATES} estimates, nesting depth ${MAX_DEPTH}.`;
