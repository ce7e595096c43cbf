/**
 * Throttles failed sign-ins: after 3 failures in 10 s from one client address, or for one e-mail
 * address, the next attempt gets 429 with Retry-After. The address is req.ip, which Express derives
 * from the socket and only the configured number of trusted proxy hops, so a client that sends its
 * own X-Forwarded-For does not escape the limit.
 */
import type { NextFunction, Request, Response } from 'express';
import { AppError } from '../errors';

export interface ThrottleOptions { windowMs: number; maxFailures: number; now: () => number }

export function signInThrottle(opts: ThrottleOptions) {
  const failures = new Map<string, number[]>();
  const recent = (k: string, t: number) => (failures.get(k) ?? []).filter((x) => t - x < opts.windowMs);
  return (req: Request, res: Response, next: NextFunction) => {
    const t = opts.now();
    const email = typeof req.body?.email === 'string' ? req.body.email.trim().toLowerCase().slice(0, 320) : '';
    const keys = [`ip:${req.ip}`, ...(email ? [`email:${email}`] : [])];
    for (const k of keys) {
      const r = recent(k, t);
      if (r.length >= opts.maxFailures) {
        const retry = Math.max(1, Math.ceil((opts.windowMs - (t - r[0])) / 1000));
        return next(new AppError('rate_limited', `Too many failed sign-in attempts. Wait ${retry} s and try again.`, [], { 'Retry-After': String(retry) }));
      }
    }
    res.on('finish', () => {
      if (res.statusCode < 400) return;
      const now = opts.now();
      for (const k of keys) failures.set(k, [...recent(k, now), now]);
      if (failures.size > 50_000) failures.clear(); // bounded memory under a flood
    });
    next();
  };
}
