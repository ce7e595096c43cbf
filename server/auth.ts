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
import { createAuthMiddleware } from 'better-auth/api';
import { drizzleAdapter } from 'better-auth/adapters/drizzle';
import { admin, organization } from 'better-auth/plugins';
import { apiKey } from '@better-auth/api-key';
import { trustedOriginsOf, type Config } from './config';
import type { Db } from './db/client';
import * as schema from './db/schema';
import type { Mailer } from './mail/mailer';
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
  log: Logger;
}

export function createAuth({ db, config, mailer, log }: AuthDeps) {
  const send = async (to: string, subject: string, text: string, link: string) => {
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
        await send(user.email, 'Confirm your e-mail address for Parallax', `Welcome to Parallax, ${user.name.replace(/[\r\n]+/g, ' ')}. Confirm your address to finish signing up (the link works for 24 hours).`, url);
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
      // no account enumeration: for an address that already has an account, better-auth answers
      // the sign-up with a made-up user, but without the admin plugin's default role (role: null
      // instead of 'user'), which told the two cases apart (tests/server/abuse.test.ts)
      after: createAuthMiddleware(async (ctx) => {
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
          const link = `${config.baseUrl}/invitations/${data.id}`;
          await send(
            data.email,
            `Join the team ${data.organization.name} on Parallax`,
            `${data.inviter.user.name.replace(/[\r\n]+/g, ' ')} invites you to the team "${data.organization.name}" on Parallax as ${data.role === 'member' ? 'a member' : 'a team lead'}. Sign in (or sign up with this address) and accept:`,
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
