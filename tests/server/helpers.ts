/**
 * A fresh app on a fresh database for each test file: PGlite from the migrated template (or a
 * copy of the migrated template database on the PostgreSQL server named by TEST_DATABASE_URL), a real fake-SMTP server on a
 * free port, a real mailer, an injectable clock. Password hashing uses a lower scrypt cost here;
 * tests/server/password.test.ts checks the production cost separately.
 */
import { readFileSync } from 'node:fs';
import { inject } from 'vitest';
import request from 'supertest';
import { desc, eq, sql } from 'drizzle-orm';
import { openDatabase, type Database } from '../../server/db/client';
import { applyMigrations } from '../../server/db/migrate';
import { createApp } from '../../server/app';
import { loadConfig, type Config } from '../../server/config';
import { startFakeSmtp } from '../../server/mail/fake-smtp';
import { createMailer } from '../../server/mail/mailer';
import { createLogger } from '../../server/log';
import { mailMessages, user } from '../../server/db/schema';
import { buildOnce } from '../support/run-once';

export const ORIGIN = 'http://parallax.test';
export const TEST_PASSWORD = 'correct-horse-battery-9';

export interface TestApp {
  app: import('express').Express;
  ctx: Awaited<ReturnType<typeof createApp>>['ctx'];
  routes: Awaited<ReturnType<typeof createApp>>['routes'];
  database: Database;
  config: Config;
  logs: string[];
  clock: { now: Date; advance(ms: number): void };
  /** PostgreSQL only (TEST_DATABASE_URL): the URL of this app's own database */
  databaseUrl?: string;
  close(): Promise<void>;
}

let dbCounter = 0;

/**
 * PostgreSQL (TEST_DATABASE_URL): a new database copied with CREATE DATABASE ... TEMPLATE from a
 * template database of this run (the migrated schema, or a prepared world); the migrated template is
 * made once per run by the first test process that needs it. One database per test app (a schema
 * each is not enough: the migrations keep their bookkeeping in the schema "drizzle").
 */
export async function openPgCopy(template?: string): Promise<Database> {
  const url = inject('databaseUrl');
  const from = template ?? (await buildOnce(inject('runCache'), 'pg-migrated', async () => {
    const name = `tpl_migrated_${inject('runId')}`;
    await createPgDatabase(url, name);
    const d = await openDatabase({ databaseUrl: withDatabase(url, name) });
    try { await applyMigrations(d); } finally { await d.close(); }
    return name;
  })).value;
  const name = `t_${process.pid}_${Date.now()}_${dbCounter++}`;
  await createPgDatabase(url, name, from);
  const database = await openDatabase({ databaseUrl: withDatabase(url, name) });
  return Object.assign(database, { url: withDatabase(url, name), pgName: name });
}

export const withDatabase = (url: string, name: string) => { const u = new URL(url); u.pathname = `/${name}`; return u.toString(); };

/** CREATE DATABASE (optionally TEMPLATE t); retried while the template is briefly in use (SQLSTATE 55006) */
export async function createPgDatabase(url: string, name: string, template?: string): Promise<void> {
  const admin = await openDatabase({ databaseUrl: url });
  try {
    for (let attempt = 1; ; attempt++) {
      try {
        await admin.db.execute(sql.raw(`create database ${name}${template ? ` template ${template}` : ''}`));
        return;
      } catch (e) {
        const code = (e as { code?: string; cause?: { code?: string } }).cause?.code ?? (e as { code?: string }).code;
        if (code !== '55006' || attempt >= 50) throw e;
        await new Promise((r) => setTimeout(r, 100));
      }
    }
  } finally {
    await admin.close();
  }
}

/** A test database: PGlite from a dump (the migrated template by default), or a PostgreSQL copy. */
export async function openTestDatabase(from?: { pgliteDump?: string; pgTemplate?: string }): Promise<Database> {
  if (inject('databaseUrl')) return openPgCopy(from?.pgTemplate);
  const blob = new Blob([readFileSync(from?.pgliteDump ?? inject('pgliteTemplate'))]);
  return openDatabase({ loadDataDir: blob });
}

export async function makeTestApp(overrides: Partial<Config> = {}, from?: { pgliteDump?: string; pgTemplate?: string }): Promise<TestApp> {
  return appOnDatabase(await openTestDatabase(from), { DATA_DIR: '/tmp/parallax-test-unused', AUTH_SECRET: 'test-secret-test-secret-test-secret-0123' }, { baseUrl: ORIGIN, ...overrides });
}

/**
 * A test app in this process on an open database: a fake SMTP server, fast password hashing, no
 * demo seed or worker, generous sign-in and mail limits, captured logs and a movable clock.
 */
export async function appOnDatabase(database: Database, env: Record<string, string>, overrides: Partial<Config> = {}): Promise<TestApp> {
  const smtp = await startFakeSmtp(database.db, 0);
  const config: Config = {
    ...loadConfig(env),
    passwordHash: { N: 2 ** 10, r: 8, p: 1 },
    seedDemo: false,
    runWorker: false,
    logLevel: 'info',
    // flows here sign in many users from one address; tests/server/reliability.test.ts checks the real limit
    signInThrottle: { windowMs: 10_000, maxFailures: 1000 },
    authRateLimits: { signUpPerMinute: 1000, mailPerMinute: 1000 },
    ...overrides,
  };
  const mailer = createMailer({ port: smtp.port, from: config.mailFrom });
  const logs: string[] = [];
  const log = createLogger('info', (l) => logs.push(l));
  const clock = { now: new Date(), advance(ms: number) { this.now = new Date(this.now.getTime() + ms); } };
  const { app, ctx, routes } = await createApp({ database, mailer, config, log, now: () => clock.now, serveClient: false });
  return {
    app, ctx, routes, database, config, logs, clock, databaseUrl: (database as Database & { url?: string }).url,
    async close() {
      await ctx.threads.close();
      mailer.close();
      await smtp.close();
      await database.close();
    },
  };
}

/** The newest message to an address, or throws (after the queued mail has gone out: server/mail/queue.ts). */
export async function lastMailTo(t: TestApp, to: string) {
  await t.ctx.mailQueue.idle();
  const rows = await t.database.db.select().from(mailMessages).where(eq(mailMessages.to, to)).orderBy(desc(mailMessages.receivedAt)).limit(1);
  if (!rows.length) throw new Error(`no mail to ${to}`);
  return rows[0];
}

export function linkIn(text: string): string {
  const m = text.match(/https?:\/\/\S+/);
  if (!m) throw new Error(`no link in: ${text}`);
  return m[0];
}

/** A supertest agent that keeps cookies and sends our Origin on every request. */
export function agent(t: TestApp) {
  const a = request.agent(t.app);
  return {
    raw: a,
    get: (p: string) => a.get(p).set('Origin', ORIGIN),
    post: (p: string, body?: object) => a.post(p).set('Origin', ORIGIN).send(body ?? {}),
    put: (p: string, body?: object) => a.put(p).set('Origin', ORIGIN).send(body ?? {}),
    patch: (p: string, body?: object) => a.patch(p).set('Origin', ORIGIN).send(body ?? {}),
    delete: (p: string) => a.delete(p).set('Origin', ORIGIN),
  };
}
export type Agent = ReturnType<typeof agent>;

/** Signs up through the API, follows the verification link from the fake mail server, signs in. */
export async function signUpVerified(t: TestApp, email: string, name = email.split('@')[0]): Promise<Agent> {
  const a = agent(t);
  const r = await a.post('/api/auth/sign-up/email', { email, password: TEST_PASSWORD, name, callbackURL: '/verified' });
  if (r.status !== 200) throw new Error(`sign-up ${r.status} ${r.text}`);
  const link = new URL(linkIn((await lastMailTo(t, email)).text));
  const v = await a.get(link.pathname + link.search);
  if (v.status >= 400) throw new Error(`verify ${v.status} ${v.text}`);
  const s = await a.post('/api/auth/sign-in/email', { email, password: TEST_PASSWORD });
  if (s.status !== 200) throw new Error(`sign-in ${s.status} ${s.text}`);
  return a;
}

/** Signs in an existing verified account; an agent with its session cookie. */
export async function signIn(t: TestApp, email: string): Promise<Agent> {
  const a = agent(t);
  const s = await a.post('/api/auth/sign-in/email', { email, password: TEST_PASSWORD });
  if (s.status !== 200) throw new Error(`sign-in ${email} ${s.status} ${s.text}`);
  return a;
}

export async function setRole(t: TestApp, email: string, role: 'user' | 'moderator' | 'admin') {
  await t.database.db.update(user).set({ role }).where(eq(user.email, email));
}
