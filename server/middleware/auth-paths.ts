/**
 * Which of better-auth's endpoints are open over HTTP (issue 12 item 13). better-auth's admin and
 * API-key plugins add their own endpoints (/admin/set-role, /admin/impersonate-user,
 * /api-key/create, ...) beside the product's routes: they skipped the product's audit line and its
 * guards ("not your own admin role"), and allowed impersonation. The product calls those plugins
 * on the server only (auth.api.*), so over HTTP only the endpoints listed here pass; everything
 * else under /api/auth gets 404 naming the product's route. An endpoint a better-auth upgrade
 * adds stays closed until someone lists it here.
 */
import type { NextFunction, Request, Response } from 'express';
import { AppError } from '../errors';

export const OPEN_AUTH_PATHS: readonly string[] = [
  // accounts and sessions
  '/sign-up/email', '/sign-in/email', '/sign-out', '/get-session',
  '/send-verification-email', '/verify-email',
  '/request-password-reset', '/reset-password', '/change-password',
  '/list-sessions', '/revoke-session', '/revoke-sessions', '/revoke-other-sessions',
  '/ok', '/error',
  // teams (the team rules run in a before-hook: server/services/team-rules.ts)
  '/organization/create', '/organization/update', '/organization/check-slug', '/organization/set-active',
  '/organization/list', '/organization/get-full-organization', '/organization/list-members', '/organization/get-active-member',
  '/organization/invite-member', '/organization/get-invitation', '/organization/accept-invitation', '/organization/reject-invitation',
  '/organization/cancel-invitation', '/organization/list-invitations', '/organization/list-user-invitations',
  '/organization/remove-member', '/organization/update-member-role', '/organization/leave',
];
/** Paths with a token after them: /reset-password/<token> (the link in the reset mail). */
const OPEN_PREFIXES = ['/reset-password/'];

const INSTEAD: [RegExp, string][] = [
  [/^\/admin\//, 'Roles and bans go through /api/admin/users/:userId/role and /api/admin/users/:userId/ban (audited).'],
  [/^\/api-key\//, "Team API keys are made and revoked through /api/teams/:teamId/api-keys (audited)."],
];

/** Mounted on /api/auth before better-auth's handler. */
export function authPathGate() {
  const open = new Set(OPEN_AUTH_PATHS);
  return (req: Request, _res: Response, next: NextFunction) => {
    const p = req.path.replace(/\/+$/, '') || '/';
    if (open.has(p) || OPEN_PREFIXES.some((x) => p.startsWith(x) && !p.slice(x.length).includes('/'))) return next();
    const hint = INSTEAD.find(([re]) => re.test(p))?.[1] ?? 'The sign-in, account and team endpoints are listed in DEVELOPERS.md.';
    next(new AppError('not_found', `/api/auth${p.slice(0, 100)} is not open on Parallax. ${hint}`));
  };
}
