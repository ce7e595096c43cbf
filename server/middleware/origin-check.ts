/**
 * CSRF defence for every state-changing route: a cookie-bearing request that is not GET/HEAD/
 * OPTIONS must come from one of our own origins (Origin header, or Referer when Origin is absent).
 * Requests authenticated by x-api-key carry no ambient credentials and are not affected.
 */
import type { NextFunction, Request, Response } from 'express';
import { AppError } from '../errors';

export function originCheck(allowed: string[]) {
  const ok = new Set(allowed.map((o) => o.replace(/\/$/, '')));
  return (req: Request, _res: Response, next: NextFunction) => {
    if (['GET', 'HEAD', 'OPTIONS'].includes(req.method)) return next();
    if (!req.headers.cookie) return next();
    let origin = req.header('origin');
    if (!origin) {
      const ref = req.header('referer');
      if (ref) { try { origin = new URL(ref).origin; } catch { origin = undefined; } }
    }
    if (!origin || !ok.has(origin)) {
      return next(new AppError('forbidden', 'This request came from another site (Origin check failed). Use the Parallax pages, or an API key for scripts.'));
    }
    next();
  };
}
