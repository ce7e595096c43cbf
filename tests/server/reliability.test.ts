/** RELIABILITY.md checks that the foundation owns: single writer, body limits, error bodies, throttling, origins, headers. */
import { spawn } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import express from 'express';
import request from 'supertest';
import { agent, makeTestApp, ORIGIN, signUpVerified, TEST_PASSWORD, type TestApp } from './helpers';
import { lockDataDir, DataDirLockedError } from '../../server/db/lock';
import { errorHandler } from '../../server/app';
import { createLogger } from '../../server/log';

let t: TestApp;
beforeAll(async () => { t = await makeTestApp({ signInThrottle: { windowMs: 10_000, maxFailures: 3 } }); });
afterAll(async () => { await t.close(); });

describe('single writer on a data directory', () => {
  it('refuses a second lock in-process and frees it on release', async () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), 'px-lock-'));
    const first = await lockDataDir(dir);
    await expect(lockDataDir(dir)).rejects.toBeInstanceOf(DataDirLockedError);
    await first.release();
    const again = await lockDataDir(dir);
    await again.release();
    rmSync(dir, { recursive: true, force: true });
  });

  it('a second server process on the same directory exits non-zero with a clear message', async () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), 'px-lock-proc-'));
    const holder = await lockDataDir(dir); // stands in for a running server (a separate process holding it is the same socket)
    const t0 = Date.now();
    const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
      env: { ...process.env, DATA_DIR: dir, PORT: '0', FAKE_SMTP_PORT: '0', SEED_DEMO: '0' }, stdio: ['ignore', 'pipe', 'pipe'],
    });
    let err = '';
    child.stderr.on('data', (d) => { err += d; });
    const code = await new Promise<number | null>((r) => child.once('exit', r));
    const ms = Date.now() - t0;
    await holder.release();
    rmSync(dir, { recursive: true, force: true });
    expect(code).toBe(3);
    expect(err).toContain('Another Parallax process is already using the data directory');
    expect(ms).toBeLessThan(15_000); // includes tsx start-up; the lock itself answers in milliseconds
  });
});

describe('bodies and errors', () => {
  it('an oversized body on an auth route gets 413', async () => {
    const r = await request(t.app).post('/api/auth/sign-in/email').set('Origin', ORIGIN)
      .set('Content-Type', 'application/json').send(JSON.stringify({ email: 'a@b.test', password: 'x'.repeat(200_000) }));
    expect(r.status).toBe(413);
    expect(r.body.error.code).toBe('payload_too_large');
  });

  it('bad JSON gets 400 that says what is wrong', async () => {
    // a public route that takes a JSON body (bodies are read after the access check: a signed-in
    // route answers 401 to a visitor before looking at the body)
    const r = await request(t.app).post('/api/follows/unfollow').set('Content-Type', 'application/json').set('Origin', t.ctx.config.baseUrl).send('{"token": ');
    expect(r.status).toBe(400);
    expect(r.body.error.message).toMatch(/not valid JSON/);
  });

  it('an unknown API route is a JSON 404, not the client page', async () => {
    const r = await request(t.app).get('/api/nope');
    expect(r.status).toBe(404);
    expect(r.body.error.message).toContain('/api/openapi.json');
  });

  it('a crash shows no internals, only a request id; the log has the detail', async () => {
    const lines: string[] = [];
    const app = express();
    app.use((req, _res, next) => { req.requestId = 'req-1'; next(); });
    app.get('/boom', () => { throw new Error('relation "secret_table" does not exist at /srv/app/x.ts:12'); });
    app.use(errorHandler(createLogger('info', (l) => lines.push(l))));
    const r = await request(app).get('/boom');
    expect(r.status).toBe(500);
    expect(r.text).not.toMatch(/secret_table|\.ts:|at \//);
    expect(r.body.error).toMatchObject({ code: 'internal', requestId: 'req-1' });
    expect(lines.join('\n')).toContain('secret_table');
  });

  it('field problems name the field', async () => {
    const lead = await signUpVerified(t, 'fields@r.test');
    const teamId = (await lead.post('/api/auth/organization/create', { name: 'Fields', slug: 'fields' })).body.id;
    const r = await lead.post(`/api/teams/${teamId}/api-keys`, { name: '', role: 'admin' });
    expect(r.status).toBe(400);
    const paths = r.body.error.problems.map((p: { path: string }) => p.path);
    expect(paths).toContain('/name');
    expect(r.body.error.problems).toContainEqual({ path: '/role', message: 'unknown field "role": remove it' }); // mass-assignment probe
  });
});

describe('sign-in throttling', () => {
  it('the 4th failed attempt on one account from one address gets 429 with Retry-After, whatever X-Forwarded-For says', async () => {
    await signUpVerified(t, 'target@r.test');
    const codes: number[] = [];
    let retry: string | undefined;
    for (let i = 0; i < 5; i++) {
      // a forged X-Forwarded-For changes nothing: no proxy hop is trusted, so the address is the socket's
      const r = await request(t.app).post('/api/auth/sign-in/email').set('Origin', ORIGIN)
        .set('X-Forwarded-For', `203.0.113.${i + 1}`).send({ email: 'target@r.test', password: 'wrong-password-1' });
      codes.push(r.status);
      retry ??= r.headers['retry-after'];
    }
    expect(codes.slice(0, 3)).toEqual([401, 401, 401]);
    expect(codes.slice(3)).toEqual([429, 429]);
    expect(Number(retry)).toBeGreaterThan(0);
    // the delay passes: allowed again (the throttle reads the injected clock)
    t.clock.advance(11_000);
    const ok = await request(t.app).post('/api/auth/sign-in/email').set('Origin', ORIGIN).send({ email: 'target@r.test', password: TEST_PASSWORD });
    expect(ok.status).toBe(200);
  });
});

describe('origin checks and headers', () => {
  it('a cookie-bearing write from a foreign origin is refused', async () => {
    const a = await signUpVerified(t, 'csrf@r.test');
    const teamId = (await a.post('/api/auth/organization/create', { name: 'Csrf', slug: 'csrf' })).body.id;
    const r = await a.raw.post(`/api/teams/${teamId}/api-keys`).set('Origin', 'http://evil.test').send({ name: 'x' });
    expect(r.status).toBe(403);
    expect(r.body.error.message).toMatch(/Origin check failed/);
    const ok = await a.post(`/api/teams/${teamId}/api-keys`, { name: 'x' });
    expect(ok.status).toBe(201);
  });

  it('sends helmet headers with a strict CSP', async () => {
    const r = await agent(t).get('/api/health');
    expect(r.headers['x-content-type-options']).toBe('nosniff');
    const csp = String(r.headers['content-security-policy']);
    for (const d of ["object-src 'none'", "base-uri 'none'", "frame-ancestors 'none'"]) expect(csp).toContain(d);
    expect(r.headers['x-powered-by']).toBeUndefined();
  });

  it('health reports the database kind and the migration level', async () => {
    const r = await agent(t).get('/api/health');
    expect(r.body).toMatchObject({ status: 'ok', database: t.database.kind }); // pglite, or postgres under scripts/pg-test.sh
    expect(r.body.migrations.applied).toBe(r.body.migrations.known); // every migration in drizzle/ applied
    expect(r.body.migrations.known).toBeGreaterThanOrEqual(2);
  });
});
