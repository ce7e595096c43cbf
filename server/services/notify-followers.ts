/**
 * Mail to the followers of a challenge or a team (table follows) when an entry is published, a
 * reference is revealed or computed, or the standings are rescored. Sent through the app's mailer
 * (the in-process fake SMTP by default) after the change is committed, never inside a transaction;
 * every message ends with its one-click unfollow link. A failed send is logged and changes nothing.
 *
 * Nothing calls this directly: a service or a job returns a 'notify-followers' effect and
 * server/effects.ts applies it after the commit (with the app's mailer and base URL; a worker
 * without an app in its process mails nobody).
 */
import { and, eq, or, type SQL } from 'drizzle-orm';
import type { Db } from '../db/client';
import type { Logger } from '../log';
import type { Mailer } from '../mail/mailer';
import { follows, user } from '../db/schema';

export type FollowEvent = 'entry.published' | 'references.computed' | 'references.revealed' | 'standings.rescored';

export const unfollowLink = (baseUrl: string, token: string) => `${baseUrl.replace(/\/$/, '')}/unfollow/${token}`;

/**
 * Mails every follower of the challenge (slug) or of the team (teamId) once, even when they follow
 * both; the unfollow link is that of the follow that matched first (the challenge's).
 */
export async function notifyFollowers(ctx: { db: Db; mailer: Mailer; log: Logger; baseUrl: string }, p: { slug: string; teamId?: string | null; event: FollowEvent; subject: string; lines: string[] }): Promise<number> {
  const { db } = ctx;
  const match: SQL[] = [and(eq(follows.subjectType, 'challenge'), eq(follows.subjectId, p.slug))!];
  if (p.teamId) match.push(and(eq(follows.subjectType, 'team'), eq(follows.subjectId, p.teamId))!);
  const rows = await db.select({ email: user.email, token: follows.token, type: follows.subjectType }).from(follows)
    .innerJoin(user, eq(user.id, follows.userId)).where(or(...match));
  rows.sort((a, b) => (a.type === b.type ? 0 : a.type === 'challenge' ? -1 : 1));
  const once = new Map<string, { token: string; type: string }>();
  for (const r of rows) if (!once.has(r.email)) once.set(r.email, r);
  const base = ctx.baseUrl.replace(/\/$/, '');
  let sent = 0;
  for (const [to, f] of once) {
    const text = [...p.lines, '', `You receive this because you follow ${f.type === 'challenge' ? `the challenge ${p.slug}` : 'this team'} on Parallax.`, `Stop following: ${unfollowLink(base, f.token)}`].join('\n');
    try {
      await ctx.mailer.send({ to, subject: p.subject, text });
      sent++;
    } catch (err) {
      ctx.log.error('mail.failed', { event: p.event, error: String((err as Error).message ?? err) });
    }
  }
  if (sent) ctx.log.info('follow.mailed', { event: p.event, challenge: p.slug, sent });
  return sent;
}

/** The challenge page's address in a mail line (server/effects.ts adds the base URL). */
export const challengeLink = (slug: string) => ({ path: `/challenges/${slug}` });
