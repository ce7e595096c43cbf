/**
 * Issue 13, "for scripts" and "follow": the sample entry file passes the dry run unchanged; the
 * canonical spec download hashes to the checksum; an entry's JSON download; the Idempotency-Key
 * header; deleting drafts; drafts saved with problems; following a challenge (mail through the
 * fake SMTP server) and the Atom feed.
 */
import { createHash } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { and, count, desc, eq } from 'drizzle-orm';
import { createRequire } from 'node:module';
import { agent, lastMailTo, ORIGIN } from './helpers';
import { CHAIN_SPEC, fullSweep, makeEntryWorld, settle, type EntryWorld } from './entries-fixtures';
import { startWorker } from '../../server/jobs/worker';
import { auditLog, entries, estimates, mailMessages } from '../../server/db/schema';
import { reordered } from '../../server/jobs/standings-job';
import type { StandingsPayload } from '../../server/services/recompute-standings';

// jsdom (a dev dependency) ships no TypeScript types: the one constructor used here, typed by hand
const { JSDOM } = createRequire(import.meta.url)('jsdom') as { JSDOM: new (text: string, opts: { contentType: string }) => { window: Window } };

let w: EntryWorld;
beforeAll(async () => { w = await makeEntryWorld(); }, 120_000);
afterAll(async () => { await w.worker.stop(); await w.t.close(); });

const asKey = (m: 'post' | 'put' | 'delete', p: string) => request(w.t.app)[m](p).set('x-api-key', w.keyA);
const create = (body: unknown, key?: string, q = '') => {
  const r = asKey('post', `/api/challenges/chain-12/entries${q}`).set('Content-Type', 'application/json');
  if (key !== undefined) r.set('Idempotency-Key', key);
  return r.send(typeof body === 'string' ? body : JSON.stringify(body));
};

describe('sample entry file and checksum', () => {
  it('the downloaded sample file goes through the dry run unchanged without a schema error', async () => {
    const d = await request(w.t.app).get('/api/challenges/chain-12/sample-entry.json');
    expect(d.status).toBe(200);
    expect(d.headers['content-disposition']).toContain('chain-12-v1-sample-entry.json');
    const doc = JSON.parse(d.text);
    expect(doc.challenge).toEqual({ id: 'chain-12', version: 1, checksum: `sha256:${w.checksum}` });
    expect(doc.estimates.map((e: { target: string }) => e.target).sort()).toEqual(w.targets.map((t) => t.key).sort());
    const r = await request(w.t.app).post('/api/entries/validate').set('Content-Type', 'application/json').send(d.text);
    expect(r.status, r.text).toBe(200);
    expect(r.body.valid).toBe(true);
    expect(r.body.coverage.fraction).toBe(1);
    const hw = await request(w.t.app).get('/api/challenges/chain-12/sample-entry.json?track=hardware');
    expect(JSON.parse(hw.text)).toMatchObject({ track: 'hardware', method: { family: 'error-mitigated-hardware' } });
    const bad = await request(w.t.app).get('/api/challenges/chain-12/sample-entry.json?track=quantum');
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toContain('track must be "hardware" or "classical"');
  });

  it('sha256 of the canonical spec download (node:crypto on its bytes) equals the published checksum; of the pretty spec it does not', async () => {
    const c = await request(w.t.app).get('/api/challenges/chain-12/spec.canonical.json').buffer(true).parse((res, cb) => { const bufs: Buffer[] = []; res.on('data', (b: Buffer) => bufs.push(b)); res.on('end', () => cb(null, Buffer.concat(bufs))); });
    expect(c.status).toBe(200);
    expect(createHash('sha256').update(c.body as Buffer).digest('hex')).toBe(w.checksum);
    const pretty = await request(w.t.app).get('/api/challenges/chain-12/spec.json');
    expect(createHash('sha256').update(pretty.text).digest('hex')).not.toBe(w.checksum);
  });

  it("an entry's JSON download is its document, for whoever may read the entry", async () => {
    const doc = fullSweep(w);
    const id = (await create(doc)).body.id;
    const r = await w.memberA.get(`/api/entries/${id}/entry.json`);
    expect(r.status).toBe(200);
    expect(r.headers['content-disposition']).toContain(`entry-${id}.json`);
    expect(JSON.parse(r.text)).toEqual(doc);
    expect((await request(w.t.app).get(`/api/entries/${id}/entry.json`)).status).toBe(404);
    expect((await w.memberB.get(`/api/entries/${id}/entry.json`)).status).toBe(404);
  });
});

describe('Idempotency-Key on entry creation', () => {
  it('a retry with the same key and body returns the same entry (200), stores nothing new; another body is refused (409 naming the header)', async () => {
    const doc = fullSweep(w, { label: 'idempotent run' });
    const first = await create(doc, 'run-2026-12-05-a');
    expect(first.status, first.text).toBe(201);
    const n = (await w.t.database.db.select({ n: count() }).from(entries)).at(0)!.n;
    const again = await create(doc, 'run-2026-12-05-a');
    expect(again.status, again.text).toBe(200);
    expect(again.body).toMatchObject({ id: first.body.id, state: 'draft', replayed: true });
    expect((await w.t.database.db.select({ n: count() }).from(entries)).at(0)!.n).toBe(n);
    const other = await create(fullSweep(w, { label: 'another body' }), 'run-2026-12-05-a');
    expect(other.status).toBe(409);
    expect(other.body.error.message).toContain('Idempotency-Key');
    // the key is the team's: another team may use the same key for its own entry
    const b = await w.memberB.raw.post('/api/challenges/chain-12/entries').set('Origin', ORIGIN).set('Idempotency-Key', 'run-2026-12-05-a').set('Content-Type', 'application/json').send(JSON.stringify(doc));
    expect(b.status, b.text).toBe(201);
    expect(b.body.id).not.toBe(first.body.id);
    const bad = await create(doc, 'has space');
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toContain('Idempotency-Key');
  });

  it('two concurrent retries with one key create one entry', async () => {
    const doc = fullSweep(w, { label: 'concurrent' });
    const [a, b] = await Promise.all([create(doc, 'concurrent-key'), create(doc, 'concurrent-key')]);
    expect([a.status, b.status].sort()).toEqual([200, 201]);
    expect(a.body.id).toBe(b.body.id);
  });
});

describe('deleting drafts', () => {
  it('a team member deletes a draft with its estimates; an audit line records it; other teams and submitted entries are refused', async () => {
    const id = (await create(fullSweep(w, { label: 'to delete' }))).body.id;
    expect((await w.memberB.delete(`/api/entries/${id}`)).status).toBe(403);
    expect((await request(w.t.app).delete(`/api/entries/${id}`).set('Origin', ORIGIN)).status).toBe(401);
    const r = await w.memberA.delete(`/api/entries/${id}`);
    expect(r.status, r.text).toBe(200);
    expect(r.body).toEqual({ id, deleted: true });
    const db = w.t.database.db;
    expect((await db.select({ n: count() }).from(entries).where(eq(entries.id, id)))[0].n).toBe(0);
    expect((await db.select({ n: count() }).from(estimates).where(eq(estimates.entryId, id)))[0].n).toBe(0);
    const [line] = await db.select().from(auditLog).where(and(eq(auditLog.subjectId, id), eq(auditLog.action, 'entry.delete')));
    expect(line.details).toMatchObject({ label: 'to delete', teamId: w.teamA });
    const sub = (await create(fullSweep(w, { label: 'submitted' }))).body.id;
    expect((await asKey('post', `/api/entries/${sub}/submit`)).status).toBe(200);
    const refused = await asKey('delete', `/api/entries/${sub}`);
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toContain('only a draft can be deleted');
  });
});

describe('drafts saved with problems', () => {
  it('?incomplete=1 stores a document with errors as a draft listing them; it cannot be submitted until a valid document replaces it', async () => {
    const doc = fullSweep(w, { label: 'half done' });
    doc.estimates[2] = { ...doc.estimates[2], uncertaintyKind: 'syst' as never };
    doc.estimates[5] = { ...doc.estimates[5], value: 'n/a' as never };
    // without the flag: refused as before, nothing stored
    expect((await create(doc)).status).toBe(400);
    const r = await create(doc, undefined, '?incomplete=1');
    expect(r.status, r.text).toBe(201);
    expect(r.body.incomplete).toBe(true);
    expect(r.body.problems.map((p: { path: string }) => p.path)).toEqual(expect.arrayContaining(['/estimates/2/uncertaintyKind', '/estimates/5/value']));
    const g = await w.memberA.get(`/api/entries/${r.body.id}`);
    expect(g.body.document).toEqual(doc);
    expect(g.body.problems.length).toBe(r.body.problems.length);
    const s = await asKey('post', `/api/entries/${r.body.id}/submit`);
    expect(s.status).toBe(409);
    expect(s.body.error.message).toContain('cannot be submitted until a valid document replaces it');
    // not even parseable JSON is never stored
    expect((await create('{"label": ', undefined, '?incomplete=1')).status).toBe(400);
    const fixed = await asKey('put', `/api/entries/${r.body.id}`).set('Content-Type', 'application/json').send(JSON.stringify(fullSweep(w, { label: 'half done' })));
    expect(fixed.status, fixed.text).toBe(200);
    expect((await w.memberA.get(`/api/entries/${r.body.id}`)).body.problems).toBeUndefined();
    expect((await asKey('post', `/api/entries/${r.body.id}/submit`)).status).toBe(200);
  });
});

describe('following and the Atom feed', () => {
  it('a follower of the challenge gets a mail through the fake SMTP server when an entry is published, and can unfollow by its link', async () => {
    const reader = await (await import('./helpers')).signUpVerified(w.t, 'reader@s.test', 'Rhea Reader');
    expect((await reader.post('/api/follows', { subjectType: 'challenge', subjectId: 'no-such' })).status).toBe(404);
    const f = await reader.post('/api/follows', { subjectType: 'challenge', subjectId: 'chain-12' });
    expect(f.status, f.text).toBe(201);
    expect((await reader.post('/api/follows', { subjectType: 'challenge', subjectId: 'chain-12' })).status).toBe(200);
    expect((await reader.get('/api/me/follows')).body.follows).toHaveLength(1);
    expect((await request(w.t.app).post('/api/follows').send({ subjectType: 'challenge', subjectId: 'chain-12' })).status).toBe(401);
    const id = (await create(fullSweep(w, { label: 'followed entry' }))).body.id;
    expect((await asKey('post', `/api/entries/${id}/submit`)).status).toBe(200);
    expect((await w.mod.post(`/api/entries/${id}/decision`, { decision: 'publish', reason: 'looks right' })).status).toBe(200);
    const mail = await lastMailTo(w.t, 'reader@s.test');
    expect(mail.subject).toBe('Parallax: new entry on chain-12: followed entry');
    expect(mail.text).toContain(`${ORIGIN}/entries/${id}`);
    const token = /\/unfollow\/(\S+)/.exec(mail.text)![1];
    const u = await request(w.t.app).post('/api/follows/unfollow').send({ token });
    expect(u.status, u.text).toBe(200);
    expect((await reader.get('/api/me/follows')).body.follows).toHaveLength(0);
    expect((await request(w.t.app).post('/api/follows/unfollow').send({ token })).status).toBe(404);
    await settle(w.t, w.worker);
  });

  it('a follower of a team hears of its publications; following both mails once', async () => {
    const fan = await (await import('./helpers')).signUpVerified(w.t, 'fan@s.test');
    expect((await fan.post('/api/follows', { subjectType: 'team', subjectId: w.teamA })).status).toBe(201);
    expect((await fan.post('/api/follows', { subjectType: 'challenge', subjectId: 'chain-12' })).status).toBe(201);
    const id = (await create(fullSweep(w, { label: 'team entry' }))).body.id;
    await asKey('post', `/api/entries/${id}/submit`);
    await w.mod.post(`/api/entries/${id}/decision`, { decision: 'publish', reason: 'ok' });
    const n = await w.t.database.db.select().from(mailMessages).where(and(eq(mailMessages.to, 'fan@s.test'), eq(mailMessages.subject, 'Parallax: new entry on chain-12: team entry'))).orderBy(desc(mailMessages.receivedAt));
    expect(n).toHaveLength(1);
    await settle(w.t, w.worker);
  });

  it('a follower hears when the exact references of a new challenge are computed', async () => {
    const reader = await (await import('./helpers')).signUpVerified(w.t, 'refs@s.test');
    // the worker waits while the challenge is published and followed, so the mail cannot come first
    await w.worker.stop();
    const spec = { ...CHAIN_SPEC, id: 'chain-12-followed', title: 'Followed chain' };
    expect((await w.mod.post('/api/challenges', spec)).status).toBe(201);
    expect((await w.mod.post('/api/challenges/chain-12-followed/publish', {})).status).toBe(200);
    expect((await reader.post('/api/follows', { subjectType: 'challenge', subjectId: 'chain-12-followed' })).status).toBe(201);
    w.worker = await startWorker(w.t.database.db, w.t.ctx.log, { pollMs: 50 });
    w.t.ctx.jobs.kick = () => w.worker.kick();
    await settle(w.t, w.worker);
    const mail = await lastMailTo(w.t, 'refs@s.test');
    expect(mail.subject).toBe('Parallax: exact references computed for chain-12-followed');
    expect(mail.text).toMatch(/^\d+ exact reference value\(s\) of chain-12-followed version 1 were computed/);
    expect(mail.text).toContain('/unfollow/');
  });

  it('standings count as rescored when the order of the entries ranked before and after changes, not when one is added', () => {
    const p = (ids: [string, number][]) => ({ public: { entries: ids.map(([id, rank]) => ({ id, rank })) } }) as unknown as StandingsPayload;
    expect(reordered(null, p([['a', 1]]))).toBe(false);
    expect(reordered(p([['a', 1], ['b', 2]]), p([['c', 1], ['a', 2], ['b', 3]]))).toBe(false);
    expect(reordered(p([['a', 1], ['b', 2]]), p([['b', 1], ['a', 2]]))).toBe(true);
  });

  it('GET /challenges/:slug/feed.atom is well-formed Atom 1.0 with the published entries', async () => {
    const r = await request(w.t.app).get('/api/challenges/chain-12/feed.atom');
    expect(r.status).toBe(200);
    expect(r.headers['content-type']).toContain('application/atom+xml');
    const dom = new JSDOM(r.text, { contentType: 'application/xml' });
    const doc = dom.window.document;
    expect(doc.getElementsByTagName('parsererror')).toHaveLength(0);
    const feed = doc.documentElement;
    expect(feed.localName).toBe('feed');
    expect(feed.namespaceURI).toBe('http://www.w3.org/2005/Atom');
    const child = (el: Element, name: string) => [...el.children].filter((c) => c.localName === name);
    expect(child(feed, 'id')[0].textContent).toBe(`${ORIGIN}/challenges/chain-12`);
    expect(child(feed, 'title')[0].textContent).toContain('Parallax');
    expect(Number.isFinite(Date.parse(child(feed, 'updated')[0].textContent!))).toBe(true);
    const items = child(feed, 'entry');
    const titles = items.map((e) => child(e, 'title')[0].textContent);
    expect(titles).toEqual(expect.arrayContaining([expect.stringContaining('Entry published: followed entry'), expect.stringContaining('Challenge version published')]));
    for (const e of items) {
      expect(child(e, 'id')[0].textContent).toMatch(/^http/);
      expect(Number.isFinite(Date.parse(child(e, 'updated')[0].textContent!))).toBe(true);
      expect(child(e, 'link')[0].getAttribute('href')).toMatch(/^http/);
    }
    expect((await request(w.t.app).get('/api/challenges/no-such/feed.atom')).status).toBe(404);
    void agent;
  });
});
