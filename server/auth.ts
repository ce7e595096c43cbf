/**
 * Sign-in, roles, teams and API keys through better-auth, configured as RELIABILITY.md asks:
 * scrypt at the ASVS cost, verification required, reset tokens and verification identifiers
 * stored hashed, sessions revoked on reset, origin checks, and a
 * client-IP header that only this server sets (so a forged X-Forwarded-For changes nothing).
 * The absolute session lifetime is enforced where sessions are read (server/middleware/actor.ts).
 *
 * A Parallax team is a better-auth organization: owner/admin members are team leads.
 */
import { betterAuth } from 'better-auth';
import { APIError, createAuthMiddleware, getSessionFromCtx } from 'better-auth/api';
import { drizzleAdapter } from 'better-auth/adapters/drizzle';
import { admin, organization } from 'better-auth/plugins';
import { apiKey } from '@better-auth/api-key';
import { trustedOriginsOf, type Config } from './config';
import type { Db } from './db/client';
import * as schema from './db/schema';
import type { Mailer } from './mail/mailer';
import type { MailQueue } from './mail/queue';
import { recordSignInOutcome } from './middleware/sign-in-throttle';
import { invitationRefusal, nameForMail, recordInvitationMail, teamProblems, teamsLedBy } from './services/team-rules';
import { hashPassword, verifyPassword } from './password';
import type { Logger } from './log';
import { escapeHtml } from './util/html';

/** The header this server sets from the socket address (after the configured proxy hops). */
export const CLIENT_IP_HEADER = 'x-parallax-client-ip';
export const API_KEY_PREFIX = 'plx_';
/** API keys: 1,000 requests an hour per key (a scripted sweep posts hundreds), 180-day expiry. */
export const API_KEY_RATE = { timeWindow: 60 * 60 * 1000, maxRequests: 1000 };
export const API_KEY_DEFAULT_TTL_MS = 180 * 86400 * 1000;

export interface AuthDeps {
  db: Db;
  config: Config;
  mailer: Mailer;
  /** every mail better-auth asks for is queued here, never awaited by the request (issue 12 item 12) */
  mailQueue: MailQueue;
  log: Logger;
  /** the injected clock (sign-in throttle, invitation limits) */
  now?: () => Date;
}

/** A better-auth error with our message (its JSON body is { code, message }). */
const refuse = (status: 'BAD_REQUEST' | 'FORBIDDEN' | 'TOO_MANY_REQUESTS', message: string, headers?: Record<string, string>) =>
  new APIError(status, { message, code: status === 'TOO_MANY_REQUESTS' ? 'RATE_LIMITED' : status === 'FORBIDDEN' ? 'TEAM_LIMIT' : 'INVALID_TEAM' }, headers);

export function createAuth({ db, config, mailer, mailQueue, log, now = () => new Date() }: AuthDeps) {
  // queued: the response never waits for SMTP, so an existing and an unknown address take the same time
  const send = async (to: string, subject: string, text: string, link: string) => {
    mailQueue.push(subject, async () => {
      try {
        await mailer.send({
          to,
          subject,
          text: `${text}\n\n${link}\n\n— Parallax`,
          html: `<p>${escapeHtml(text)}</p><p><a href="${escapeHtml(link)}">${escapeHtml(link)}</a></p><p>— Parallax</p>`,
        });
      } catch (e) {
        log.error('mail.send_failed', { to, subject, error: (e as Error).message });
      }
    });
  };
  return betterAuth({
    appName: 'Parallax',
    baseURL: config.baseUrl,
    basePath: '/api/auth',
    secret: config.authSecret,
    telemetry: { enabled: false },
    database: drizzleAdapter(db, { provider: 'pg', schema: { ...schema } }),
    trustedOrigins: trustedOriginsOf(config),
    emailAndPassword: {
      enabled: true,
      requireEmailVerification: true,
      autoSignIn: false,
      minPasswordLength: 10,
      maxPasswordLength: 128,
      revokeSessionsOnPasswordReset: true,
      resetPasswordTokenExpiresIn: 60 * 60,
      password: {
        hash: (pw) => hashPassword(pw, config.passwordHash),
        verify: ({ hash, password }) => verifyPassword(hash, password),
      },
      sendResetPassword: async ({ user, url }) => {
        await send(user.email, 'Reset your Parallax password', 'Someone asked to reset the password of this Parallax account. The link works once, for one hour. If it was not you, ignore this message.', url);
      },
    },
    emailVerification: {
      sendOnSignUp: true,
      autoSignInAfterVerification: false,
      expiresIn: 24 * 60 * 60,
      sendVerificationEmail: async ({ user, url }) => {
        await send(user.email, 'Confirm your e-mail address for Parallax', `Welcome to Parallax, ${nameForMail(user.name, 'new member')}. Confirm your address to finish signing up (the link works for 24 hours).`, url);
      },
    },
    verification: { storeIdentifier: 'hashed' },
    session: {
      expiresIn: 7 * 24 * 60 * 60,
      updateAge: 24 * 60 * 60,
    },
    rateLimit: {
      enabled: true,
      storage: 'memory',
      window: 60,
      max: 300,
      customRules: {
        // sign-in failures are throttled by our own limiter (server/middleware/sign-in-throttle.ts),
        // which counts failures only, per address and per e-mail
        '/sign-in/email': false,
        '/sign-up/email': { window: 60, max: config.authRateLimits.signUpPerMinute },
        '/request-password-reset': { window: 60, max: config.authRateLimits.mailPerMinute },
        '/send-verification-email': { window: 60, max: config.authRateLimits.mailPerMinute },
      },
    },
    advanced: {
      cookiePrefix: 'parallax',
      useSecureCookies: config.baseUrl.startsWith('https://'),
      ipAddress: { ipAddressHeaders: [CLIENT_IP_HEADER] },
      defaultCookieAttributes: { httpOnly: true, sameSite: 'lax' },
    },
    hooks: {
      // the team rules (server/services/team-rules.ts) on better-auth's organization endpoints
      before: createAuthMiddleware(async (ctx) => {
        if (ctx.path !== '/organization/create' && ctx.path !== '/organization/update' && ctx.path !== '/organization/invite-member') return;
        const body = (ctx.body ?? {}) as Record<string, unknown>;
        const s = await getSessionFromCtx(ctx).catch(() => null);
        if (!s) return; // the endpoint answers 401 itself
        if (ctx.path === '/organization/invite-member') {
          const refusal = await invitationRefusal(db, config.teamLimits, { senderId: s.user.id, recipient: String(body.email ?? ''), now: now() });
          if (refusal) throw refuse('TOO_MANY_REQUESTS', refusal.message, { 'Retry-After': String(refusal.retryAfterS) });
          return;
        }
        const update = ctx.path === '/organization/update';
        const data = (update ? body.data ?? {} : body) as Record<string, unknown>;
        const teamId = update ? String(body.organizationId ?? s.session.activeOrganizationId ?? '') : undefined;
        const problems = await teamProblems(db, { name: data.name, slug: data.slug, metadata: data.metadata, logo: data.logo, excludeTeamId: teamId });
        if (problems.length) throw refuse('BAD_REQUEST', problems.map((p) => p.message).join(' '));
        if (!update && (await teamsLedBy(db, s.user.id)) >= config.teamLimits.teamsPerUser) {
          throw refuse('FORBIDDEN', `You already lead ${config.teamLimits.teamsPerUser} teams, the limit per person; hand one over or ask an admin.`);
        }
      }),
      // no account enumeration: for an address that already has an account, better-auth answers
      // the sign-up with a made-up user, but without the admin plugin's default role (role: null
      // instead of 'user'), which told the two cases apart (tests/server/abuse.test.ts)
      after: createAuthMiddleware(async (ctx) => {
        if (ctx.path === '/sign-in/email') {
          // the sign-in throttle counts failures per (account, address) in the database, before the response leaves
          const r = ctx.context.returned;
          const status = r instanceof Error && 'statusCode' in r ? Number(r.statusCode) : 200;
          if (status !== 401 && status !== 200) return;
          const ip = ctx.headers?.get(CLIENT_IP_HEADER) ?? 'unknown';
          await recordSignInOutcome(db, config.signInThrottle, { email: (ctx.body as { email?: unknown } | undefined)?.email, ip, ok: status === 200, now: now() });
          return;
        }
        if (ctx.path !== '/sign-up/email') return;
        const r = ctx.context.returned as { user?: Record<string, unknown> } | null | undefined;
        if (r && typeof r === 'object' && !(r instanceof Error) && r.user && typeof r.user === 'object' && r.user.role == null) {
          return ctx.json({ ...r, user: { ...r.user, role: 'user' } });
        }
      }),
    },
    plugins: [
      admin({ defaultRole: 'user', adminRoles: ['admin'] }),
      organization({
        creatorRole: 'owner',
        allowUserToCreateOrganization: async (u) => Boolean(u.emailVerified),
        invitationExpiresIn: 7 * 24 * 60 * 60,
        membershipLimit: 200,
        sendInvitationEmail: async (data) => {
          await recordInvitationMail(db, { senderId: data.inviter.user.id, recipient: data.email, now: now() });
          const link = `${config.baseUrl}/invitations/${data.id}`;
          await send(
            data.email,
            `Join the team ${data.organization.name} on Parallax`,
            `${nameForMail(data.inviter.user.name, 'A team lead')} invites you to the team "${data.organization.name}" on Parallax as ${data.role === 'member' ? 'a member' : 'a team lead'}. Sign in (or sign up with this address) and accept:`,
            link,
          );
        },
      }),
      apiKey({
        references: 'organization',
        defaultPrefix: API_KEY_PREFIX,
        defaultKeyLength: 48,
        requireName: true,
        enableMetadata: false,
        keyExpiration: { defaultExpiresIn: API_KEY_DEFAULT_TTL_MS, minExpiresIn: 1, maxExpiresIn: 365 },
        rateLimit: { enabled: true, ...API_KEY_RATE },
      }),
    ],
  });
}

export type Auth = ReturnType<typeof createAuth>;
