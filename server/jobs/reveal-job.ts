/**
 * Blind-round reveals. A clock in each app process (every REVEAL_POLL_MS, and whenever
 * enqueueDueReveals is called) queues one 'reveal' job per seal whose date has passed; the job
 * (revealSeal) marks the seal revealed, checks the commitments, recomputes the standings with the
 * reveal time, and e-mails the members of every team with an entry in the version. Several
 * processes may queue the same reveal: the job is idempotent (the seal row is locked).
 *
 * The mails are effects applied by the worker through the app's applier (server/effects.ts); a
 * worker without an app in its process reveals but sends no mail.
 */
import { isNull } from 'drizzle-orm';
import type { AppContext } from '../context';
import { referenceSeals } from '../db/schema';
import { isSealInForce } from '../queries/visibility';
import { recomputeStandings } from '../services/recompute-standings';
import { revealSeal } from '../services/reveal-references';
import { enqueueJob } from './queue';
import type { JobHandler } from './types';
import { kickJobs } from '../effects';

export const REVEAL_POLL_MS = 10_000;

/** Queues a reveal job for every seal whose date has passed at ctx.now(); returns how many. */
export async function enqueueDueReveals(ctx: Pick<AppContext, 'db' | 'now' | 'applyEffects'>): Promise<number> {
  const now = ctx.now();
  const open = await ctx.db.select({ id: referenceSeals.id, sealedUntil: referenceSeals.sealedUntil, revealedAt: referenceSeals.revealedAt }).from(referenceSeals).where(isNull(referenceSeals.revealedAt));
  const due = open.filter((s) => !isSealInForce(s, now));
  for (const s of due) await enqueueJob(ctx.db, 'reveal', { sealId: s.id, now: now.toISOString() }, `reveal:${s.id}`);
  if (due.length) await ctx.applyEffects([kickJobs()]);
  return due.length;
}

/** Called once per app (server/routes/index.ts): starts the clock. */
export function startRevealClock(ctx: AppContext): void {
  const timer = setInterval(() => {
    enqueueDueReveals(ctx).catch(() => { /* the database may be closing; the next tick retries */ });
  }, REVEAL_POLL_MS);
  timer.unref();
}

export const revealJob: JobHandler = async (job, w) => {
  const payload = job.payload as { sealId: string; now?: string };
  // the reveal time: the later of the clock that queued it and the worker's (injected) clock
  const now = new Date(Math.max(w.now().getTime(), payload.now ? Date.parse(payload.now) : 0));
  const { result: out, effects } = await revealSeal(w.db, payload.sealId, now);
  if (!out.revealed) return { ...out };
  const rescored = await recomputeStandings(w.db, out.versionId!, now);
  w.log.info('references.unseal', { sealId: out.sealId, challenge: out.slug, targets: out.targets, commitments: out.commitments?.length ?? 0 });
  // applied by the worker once this job is recorded: the standings cache dropped, the teams and followers mailed
  return { ...out, effects: [...rescored.effects, ...effects] };
};
