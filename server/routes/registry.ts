/**
 * Every API route is declared here with the roles that may call it. The declarations drive the
 * router, the access checks, the OpenAPI document and the authorisation-matrix test (which fails
 * on a route missing from its table).
 */
import type { NextFunction, Request, RequestHandler, Response, Router } from 'express';
import type { Db } from '../db/client';
import { teamRole } from '../middleware/actor';
import { forbidden, unauthenticated } from '../errors';
import { Reply, type EffectApplier } from '../effects';

/**
 * public: anyone. signed-in: a user session. verified: a user whose e-mail is confirmed.
 * team-member / team-lead: a member / lead of the route's team (a team's API key counts as a member).
 * moderator: site moderators and admins. admin: site admins.
 */
export type Access = 'public' | 'signed-in' | 'verified' | 'team-member' | 'team-lead' | 'moderator' | 'admin';
export type Method = 'get' | 'post' | 'put' | 'patch' | 'delete';

export interface RouteDef {
  method: Method;
  path: string;
  access: Access;
  summary: string;
  /** for team-member/team-lead routes: where the team id comes from (default: req.params.teamId) */
  team?: (req: Request) => Promise<string | null> | string | null;
  /** whether an API key may call it (team-member routes only) */
  apiKey?: boolean;
  /**
   * How the body is read, after the access check: by default (any method but GET) the small JSON
   * parser (config.jsonLimitBytes); a route that takes a large document names its reader here,
   * documentBody() from server/util/document-body.ts (spooled, strictly parsed by the route).
   */
  body?: RequestHandler;
  middleware?: RequestHandler[];
  handler: (req: Request, res: Response) => unknown;
}

export class RouteTable {
  readonly defs: RouteDef[] = [];
  add(def: RouteDef): void {
    this.defs.push(def);
  }
  /**
   * json: the default body parser (small limit); no body is read before the access check passed.
   * applyEffects: a handler that answers reply(effects, body) has its service's after-commit effects
   * applied here, once, before the body is sent (server/effects.ts).
   */
  mount(router: Router, db: Db, json: RequestHandler, applyEffects: EffectApplier): void {
    for (const def of this.defs) {
      const access = (req: Request, _res: Response, next: NextFunction) => { checkAccess(def, req, db).then(() => next(), next); };
      const body = def.body ?? (def.method === 'get' ? null : json);
      const wrap = async (req: Request, res: Response, next: NextFunction) => {
        try {
          let out = await def.handler(req, res);
          if (out instanceof Reply) out = out.render(await applyEffects(out.effects));
          if (out !== undefined && !res.headersSent) res.json(out);
        } catch (e) {
          next(e);
        }
      };
      router[def.method](def.path, access, ...(body ? [body] : []), ...(def.middleware ?? []), wrap);
    }
  }
}

async function checkAccess(def: RouteDef, req: Request, db: Db): Promise<void> {
  const a = req.actor;
  if (def.access === 'public') return;
  if (def.access === 'team-member' || def.access === 'team-lead') {
    const teamId = def.team ? await def.team(req) : (req.params.teamId as string);
    if (a.kind === 'api-key') {
      if (def.access === 'team-member' && def.apiKey && teamId && a.teamId === teamId) return;
      throw forbidden('This API key cannot be used for this request.');
    }
    if (a.kind !== 'user') throw unauthenticated();
    if (!teamId) throw forbidden();
    const role = await teamRole(db, a.user.id, teamId);
    if (!role) throw forbidden('Only members of this team can do this.');
    if (def.access === 'team-lead' && role !== 'lead') throw forbidden('Only a team lead can do this.');
    return;
  }
  if (a.kind === 'api-key') throw forbidden('API keys can only be used to submit entries.');
  if (a.kind !== 'user') throw unauthenticated();
  if (def.access === 'signed-in') return;
  if (def.access === 'verified') {
    if (!a.user.emailVerified) throw forbidden('Confirm your e-mail address first.');
    return;
  }
  if (def.access === 'moderator' && (a.user.role === 'moderator' || a.user.role === 'admin')) return;
  if (def.access === 'admin' && a.user.role === 'admin') return;
  throw forbidden(def.access === 'admin' ? 'Only administrators can do this.' : 'Only moderators can do this.');
}
