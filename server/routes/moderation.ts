/**
 * Moderation: the review queue with its automatic checks, decisions on entries in review,
 * curation (feature, hide), disputed targets, challenge settings, sealed references for blind
 * rounds and the teams' commitments. Every write is one transaction with its audit line; mail
 * and worker kicks are the services' effects, applied after the commit by the route table.
 */
import { and, eq } from 'drizzle-orm';
import { z } from 'zod';
import type { Request } from 'express';
import { PRIMARY_METRICS } from '@shared/scoring/standings';
import { CONSENSUS_ESTIMATORS } from '@shared/scoring';
import type { AppContext } from '../context';
import { entryCommitments, referenceSeals } from '../db/schema';
import { notFound } from '../errors';
import { isPublicEntry } from '../queries/entries';
import { QueueChecksCache, reviewQueue } from '../services/check-entries';
import { decideEntry, DECISIONS, type Decision } from '../services/decide-entry';
import { curateEntry } from '../services/curate-entry';
import { disputeTarget } from '../services/dispute-target';
import { updateChallengeSettings } from '../services/update-challenge-settings';
import { sealReferences } from '../services/seal-references';
import { COMMITMENT_RECIPE, registerCommitment, storedEstimatesHash } from '../services/register-commitment';
import { parseBody } from '../validate';
import { loadChallengeVersion } from '../queries/challenge-version';
import type { RouteTable } from './registry';
import { entryAccess } from '../queries/entry-access';
import { reply } from '../effects';
import { ENTRY_FORMAT_LIMITS, TRACKS } from '@shared/vocabulary';
import { LIMITS as CHALLENGE_LIMITS } from '@shared/physics/challenge';

const reason = z.string().trim().min(1, 'give a reason: the team reads it in the e-mail').max(2000, 'at most 2000 characters');
const decisionBody = z.object({ decision: z.enum(DECISIONS as [Decision, ...Decision[]], { message: 'decision is one of "publish", "return", "reject"' }), reason }).strict();
const curationBody = z.object({
  featured: z.boolean().optional(),
  hidden: z.object({ reason: z.string().trim().min(1, 'say why it is hidden: the reason is public').max(2000) }).strict().nullable().optional(),
}).strict().refine((b) => b.featured !== undefined || b.hidden !== undefined, { message: 'send featured (true/false) and/or hidden ({"reason": "..."} or null)' });
const disputeBody = z.object({ disputed: z.boolean(), note: z.string().trim().max(2000).optional() }).strict()
  .refine((b) => !b.disputed || (b.note && b.note.length > 0), { message: 'a disputed target needs a public note saying why', path: ['note'] });
const isoDate = z.string().datetime({ offset: true, message: 'an ISO 8601 date and time, e.g. 2030-01-31T12:00:00Z' });
const settingsBody = z.object({
  estimator: z.enum(CONSENSUS_ESTIMATORS as unknown as [string, ...string[]]).optional(),
  primaryMetric: z.enum(PRIMARY_METRICS as unknown as [string, ...string[]]).optional(),
  tracks: z.array(z.enum(TRACKS)).min(1, 'at least one track').max(2).refine((t) => new Set(t).size === t.length, 'each track once').optional(),
  submissionWindow: z.object({ opensAt: isoDate.nullable().optional(), closesAt: isoDate.nullable().optional() }).strict()
    .refine((w) => !w.opensAt || !w.closesAt || Date.parse(w.opensAt) < Date.parse(w.closesAt), { message: 'closesAt must be after opensAt', path: ['closesAt'] }).nullable().optional(),
  license: z.string().trim().min(1).max(200).optional(),
  state: z.enum(['open', 'closed']).optional(),
  reason: z.string().trim().max(2000).optional(),
}).strict().refine((b) => Object.keys(b).some((k) => k !== 'reason'), { message: 'send at least one setting' });
const sealBody = z.object({
  targets: z.union([z.literal('all'), z.array(z.string().min(1).max(ENTRY_FORMAT_LIMITS.targetKey)).min(1).max(CHALLENGE_LIMITS.maxTargets)]),
  until: isoDate,
}).strict();
const commitmentBody = z.object({ sha256: z.string().regex(/^[0-9a-fA-F]{64}$/, 'a SHA-256 as 64 hexadecimal characters') }).strict();

const actorId = (req: Request) => (req.actor.kind === 'user' ? req.actor.user.id : req.actor.kind);

export function registerModerationRoutes(routes: RouteTable, ctx: AppContext): void {
  const { db } = ctx;
  // the queue's checks, recomputed per challenge version only when what they depend on changed
  const checksCache = new QueueChecksCache();

  const { loadEntry, entryTeam, privileged } = entryAccess(db);

  routes.add({
    method: 'get', path: '/moderation/queue', access: 'moderator',
    summary: 'Entries in review, oldest first, each with its automatic checks: schema and bounds, grid coverage, scores against public exact references (RMSE, mean z², fraction covered), outliers against the consensus (|d| > U), identical values to another entry, partial sweep',
    handler: async () => {
      const items = await reviewQueue(db, ctx.now(), checksCache);
      return { count: items.length, entries: items };
    },
  });

  routes.add({
    method: 'post', path: '/entries/:entryId/decision', access: 'moderator',
    summary: 'Decide an entry in review: {"decision": "publish" | "return" | "reject", "reason": "..."}; 409 when it was already decided, 403 on an entry of a team the moderator belongs to; the team is e-mailed the decision and the reason',
    handler: async (req) => {
      const body = parseBody(decisionBody, req.body);
      const e = await loadEntry(req);
      const { result: out, effects } = await decideEntry(db, { entryId: e.id, decision: body.decision, reason: body.reason, actor: req.actor, now: ctx.now() });
      ctx.log.info('moderation.decision', { entry: out.entryId, decision: out.decision, from: out.fromState, to: out.state, actor: actorId(req), at: out.decidedAt.toISOString() });
      return reply(effects, ({ mailed }) => ({ id: out.entryId, decision: out.decision, state: out.state, reviewId: out.reviewId, decidedAt: out.decidedAt, superseded: out.superseded, jobIds: out.jobIds, mailed }));
    },
  });

  routes.add({
    method: 'post', path: '/entries/:entryId/curation', access: 'moderator',
    summary: 'Curate a published entry: {"featured": true|false} and/or {"hidden": {"reason": "..."}} (public reason; the entry leaves the standings) or {"hidden": null} to show it again; 403 on an entry of a team the moderator belongs to',
    handler: async (req) => {
      const body = parseBody(curationBody, req.body);
      const e = await loadEntry(req);
      const { result: out, effects } = await curateEntry(db, { entryId: e.id, featured: body.featured, hidden: body.hidden, actor: req.actor, now: ctx.now() });
      if (out.changes.length) ctx.log.info('moderation.curation', { entry: e.id, changes: out.changes.join(','), actor: actorId(req) });
      return reply(effects, out);
    },
  });

  routes.add({
    method: 'post', path: '/challenges/:slug/targets/:targetKey/dispute', access: 'moderator',
    summary: 'Mark a target of the current version (?version=N for another) disputed with a public note, or clear the mark: {"disputed": true, "note": "..."} | {"disputed": false}',
    handler: async (req) => {
      const body = parseBody(disputeBody, req.body);
      const { challenge: c, version: v } = await loadChallengeVersion(db, req);
      const { result: out, effects } = await disputeTarget(db, { slug: c.slug, versionId: v.id, version: v.version, targetKey: String(req.params.targetKey), disputed: body.disputed, note: body.note ?? null, actor: req.actor, now: ctx.now() });
      ctx.log.info('moderation.dispute', { challenge: c.slug, target: out.target, disputed: out.disputed, actor: actorId(req) });
      return reply(effects, out);
    },
  });

  routes.add({
    method: 'post', path: '/challenges/:slug/settings', access: 'moderator',
    summary: `Challenge settings (fields not sent keep their value): estimator (${CONSENSUS_ESTIMATORS.join(' | ')}), primaryMetric (${PRIMARY_METRICS.join(' | ')}), tracks (hardware, classical), submissionWindow {opensAt, closesAt}, license, state (open | closed), reason`,
    handler: async (req) => {
      const body = parseBody(settingsBody, req.body);
      const { result: out, effects } = await updateChallengeSettings(db, { slug: String(req.params.slug), patch: body as never, actor: req.actor, now: ctx.now() });
      ctx.log.info('moderation.settings', { challenge: out.slug, changed: out.changed.join(','), actor: actorId(req) });
      return reply(effects, out);
    },
  });

  routes.add({
    method: 'post', path: '/challenges/:slug/seal', access: 'moderator',
    summary: 'Seal reference values until a date (blind round): {"targets": ["key", ...] | "all", "until": "ISO date in the future"}; current version, or ?version=N (a draft too: seal before publishing so nothing is ever public); values not yet computed are sealed when written',
    handler: async (req) => {
      const body = parseBody(sealBody, req.body);
      const { challenge: c, version: v } = await loadChallengeVersion(db, req);
      const { result: out, effects } = await sealReferences(db, { slug: c.slug, versionId: v.id, version: v.version, targets: body.targets, until: new Date(body.until), actor: req.actor, now: ctx.now() });
      ctx.log.info('moderation.seal', { challenge: c.slug, version: v.version, targets: out.targets, until: out.sealedUntil.toISOString(), actor: actorId(req) });
      return reply(effects, out);
    },
  });

  routes.add({
    method: 'post', path: '/entries/:entryId/commitment', access: 'team-member', apiKey: true, team: entryTeam,
    summary: `Register a commitment to the entry's estimates before a reveal: {"sha256": "<64 hex>"}; may be replaced until the reveal. Recipe: ${COMMITMENT_RECIPE}`,
    handler: async (req, res) => {
      const body = parseBody(commitmentBody, req.body);
      const e = await loadEntry(req);
      const out = await registerCommitment(db, { entryId: e.id, sha256: body.sha256, actor: req.actor, now: ctx.now() });
      res.status(200);
      return out;
    },
  });

  routes.add({
    method: 'get', path: '/entries/:entryId/commitment', access: 'public',
    summary: "An entry's commitment and, after the reveal, whether it matched the estimates (public after the reveal; the team and moderators see it before)",
    handler: async (req) => {
      const e = await loadEntry(req);
      const priv = await privileged(req, e.teamId);
      const [c] = await db.select().from(entryCommitments).where(eq(entryCommitments.entryId, e.id));
      const revealed = c && c.result !== 'pending';
      if (!c || (!priv && (!revealed || !isPublicEntry(e)))) throw notFound('A public commitment for this entry');
      const seals = await db.select({ until: referenceSeals.sealedUntil, revealedAt: referenceSeals.revealedAt }).from(referenceSeals).where(and(eq(referenceSeals.versionId, e.versionId)));
      return {
        entryId: e.id, sha256: c.sha256, registeredAt: c.registeredAt, result: c.result, checkedAt: c.checkedAt, computedSha256: c.computedSha256,
        revealAt: seals.filter((s) => !s.revealedAt).map((s) => s.until).sort((x, y) => y.getTime() - x.getTime())[0] ?? null,
        // the hash of the estimates as stored now: the team's own check before the reveal, public after
        // it (estimates are frozen once checked, services/update-entry.ts; this shows that they held)
        currentSha256: priv || revealed ? await storedEstimatesHash(db, e.id) : undefined,
        recipe: COMMITMENT_RECIPE,
      };
    },
  });
}
