/**
 * Throttles failed sign-ins, kept in the database (table sign_in_failures) so every server process
 * sees the same counts (issue 12 item 9). Two counters:
 *
 * - per (account, client address): `maxFailures` free failures, then every further failure blocks
 *   that pair for a delay that doubles (windowMs, 2 windowMs, 4 windowMs, ... up to maxDelayMs).
 *   Someone guessing from one address slows down on that account only; the owner signing in from
 *   another address is never locked out by it.
 * - per client address over all accounts (password spraying): `perAddressFailures` free failures,
 *   then the same growing delays for that address.
 *
 * A successful sign-in clears its pair; a counter idle for `forgetAfterMs` starts again from zero.
 * The address is req.ip (Express derives it from the socket and only the configured number of
 * trusted proxy hops), so a client that sends its own X-Forwarded-For does not escape the limit.
 * The check runs before better-auth (this middleware); the outcome is recorded by an after-hook in
 * server/auth.ts (recordSignInOutcome), before the response leaves, so the next attempt sees it.
 */
import type { NextFunction, Request, Response } from 'express';
import { and, eq, inArray, isNull, lt, or, sql } from 'drizzle-orm';
import type { Db } from '../db/client';
import { signInFailures } from '../db/schema';
import { AppError } from '../errors';

export interface ThrottleOptions {
  /** the first delay after the free failures; it doubles with every further failure */
  windowMs: number;
  /** free failures per (account, address) */
  maxFailures: number;
  /** free failures per address over all accounts (default 30) */
  perAddressFailures?: number;
  /** the longest delay (default 15 minutes) */
  maxDelayMs?: number;
  /** a counter idle this long starts again (default 24 hours) */
  forgetAfterMs?: number;
}

const normEmail = (e: unknown) => (typeof e === 'string' ? e.trim().toLowerCase().slice(0, 320) : '');
const pairKey = (email: string, ip: string) => `pair:${email}|${ip}`;
const ipKey = (ip: string) => `ip:${ip}`;

const keysFor = (email: string, ip: string): string[] => (email ? [pairKey(email, ip), ipKey(ip)] : [ipKey(ip)]);

/** The delay after `failures` failures when `free` of them are free: 0, then windowMs doubling. */
export function throttleDelayMs(failures: number, free: number, opts: ThrottleOptions): number {
  if (failures < free) return 0;
  const steps = Math.min(30, failures - free);
  return Math.min(opts.maxDelayMs ?? 15 * 60_000, opts.windowMs * 2 ** steps);
}

export function signInThrottle(db: Db, opts: ThrottleOptions, now: () => Date) {
  return async (req: Request, _res: Response, next: NextFunction) => {
    try {
      const ip = req.ip ?? 'unknown';
      const keys = keysFor(normEmail(req.body?.email), ip);
      const rows = await db.select().from(signInFailures).where(inArray(signInFailures.key, keys));
      const t = now().getTime();
      const until = Math.max(0, ...rows.map((r) => r.blockedUntil?.getTime() ?? 0));
      if (until > t) {
        const retry = Math.max(1, Math.ceil((until - t) / 1000));
        return next(new AppError('rate_limited', `Too many failed sign-in attempts from this address. Wait ${retry} s and try again (each further failure doubles the wait; other addresses are not affected).`, [], { 'Retry-After': String(retry) }));
      }
      next();
    } catch (e) {
      next(e);
    }
  };
}

/** Called by better-auth's after-hook on /sign-in/email: a failure counts, a success clears the pair. */
export async function recordSignInOutcome(db: Db, opts: ThrottleOptions, p: { email: unknown; ip: string; ok: boolean; now: Date }): Promise<void> {
  const email = normEmail(p.email);
  if (p.ok) {
    if (email) await db.delete(signInFailures).where(eq(signInFailures.key, pairKey(email, p.ip)));
    return;
  }
  const forget = opts.forgetAfterMs ?? 86_400_000;
  // counters idle past forgetAfterMs and no longer blocking are dropped (the table stays small)
  await db.delete(signInFailures).where(and(lt(signInFailures.lastFailureAt, new Date(p.now.getTime() - forget)),
    or(isNull(signInFailures.blockedUntil), lt(signInFailures.blockedUntil, p.now))));
  const limits = [
    ...(email ? [{ key: pairKey(email, p.ip), free: opts.maxFailures }] : []),
    { key: ipKey(p.ip), free: opts.perAddressFailures ?? 30 },
  ];
  for (const { key, free } of limits) {
    // one statement, so concurrent failures from several processes all count
    const stale = new Date(p.now.getTime() - forget);
    const [row] = await db.insert(signInFailures).values({ key, failures: 1, lastFailureAt: p.now })
      .onConflictDoUpdate({
        target: signInFailures.key,
        set: {
          failures: sql`case when ${signInFailures.lastFailureAt} < ${stale.toISOString()}::timestamptz then 1 else ${signInFailures.failures} + 1 end`,
          lastFailureAt: p.now,
        },
      }).returning({ failures: signInFailures.failures });
    const delay = throttleDelayMs(row.failures, free, opts);
    await db.update(signInFailures).set({ blockedUntil: delay ? new Date(p.now.getTime() + delay) : null }).where(eq(signInFailures.key, key));
  }
}
