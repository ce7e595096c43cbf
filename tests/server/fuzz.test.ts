/**
 * API fuzzing (RELIABILITY.md item 18): 10,000 seeded random requests (FUZZ_REQUESTS overrides)
 * over the declared routes, from a visitor, a team member's session and a team API key: random
 * methods, path parameters, query strings, headers and bodies (random JSON, broken JSON, huge
 * numbers, odd Unicode, NUL characters, injection strings, gzip bodies that are broken or inflate
 * far beyond the limits). No response may be a 5xx, and no body may carry a stack trace, SQL text,
 * 'node_modules', a token or someone else's e-mail address. A second pass sends hostile documents
 * (huge estimate arrays, gzip bombs, NUL characters, 200,000 unknown keys) at random routes while
 * GET /api/health is timed alongside (issue 12).
 */
import { gzipSync } from 'node:zlib';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { fullSweep, makeEntryWorld, WORLD_EMAILS, type EntryWorld } from './entries-fixtures';
import request from 'supertest';
import { ORIGIN, TEST_PASSWORD } from './helpers';

const N = Number(process.env.FUZZ_REQUESTS ?? 10_000);
const SEED = Number(process.env.FUZZ_SEED ?? 20260501);

/** mulberry32: a small seeded PRNG, so a failure can be replayed with FUZZ_SEED */
function prng(seed: number) {
  let a = seed >>> 0;
  const next = () => { a = (a + 0x6d2b79f5) >>> 0; let t = a; t = Math.imul(t ^ (t >>> 15), t | 1); t ^= t + Math.imul(t ^ (t >>> 7), t | 61); return ((t ^ (t >>> 14)) >>> 0) / 4294967296; };
  const int = (n: number) => Math.floor(next() * n);
  const pick = <T>(xs: readonly T[]): T => xs[int(xs.length)];
  return { next, int, pick };
}

let w: EntryWorld;
let server: http.Server;
let port: number;
let cookie: string;
let entryId: string;
beforeAll(async () => {
  w = await makeEntryWorld();
  await w.worker.stop();
  const r = await w.memberA.post('/api/challenges/chain-12/entries', fullSweep(w));
  entryId = r.body.id;
  const signIn = await request(w.t.app).post('/api/auth/sign-in/email').set('Origin', ORIGIN).send({ email: WORLD_EMAILS.memberA, password: TEST_PASSWORD });
  cookie = ([] as string[]).concat(signIn.headers['set-cookie'] ?? []).map((c) => c.split(';')[0]).join('; ');
  if (!cookie.includes('session_token=')) throw new Error(`sign-in ${signIn.status}`);
  server = http.createServer(w.t.app).listen(0, '127.0.0.1');
  await new Promise((res) => server.once('listening', res));
  port = (server.address() as AddressInfo).port;
}, 180_000);
afterAll(async () => { server?.closeAllConnections(); server?.close(); await w?.t.close(); });

const agentKeepAlive = new http.Agent({ keepAlive: true, maxSockets: 4 });
function send(method: string, path: string, headers: Record<string, string>, body?: Buffer): Promise<{ status: number; text: string }> {
  return new Promise((resolve, reject) => {
    const req = http.request({ host: '127.0.0.1', port, method, path, agent: agentKeepAlive, headers: { ...headers, ...(body ? { 'content-length': String(body.length) } : {}) } }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (d) => chunks.push(d));
      res.on('end', () => resolve({ status: res.statusCode!, text: Buffer.concat(chunks).toString('utf8') }));
    });
    req.on('error', reject);
    req.end(body);
  });
}

/** 40 MiB of zeros in 40 KiB of gzip */
const BOMB = gzipSync(Buffer.alloc(40 * 1024 * 1024));

const FORBIDDEN_TEXT: [string, RegExp][] = [
  ['stack trace', /\n\s+at |at [\w.<>]+ \(\/|\.ts:\d+|\.js:\d+/],
  ['SQL text', /\b(select .+ from|insert into|update .+ set|delete from|syntax error at|relation "|violates (unique|foreign key|not-null)|duplicate key value)/i],
  ['node_modules', /node_modules/],
];

describe('API fuzzing', () => {
  it(`${N} random requests: no 5xx, no internals, tokens or e-mail addresses in any body`, async () => {
    const rnd = prng(SEED);
    const own = new Set<string>([WORLD_EMAILS.memberA, WORLD_EMAILS.leadA]);
    const secrets = [w.keyA, decodeURIComponent(cookie.split('session_token=')[1]?.split(/[;.]/)[0] ?? 'none')];
    const routes = w.t.routes.defs;
    const authPaths = ['/sign-in/email', '/sign-up/email', '/request-password-reset', '/reset-password', '/get-session', '/organization/create'];
    const paramValues = [w.teamA, w.teamB, entryId, 'chain-12', 'x', '', '..%2F..%2Fetc%2Fpasswd', "'%20or%201=1--", '%00', '%E2%80%AE', 'a'.repeat(300), '00000000-0000-0000-0000-000000000000', '-1', '1e309', 't1-h0.000000:z0', '%F0%9F%92%A9'];
    const queryKeys = ['team', 'version', 'asOf', 'to', 'limit', 'metric', 'track', 'q', 'family', 'format', 'view', '__proto__', 'constructor'];
    const queryValues = ['1', '0', '-1', 'abc', '2026-01-01', 'not-a-date', '99999999999999999999', '%27', '', 'true', '[]', '%7B%7D', w.teamA];
    const keys = ['name', 'role', 'banned', 'reason', 'email', 'password', 'estimates', 'challenge', 'track', 'label', 'method', 'decision', 'note', 'value', 'id', 'version', 'state', 'teamId', 'expiresInDays', '__proto__', 'constructor', 'settings', 'until', 'commitment', 'action', 'featured'];
    const scalar = (): unknown => rnd.pick<() => unknown>([
      () => rnd.int(1000) - 500, () => rnd.next(), () => 2 ** 53 + rnd.int(10), () => -0, () => 1e308, () => '', () => 'x'.repeat(rnd.int(5000)),
      () => '\u0000\u202e\ud83d', () => "'; drop table entries; --", () => '<script>alert(1)</script>', () => true, () => false, () => null,
      () => 'published', () => 'admin', () => 'chain-12', () => entryId, () => w.teamA, () => '2026-01-01T00:00:00Z',
    ])();
    const value = (depth: number): unknown => {
      const r = rnd.next();
      if (depth > 3 || r < 0.5) return scalar();
      if (r < 0.75) return Array.from({ length: rnd.int(4) }, () => value(depth + 1));
      return Object.fromEntries(Array.from({ length: rnd.int(5) }, () => [rnd.pick(keys), value(depth + 1)]));
    };
    const body = (): Buffer | undefined => {
      const r = rnd.next();
      if (r < 0.15) return undefined;
      if (r < 0.25) return Buffer.from(rnd.pick(['{', '{"a":', 'null', '[]', '"x"', '{"a":1,"a":2}', '{"n": 123456789012345678901234567890}', '\u0000', 'NaN', '{"x": Infinity}']));
      if (r < 0.35) return Buffer.from(JSON.stringify(fullSweep(w, rnd.next() < 0.5 ? { label: scalar() } : { track: scalar() })));
      if (r < 0.38) return Buffer.from(JSON.stringify(fullSweep(w, { label: 'nul\u0000', notes: '\u0000', method: { family: 'other\u0000' } })));
      return Buffer.from(JSON.stringify(value(0)));
    };
    const methods = ['get', 'post', 'put', 'patch', 'delete'] as const;
    const statuses = new Map<number, number>();
    const problems: string[] = [];
    for (let i = 0; i < N; i++) {
      let method: string;
      let path: string;
      if (rnd.next() < 0.08) {
        method = 'POST';
        path = `/api/auth${rnd.pick(authPaths)}`;
      } else {
        const d = rnd.pick(routes);
        method = (rnd.next() < 0.8 ? d.method : rnd.pick(methods)).toUpperCase();
        path = '/api' + d.path.replace(/:(\w+)/g, () => encodeURIComponent(decodeURIComponent(rnd.pick(paramValues))).replace(/%25/g, '%'));
      }
      const q = Array.from({ length: rnd.int(3) }, () => `${rnd.pick(queryKeys)}=${rnd.pick(queryValues)}`).join('&');
      if (q) path += `?${q}`;
      const caller = rnd.int(3);
      const headers: Record<string, string> = { origin: ORIGIN };
      if (caller === 1) headers.cookie = cookie;
      if (caller === 2) headers['x-api-key'] = rnd.next() < 0.9 ? w.keyA : 'plx_' + 'x'.repeat(rnd.int(300));
      const b = method === 'GET' || method === 'DELETE' ? undefined : body();
      if (b) headers['content-type'] = rnd.pick(['application/json', 'application/json', 'text/plain', 'application/x-www-form-urlencoded', 'multipart/form-data; boundary=zz']);
      // hostile gzip: a compressed body, a body that is not gzip at all, a bomb far over every limit
      let sent = b;
      if (b && rnd.next() < 0.06) {
        headers['content-encoding'] = 'gzip';
        const g = rnd.int(3);
        sent = g === 0 ? gzipSync(b) : g === 1 ? b : BOMB;
      }
      let r: { status: number; text: string };
      try {
        r = await send(method, path, headers, sent);
      } catch (e) {
        problems.push(`#${i} ${method} ${path}: connection error ${String(e)}`);
        continue;
      }
      statuses.set(r.status, (statuses.get(r.status) ?? 0) + 1);
      if (r.status >= 500) problems.push(`#${i} ${method} ${path} -> ${r.status} ${r.text.slice(0, 200)}`);
      for (const [what, re] of FORBIDDEN_TEXT) if (re.test(r.text)) problems.push(`#${i} ${method} ${path}: ${what} in ${r.text.slice(0, 200)}`);
      for (const s of secrets) if (s && s.length > 8 && r.text.includes(s)) problems.push(`#${i} ${method} ${path}: a token in the body`);
      for (const m of r.text.match(/[\w.+-]+@[\w-]+\.[\w.-]+/g) ?? []) {
        // the member may see their own team's addresses (GET /api/me, the team page); nobody else any
        if (m.endsWith('parallax.localhost') || (caller === 1 && own.has(m))) continue;
        problems.push(`#${i} ${method} ${path} (caller ${caller}): e-mail address ${m} in the body`);
      }
      if (problems.length > 20) break;
    }
    const summary = [...statuses.entries()].sort((a, b) => a[0] - b[0]).map(([s, n]) => `${s}: ${n}`).join(', ');
    console.log(`[fuzz] ${N} requests (seed ${SEED}) over ${routes.length} routes + ${authPaths.length} auth endpoints: ${summary}; problems: ${problems.length}`);
    if (problems.length) console.log(w.t.logs.filter((l) => l.includes('"unhandled"')).slice(0, 3).join('\n'));
    expect(problems).toEqual([]);
  }, 600_000);
});

describe('hostile documents with the health route timed alongside', () => {
  it('huge estimate arrays, gzip bombs within and beyond the limits, NUL characters, 200,000 unknown keys: no 5xx, /api/health within 1 s', async () => {
    const rnd = prng(SEED + 1);
    const { estimates: _all, ...rest } = fullSweep(w);
    void _all;
    const envelope = JSON.stringify(rest).slice(1, -1);
    const hostile: (() => { body: Buffer; gzip: boolean })[] = [
      () => ({ body: gzipSync(`{${envelope},"estimates":[${Array(60_000 + rnd.int(40_000)).fill('{}').join(',')}]}`), gzip: true }),
      () => ({ body: gzipSync(`{${envelope},"estimates":[${Array(50_000).fill('{"target":7,"value":"NaN","uncertainty":-1,"uncertaintyKind":"?","x":1}').join(',')}]}`), gzip: true }),
      () => ({ body: gzipSync(`{${envelope},"notes":"${' '.repeat(9 * 1024 * 1024)}","estimates":[]}`), gzip: true }),
      () => ({ body: BOMB, gzip: true }),
      () => ({ body: Buffer.from(`{${envelope},"label":"\\u0000","estimates":[{"target":"\\u0000","value":0,"uncertainty":0,"uncertaintyKind":"none"}]}`), gzip: false }),
      () => ({ body: gzipSync(`{${Array.from({ length: 200_000 }, (_, i) => `"k${i}":0`).join(',')}}`), gzip: true }),
    ];
    // as the member signed in (the fuzz pass above used up the API key's quota)
    const targets = ['/api/entries/validate', '/api/challenges/chain-12/entries', `/api/entries/${entryId}`, `/api/entries/${entryId}/withdraw`];
    let worst = 0;
    let stop = false;
    const poll = (async () => {
      while (!stop) {
        const t0 = performance.now();
        const h = await send('GET', '/api/health', {});
        if (h.status === 200) worst = Math.max(worst, performance.now() - t0);
        await new Promise((res) => setTimeout(res, 25));
      }
    })();
    const problems: string[] = [];
    const statuses = new Map<number, number>();
    try {
      for (let i = 0; i < 24; i++) {
        const { body, gzip } = rnd.pick(hostile)();
        const path = rnd.pick(targets);
        const headers: Record<string, string> = { origin: ORIGIN, 'content-type': 'application/json', ...(gzip ? { 'content-encoding': 'gzip' } : {}) };
        headers.cookie = cookie;
        const r = await send(path.endsWith('entries/' + entryId) ? 'PUT' : 'POST', path, headers, body);
        statuses.set(r.status, (statuses.get(r.status) ?? 0) + 1);
        if (r.status >= 500) problems.push(`${path} -> ${r.status} ${r.text.slice(0, 200)}`);
        if (r.text.length > 50_000) problems.push(`${path}: a ${r.text.length}-byte answer`);
      }
    } finally {
      stop = true;
      await poll;
    }
    console.log(`[fuzz] 24 hostile documents: ${[...statuses.entries()].map(([k, n]) => `${k}: ${n}`).join(', ')}; /api/health at worst ${Math.round(worst)} ms`);
    expect(problems).toEqual([]);
    expect(worst).toBeLessThan(1000);
  }, 300_000);
});
