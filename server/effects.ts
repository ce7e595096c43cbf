/**
 * After-commit effects: what a write asks to happen once its transaction has committed. Services
 * (server/services) and job handlers return them as data next to their result ({ result, effects });
 * they are applied in one place, applyEffects below: by the route table's wrapper
 * (server/routes/registry.ts) for a request, by the worker (server/jobs/worker.ts) for a job, both
 * through the app context's applier. No route, job or service kicks the worker, drops a cache or
 * sends mail itself.
 *
 * Kinds:
 *   kick-jobs         wake the background worker (a job was queued in the transaction)
 *   invalidate        drop cached responses built from older data (the standings cache)
 *   mail-team         mail every member of some teams (a moderation decision, a reveal)
 *   notify-followers  mail the followers of a challenge or a team (services/notify-followers.ts)
 *
 * A mail line is text, or parts where { path } stands for a link on this site (the base URL is
 * the app's, added when the mail is sent: a job has no base URL of its own).
 */
import { eq } from 'drizzle-orm';
import type { Db } from './db/client';
import { member, user } from './db/schema';
import type { Mailer } from './mail/mailer';
import type { Logger } from './log';
import { notifyFollowers, type FollowEvent } from './services/notify-followers';
import type { StandingsCache } from './services/standings-cache';

export type MailLine = string | (string | { path: string })[];

export type Effect =
  | { kind: 'kick-jobs' }
  /** versionId null: every cached standings response (the current version of a challenge changed) */
  | { kind: 'invalidate'; cache: 'standings'; versionId: string | null }
  | { kind: 'mail-team'; teamIds: string[]; event: string; subject: string; lines: MailLine[] }
  | { kind: 'notify-followers'; slug: string; teamId?: string | null; event: FollowEvent; subject: string; lines: MailLine[] };

/** What a service or a job returns: its result and the effects to apply after its commit. */
export interface WithEffects<T> { result: T; effects: Effect[] }

export const kickJobs = (): Effect => ({ kind: 'kick-jobs' });
export const invalidateStandings = (versionId: string | null): Effect => ({ kind: 'invalidate', cache: 'standings', versionId });

/** What applying a list did: worker kicks, caches dropped, team mails and follower mails sent. */
export interface EffectOutcome { kicked: number; invalidated: number; mailed: number; notified: number }

export interface EffectDeps {
  db: Db;
  log: Logger;
  /** absent in a worker process without an app: mail effects are then skipped (logged) */
  mail?: { mailer: Mailer; baseUrl: string };
  /** the app's standings cache (AppContext.standingsCache); absent in a worker process without an app, which has none to drop */
  standingsCache?: StandingsCache;
  kick(): void;
}

export type EffectApplier = (effects: readonly Effect[]) => Promise<EffectOutcome>;

export const renderLine = (line: MailLine, baseUrl: string): string =>
  (typeof line === 'string' ? line : line.map((p) => (typeof p === 'string' ? p : `${baseUrl.replace(/\/$/, '')}${p.path}`)).join(''));

const effectKey = (e: Effect): string | null => (e.kind === 'kick-jobs' ? 'kick' : e.kind === 'invalidate' ? `invalidate:${e.cache}:${e.versionId ?? '*'}` : null);

/**
 * Applies effects once each, in a fixed order: caches first (a reader after this sees the new
 * data), then one worker kick however many were asked, then mail. Repeated kicks and
 * invalidations collapse into one; mails are distinct by nature. Never throws: a failed send is
 * logged and undoes nothing (the write is committed already).
 */
export async function applyEffects(deps: EffectDeps, effects: readonly Effect[]): Promise<EffectOutcome> {
  const out: EffectOutcome = { kicked: 0, invalidated: 0, mailed: 0, notified: 0 };
  const seen = new Set<string>();
  const once = effects.filter((e) => {
    const k = effectKey(e);
    if (k === null) return true;
    if (seen.has(k)) return false;
    seen.add(k);
    return true;
  });
  for (const e of once) {
    if (e.kind !== 'invalidate') continue;
    // the wider drop covers the narrower one
    if (e.versionId !== null && seen.has('invalidate:standings:*')) continue;
    if (!deps.standingsCache) continue;
    deps.standingsCache.invalidate(e.versionId ?? undefined);
    out.invalidated++;
  }
  if (seen.has('kick')) {
    try { deps.kick(); out.kicked++; } catch (err) { deps.log.error('effects.kick', { error: String((err as Error)?.message ?? err) }); }
  }
  for (const e of once) {
    if (e.kind !== 'mail-team' && e.kind !== 'notify-followers') continue;
    if (!deps.mail) { deps.log.warn('effects.no-mailer', { kind: e.kind, event: e.event }); continue; }
    try {
      if (e.kind === 'mail-team') {
        const to = (await teamEmails(deps.db, e.teamIds)).map((r) => r.email);
        out.mailed += await sendAll(deps.mail.mailer, deps.log, to, e.subject, e.lines.map((l) => renderLine(l, deps.mail!.baseUrl)).join('\n'), e.event);
      } else {
        out.notified += await notifyFollowers({ db: deps.db, log: deps.log, ...deps.mail }, { ...e, lines: e.lines.map((l) => renderLine(l, deps.mail!.baseUrl)) });
      }
    } catch (err) {
      deps.log.error('effects.mail', { kind: e.kind, event: e.event, error: String((err as Error)?.message ?? err) });
    }
  }
  return out;
}

/** Addresses of a team's members (a Parallax team is a better-auth organization). */
export async function teamEmails(db: Db, teamIds: string[]): Promise<{ email: string; name: string; teamId: string }[]> {
  const out: { email: string; name: string; teamId: string }[] = [];
  for (const teamId of [...new Set(teamIds)]) {
    const rows = await db.select({ email: user.email, name: user.name }).from(member).innerJoin(user, eq(user.id, member.userId)).where(eq(member.organizationId, teamId));
    for (const r of rows) out.push({ ...r, teamId });
  }
  return out;
}

/** Sends one message to each address; a failed send is logged and does not undo anything. */
async function sendAll(mailer: Mailer, log: Logger, to: string[], subject: string, text: string, event: string): Promise<number> {
  let sent = 0;
  await Promise.all([...new Set(to)].map(async (addr) => {
    try {
      await mailer.send({ to: addr, subject, text });
      sent++;
    } catch (err) {
      log.error('mail.failed', { event, error: String((err as Error).message ?? err) });
    }
  }));
  return sent;
}

/**
 * The applier of each app, by database handle, for the worker: jobs run without an app context,
 * and a worker in a process with an app applies through that app's applier (its mailer, base URL
 * and worker kick); a worker process without an app has no cache to drop and mails nobody.
 */
const appliers = new WeakMap<Db, EffectApplier>();

export function effectApplier(deps: EffectDeps): EffectApplier {
  const apply: EffectApplier = (effects) => applyEffects(deps, effects);
  appliers.set(deps.db, apply);
  return apply;
}

export function applierFor(db: Db, log: Logger): EffectApplier {
  return appliers.get(db) ?? ((effects) => applyEffects({ db, log, kick: () => {} }, effects));
}

/**
 * A route handler's answer with effects: the route table's wrapper applies the effects, then sends
 * the body (a function of the outcome when the answer says what was done, e.g. how many mails).
 */
export class Reply<T = unknown> {
  constructor(readonly effects: readonly Effect[], private readonly body: T | ((o: EffectOutcome) => T)) {}
  render(o: EffectOutcome): T {
    return typeof this.body === 'function' ? (this.body as (o: EffectOutcome) => T)(o) : this.body;
  }
}

/** The answer of a handler whose service returned { result, effects }. */
export function reply<T>(effects: readonly Effect[], body: T | ((o: EffectOutcome) => T)): Reply<T> {
  return new Reply(effects, body);
}
