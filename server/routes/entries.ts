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
import { type Request, type Response } from 'express';
import { and, desc, eq, inArray } from 'drizzle-orm';
import { z } from 'zod';
import type { AppContext } from '../context';
import { entries, member, organization } from '../db/schema';
import { AppError, badRequest, forbidden, notFound } from '../errors';
import { entrySummary, presentEntry } from '../presenters/entry';
import { entryListContext, isPublicEntry, versionEntries } from '../queries/entries';
import { isModeratorActor, loadChallengeVersion } from '../queries/challenge-version';
import { viewerOf } from '../queries/visibility';
import { validateEntryDocument, previewScores, MAX_ESTIMATES, MAX_DEPTH } from '../services/validate-entry';
import { createEntry } from '../services/create-entry';
import { updateEntry } from '../services/update-entry';
import { submitEntry } from '../services/submit-entry';
import { withdrawEntry } from '../services/withdraw-entry';
import { reviseEntry } from '../services/revise-entry';
import { parseBody } from '../validate';
import { documentBody as readDocumentBody } from '../util/document-body';
import type { RouteTable } from './registry';
import { entryAccess } from '../queries/entry-access';

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

  routes.add({
    method: 'post', path: '/challenges/:slug/entries', access: 'team-member', apiKey: true, team: postingTeam,
    summary: 'Create a draft entry from a document (schemas/entry.schema.json) as the JSON body or multipart field "file"; ?team=<teamId> when you are in several teams',
    body: documentBody,
    handler: async (req, res) => {
      const now = ctx.now();
      const check = await validateEntryDocument(db, documentText(res), { slug: String(req.params.slug), now, purpose: 'create', threads: ctx.threads });
      const doc = check.document;
      const teamId = (await postingTeam(req))!;
      const out = await createEntry(db, { check, teamId, actor: req.actor, now });
      res.status(201);
      return { ...out, challenge: { slug: check.version.slug, version: check.version.version }, estimates: doc.estimates.length, coverage: check.coverage, warnings: check.warnings, next: `POST /api/entries/${out.id}/submit sends it to review` };
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
    summary: "Replace a draft's (or returned entry's) whole document; submitted and published entries are frozen",
    body: documentBody,
    handler: async (req, res) => {
      const e = await loadEntry(req);
      const now = ctx.now();
      const check = await validateEntryDocument(db, documentText(res), { slug: e.challengeSlug, now, purpose: 'update', entry: { track: e.track, state: e.state }, threads: ctx.threads });
      const doc = check.document;
      const out = await updateEntry(db, { entryId: e.id, check, actor: req.actor, now });
      return { ...out, estimates: doc.estimates.length, coverage: check.coverage, warnings: check.warnings };
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
      const out = await withdrawEntry(db, { entryId: String(req.params.entryId), reason: body.reason, actor: req.actor, now: ctx.now() });
      if (out.standingsChanged) ctx.jobs.kick();
      return out;
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
