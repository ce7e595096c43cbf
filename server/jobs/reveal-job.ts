/**
 * Blind-round reveals. A clock in each app process (every REVEAL_POLL_MS, and whenever
 * enqueueDueReveals is called) queues one 'reveal' job per seal whose date has passed; the job
 * (revealSeal) marks the seal revealed, checks the commitments, recomputes the standings with the
 * reveal time, and e-mails the members of every team with an entry in the version. Several
 * processes may queue the same reveal: the job is idempotent (the seal row is locked).
 *
 * The job needs the mailer and the base URL: the app that queued it registers its context here
 * (by database handle); a worker without an app in its process reveals but sends no mail.
 */
import { isNull } from 'drizzle-orm';
import type { AppContext } from '../context';
import type { Db } from '../db/client';
import { referenceSeals } from '../db/schema';
import { isSealInForce } from '../queries/visibility';
import { recomputeStandings } from '../services/recompute-standings';
import { revealSeal } from '../services/reveal-references';
import { sendAll, teamEmails } from '../services/decide-entry';
import { standingsCache } from '../services/standings-cache';
import { enqueueJob } from './queue';
import type { JobHandler } from './types';
import { challengeLink, notifyFollowers } from '../services/notify-followers';

export const REVEAL_POLL_MS = 10_000;
const contexts = new WeakMap<Db, AppContext>();

/** Queues a reveal job for every seal whose date has passed at ctx.now(); returns how many. */
export async function enqueueDueReveals(ctx: Pick<AppContext, 'db' | 'now' | 'jobs'>): Promise<number> {
  const now = ctx.now();
  const open = await ctx.db.select({ id: referenceSeals.id, sealedUntil: referenceSeals.sealedUntil, revealedAt: referenceSeals.revealedAt }).from(referenceSeals).where(isNull(referenceSeals.revealedAt));
  const due = open.filter((s) => !isSealInForce(s, now));
  for (const s of due) await enqueueJob(ctx.db, 'reveal', { sealId: s.id, now: now.toISOString() }, `reveal:${s.id}`);
  if (due.length) ctx.jobs.kick();
  return due.length;
}

/** Called once per app (server/routes/index.ts): remembers the context, starts the clock. */
export function startRevealClock(ctx: AppContext): void {
  contexts.set(ctx.db, ctx);
  const timer = setInterval(() => {
    enqueueDueReveals(ctx).catch(() => { /* the database may be closing; the next tick retries */ });
  }, REVEAL_POLL_MS);
  timer.unref();
}

export const revealJob: JobHandler = async (job, w) => {
  const payload = job.payload as { sealId: string; now?: string };
  // the reveal time: the later of the clock that queued it and the worker's (injected) clock
  const now = new Date(Math.max(w.now().getTime(), payload.now ? Date.parse(payload.now) : 0));
  const out = await revealSeal(w.db, payload.sealId, now);
  if (!out.revealed) return { ...out };
  await recomputeStandings(w.db, out.versionId!, now);
  standingsCache.invalidate(out.versionId!);
  const ctx = contexts.get(w.db);
  let mailed = 0;
  if (ctx) {
    const people = await teamEmails(w.db, out.teamIds ?? []);
    const base = ctx.config.baseUrl.replace(/\/$/, '');
    const byTeam = new Map<string, string[]>();
    for (const p of people) byTeam.set(p.teamId, [...(byTeam.get(p.teamId) ?? []), p.email]);
    for (const [teamId, to] of byTeam) {
      const mine = (out.commitments ?? []).filter((c) => c.teamId === teamId);
      const lines = [
        `The sealed reference values of ${out.slug} (${out.targets} target(s)) are now public.`,
        '',
        ...(mine.length ? ['Your commitments:', ...mine.map((c) => `- "${c.label}": ${c.result === 'match' ? 'matches its estimates' : 'does NOT match its estimates'} (${base}/entries/${c.entryId})`), ''] : []),
        `The standings: ${base}/challenges/${out.slug}`,
      ];
      mailed += await sendAll(ctx.mailer, w.log, to, `Parallax: reference values of ${out.slug} revealed`, lines.join('\n'), 'references.unseal');
    }
  } else {
    w.log.warn('reveal.no-mailer', { sealId: out.sealId });
  }
  await notifyFollowers(w.db, { slug: out.slug!, event: 'references.revealed', subject: `Parallax: reference values of ${out.slug} revealed`,
    lines: [`The sealed reference values of ${out.slug} (${out.targets} target(s)) became public at ${now.toISOString()}; the standings were rescored with them.`, '', `The standings: ${challengeLink(w.db, out.slug!)}`] });
  w.log.info('references.unseal', { sealId: out.sealId, challenge: out.slug, targets: out.targets, commitments: out.commitments?.length ?? 0, mailed });
  return { ...out, mailed };
};
