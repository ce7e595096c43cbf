/**
 * Following a challenge or a team (signed-in users; mail through the app's mailer, see
 * server/services/notify-followers.ts), the one-click unfollow by the token of a mail, and the
 * Atom feed of a challenge for readers who do not sign in.
 */
import { randomBytes } from 'node:crypto';
import type { Request } from 'express';
import { and, desc, eq, inArray } from 'drizzle-orm';
import { z } from 'zod';
import type { AppContext } from '../context';
import { auditLog, challenges, entries, follows, organization } from '../db/schema';
import { notFound, unauthenticated } from '../errors';
import { parseBody } from '../validate';
import { loadChallengeVersion } from '../queries/challenge-version';
import type { RouteTable } from './registry';

const followBody = z.object({
  subjectType: z.enum(['challenge', 'team'], { message: 'subjectType must be "challenge" or "team"' }),
  subjectId: z.string().trim().min(1, 'subjectId: the challenge id (slug) or the team id').max(200),
}).strict();
const unfollowBody = z.object({ token: z.string().min(10, 'token: the code from the unfollow link of a mail').max(200) }).strict();

const xml = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');

/** Audit actions that make a line of a challenge's feed, with their title. */
const FEED_ACTIONS: Record<string, (d: Record<string, unknown>) => string> = {
  'challenge.publish': () => 'Challenge version published',
  'references.unseal': (d) => `Reference values revealed (${String(d.targets ?? '')} targets)`,
  'challenge.settings': () => 'Challenge settings changed',
};

export function registerFollowRoutes(routes: RouteTable, ctx: AppContext): void {
  const { db } = ctx;

  const userId = (a: Request['actor']) => {
    if (a.kind !== 'user') throw unauthenticated();
    return a.user.id;
  };

  routes.add({
    method: 'get', path: '/me/follows', access: 'signed-in',
    summary: 'What the signed-in user follows: challenges and teams, each with the id to unfollow it',
    handler: async (req) => {
      const rows = await db.select({ id: follows.id, subjectType: follows.subjectType, subjectId: follows.subjectId, createdAt: follows.createdAt }).from(follows)
        .where(eq(follows.userId, userId(req.actor))).orderBy(desc(follows.createdAt));
      return { follows: rows };
    },
  });

  routes.add({
    method: 'post', path: '/follows', access: 'signed-in',
    summary: 'Follow a challenge or a team: {"subjectType": "challenge" | "team", "subjectId": slug or team id}; e-mail when an entry is published, a reference revealed or computed, or the standings rescored. 201, or 200 when already followed',
    handler: async (req, res) => {
      const body = parseBody(followBody, req.body);
      const uid = userId(req.actor);
      if (body.subjectType === 'challenge') {
        const [c] = await db.select({ state: challenges.state }).from(challenges).where(eq(challenges.slug, body.subjectId));
        if (!c || c.state === 'draft') throw notFound(`The challenge "${body.subjectId}"`);
      } else {
        const [t] = await db.select({ id: organization.id }).from(organization).where(eq(organization.id, body.subjectId));
        if (!t) throw notFound(`The team "${body.subjectId}"`);
      }
      const [have] = await db.select().from(follows).where(and(eq(follows.userId, uid), eq(follows.subjectType, body.subjectType), eq(follows.subjectId, body.subjectId)));
      if (have) return { id: have.id, subjectType: have.subjectType, subjectId: have.subjectId, following: true };
      const [row] = await db.insert(follows).values({ userId: uid, subjectType: body.subjectType, subjectId: body.subjectId, token: randomBytes(24).toString('base64url'), createdAt: ctx.now() })
        .onConflictDoNothing().returning();
      res.status(row ? 201 : 200);
      const r = row ?? (await db.select().from(follows).where(and(eq(follows.userId, uid), eq(follows.subjectType, body.subjectType), eq(follows.subjectId, body.subjectId))))[0];
      return { id: r.id, subjectType: r.subjectType, subjectId: r.subjectId, following: true };
    },
  });

  routes.add({
    method: 'delete', path: '/follows/:followId', access: 'signed-in',
    summary: 'Stop following (one of your own follows)',
    handler: async (req) => {
      const id = String(req.params.followId);
      if (!/^[0-9a-f-]{36}$/i.test(id)) throw notFound('The follow');
      const gone = await db.delete(follows).where(and(eq(follows.id, id), eq(follows.userId, userId(req.actor)))).returning({ id: follows.id });
      if (!gone.length) throw notFound('The follow');
      return { id, following: false };
    },
  });

  routes.add({
    method: 'post', path: '/follows/unfollow', access: 'public',
    summary: 'Stop following by the token of the unfollow link in a mail (no sign-in needed): {"token": "..."}',
    handler: async (req) => {
      const body = parseBody(unfollowBody, req.body);
      const gone = await db.delete(follows).where(eq(follows.token, body.token)).returning({ subjectType: follows.subjectType, subjectId: follows.subjectId });
      if (!gone.length) throw notFound('This unfollow link (it was used already, or the follow was removed)');
      return { following: false, subjectType: gone[0].subjectType, subjectId: gone[0].subjectId };
    },
  });

  routes.add({
    method: 'get', path: '/challenges/:slug/feed.atom', access: 'public',
    summary: 'An Atom 1.0 feed of a challenge: versions published, entries published, references revealed; for readers who do not sign in',
    handler: async (req, res) => {
      const { challenge: c, version: v } = await loadChallengeVersion(db, req);
      const base = ctx.config.baseUrl.replace(/\/$/, '');
      const page = `${base}/challenges/${c.slug}`;
      const published = await db.select({ id: entries.id, label: entries.label, teamName: organization.name, at: entries.publishedAt, track: entries.track, revision: entries.revision, hidden: entries.hiddenReason }).from(entries)
        .innerJoin(organization, eq(organization.id, entries.teamId))
        .where(and(eq(entries.challengeSlug, c.slug), inArray(entries.state, ['published', 'superseded']))).orderBy(desc(entries.publishedAt)).limit(50);
      const events = await db.select({ id: auditLog.id, at: auditLog.at, action: auditLog.action, details: auditLog.details }).from(auditLog)
        .where(and(eq(auditLog.subjectType, 'challenge'), eq(auditLog.subjectId, c.slug), inArray(auditLog.action, Object.keys(FEED_ACTIONS)))).orderBy(desc(auditLog.id)).limit(50);
      const items = [
        ...published.filter((e) => e.at && !e.hidden).map((e) => ({
          id: `${base}/entries/${e.id}`, title: `Entry published: ${e.label} (${e.teamName}, ${e.track}${e.revision > 1 ? `, revision ${e.revision}` : ''})`,
          updated: e.at!, link: `${base}/entries/${e.id}`,
        })),
        ...events.map((e) => ({
          id: `${page}#event-${e.id}`, title: `${FEED_ACTIONS[e.action](e.details as Record<string, unknown>)}: ${c.title}`, updated: e.at, link: page,
        })),
      ].sort((a, b) => b.updated.getTime() - a.updated.getTime()).slice(0, 50);
      const updated = items[0]?.updated ?? v.publishedAt ?? c.updatedAt;
      const body = [
        '<?xml version="1.0" encoding="utf-8"?>',
        '<feed xmlns="http://www.w3.org/2005/Atom">',
        `  <id>${xml(page)}</id>`,
        `  <title>${xml(`Parallax: ${c.title}`)}</title>`,
        `  <subtitle>${xml(`Entries, references and versions of the challenge ${c.slug}`)}</subtitle>`,
        `  <updated>${updated.toISOString()}</updated>`,
        '  <author><name>Parallax</name></author>',
        `  <link rel="self" type="application/atom+xml" href="${xml(`${base}/api/challenges/${c.slug}/feed.atom`)}"/>`,
        `  <link rel="alternate" type="text/html" href="${xml(page)}"/>`,
        ...items.map((i) => [
          '  <entry>',
          `    <id>${xml(i.id)}</id>`,
          `    <title>${xml(i.title)}</title>`,
          `    <updated>${i.updated.toISOString()}</updated>`,
          `    <link rel="alternate" type="text/html" href="${xml(i.link)}"/>`,
          '  </entry>',
        ].join('\n')),
        '</feed>',
        '',
      ].join('\n');
      res.type('application/atom+xml; charset=utf-8').send(body);
    },
  });
}
