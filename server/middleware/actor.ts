/**
 * Who is calling: a visitor, a signed-in user (session cookie), or a team's API key (x-api-key).
 * Resolved once per request; routes then ask `requireX(req)` helpers from access.ts.
 */
import type { NextFunction, Request, Response } from 'express';
import { fromNodeHeaders } from 'better-auth/node';
import { and, eq } from 'drizzle-orm';
import type { Auth } from '../auth';
import type { Db } from '../db/client';
import { apikey, member, session as sessionTable, user as userTable } from '../db/schema';
import { AppError } from '../errors';

export type SiteRole = 'user' | 'moderator' | 'admin';

export type Actor =
  | { kind: 'visitor' }
  | {
      kind: 'user';
      user: { id: string; name: string; email: string; role: SiteRole; emailVerified: boolean };
      sessionId: string;
    }
  | { kind: 'api-key'; teamId: string; keyId: string; keyName: string | null };

declare module 'express-serve-static-core' {
  interface Request {
    actor: Actor;
    requestId: string;
  }
}

export function actorMiddleware(auth: Auth, db: Db, sessionMaxAgeMs: number, now: () => Date) {
  return async (req: Request, _res: Response, next: NextFunction) => {
    req.actor = { kind: 'visitor' };
    const key = req.header('x-api-key');
    if (key !== undefined) {
      if (key.length > 200) return next(new AppError('unauthenticated', 'The API key is not valid.'));
      const r = await auth.api.verifyApiKey({ body: { key } }).catch(() => null);
      if (!r || !r.valid || !r.key) {
        const code = r?.error?.code;
        if (code === 'RATE_LIMITED') {
          return next(new AppError('rate_limited', 'This API key has made too many requests; wait and retry.', [], { 'Retry-After': '60' }));
        }
        return next(new AppError('unauthenticated', 'The API key is not valid, has expired or was revoked.'));
      }
      // a key is only as good as the person who made it: refused once they are banned or no
      // longer lead the team (a ban also deletes their keys: server/routes/admin.ts)
      if (!(await keyCreatorInGoodStanding(db, r.key.id, r.key.referenceId, now()))) {
        return next(new AppError('unauthenticated', 'The API key is not valid: the person who made it is banned or no longer leads the team. A team lead can make a new key.'));
      }
      req.actor = { kind: 'api-key', teamId: r.key.referenceId, keyId: r.key.id, keyName: r.key.name ?? null };
      return next();
    }
    if (!req.headers.cookie) return next();
    const s = await auth.api.getSession({ headers: fromNodeHeaders(req.headers) }).catch(() => null);
    if (!s) return next();
    const u = s.user as typeof s.user & { role?: string | null; banned?: boolean | null };
    if (u.banned) return next();
    // the absolute lifetime: however active, a session ends sessionMaxAge after it began
    if (now().getTime() - new Date(s.session.createdAt).getTime() > sessionMaxAgeMs) {
      await db.delete(sessionTable).where(eq(sessionTable.id, s.session.id));
      return next();
    }
    const role: SiteRole = u.role === 'admin' || u.role === 'moderator' ? u.role : 'user';
    req.actor = {
      kind: 'user',
      user: { id: u.id, name: u.name, email: u.email, role, emailVerified: u.emailVerified },
      sessionId: s.session.id,
    };
    next();
  };
}

/** True when the key's creator (if recorded) is not banned and still leads the key's team. */
export async function keyCreatorInGoodStanding(db: Db, keyId: string, teamId: string, now: Date): Promise<boolean> {
  const [k] = await db.select({ createdBy: apikey.createdBy, banned: userTable.banned, banExpires: userTable.banExpires })
    .from(apikey).leftJoin(userTable, eq(userTable.id, apikey.createdBy)).where(eq(apikey.id, keyId)).limit(1);
  if (!k) return false;
  if (!k.createdBy) return true; // keys made before the creator was recorded (migration 0005)
  if (k.banned && (!k.banExpires || k.banExpires > now)) return false;
  return (await teamRole(db, k.createdBy, teamId)) === 'lead';
}

export type TeamRole = 'lead' | 'member';

export async function teamRole(db: Db, userId: string, teamId: string): Promise<TeamRole | null> {
  const rows = await db.select({ role: member.role }).from(member)
    .where(and(eq(member.userId, userId), eq(member.organizationId, teamId))).limit(1);
  if (!rows.length) return null;
  return rows[0].role === 'owner' ? 'lead' : 'member';
}
