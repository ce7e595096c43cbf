/**
 * Issue 14, "services return their effects and the route table applies them once": the effects a
 * service returns (server/effects.ts), the applier that runs each once (one worker kick however many
 * were asked, one cache drop per version), a publication that kicks the worker once and queues one
 * standings recomputation, job effects applied by the worker through the app's applier, and a guard
 * that no route, job or service kicks, drops a cache or sends mail itself.
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, count, eq, sql } from 'drizzle-orm';
import { applyEffects, renderLine, type Effect } from '../../server/effects';
import { StandingsCache } from '../../server/services/standings-cache';
import { decideEntry } from '../../server/services/decide-entry';
import { withdrawEntry } from '../../server/services/withdraw-entry';
import { enqueueJob } from '../../server/jobs/queue';
import { startWorker } from '../../server/jobs/worker';
import { entries, jobs, mailMessages, standings } from '../../server/db/schema';
import { ORIGIN } from './helpers';
import { fullSweep, makeEntryWorld, settle, type EntryWorld } from './entries-fixtures';

const silent = { info: () => {}, warn: () => {}, error: () => {} } as never;

describe('the applier', () => {
  it('kicks once however many kicks were asked, drops each cache once, and mails nobody without a mailer', async () => {
    const standingsCache = new StandingsCache();
    standingsCache.set('a', '{}', 'e1', 'v1');
    standingsCache.set('b', '{}', 'e2', 'v2');
    let kicks = 0;
    const warned: string[] = [];
    const log = { info: () => {}, error: () => {}, warn: (event: string) => warned.push(event) } as never;
    const fx: Effect[] = [
      { kind: 'kick-jobs' }, { kind: 'invalidate', cache: 'standings', versionId: 'v1' }, { kind: 'kick-jobs' },
      { kind: 'invalidate', cache: 'standings', versionId: 'v1' },
      { kind: 'notify-followers', slug: 'x', event: 'entry.published', subject: 's', lines: ['l'] },
    ];
    const out = await applyEffects({ db: {} as never, log, standingsCache, kick: () => { kicks++; } }, fx);
    expect(out).toEqual({ kicked: 1, invalidated: 1, mailed: 0, notified: 0 });
    expect(kicks).toBe(1);
    expect(standingsCache.get('a')).toBeUndefined();
    expect(standingsCache.get('b')).toBeDefined();
    expect(warned).toEqual(['effects.no-mailer']);
    // every version at once (a challenge's current version changed); the narrower drop is not counted again
    const all = await applyEffects({ db: {} as never, log: silent, standingsCache, kick: () => { kicks++; } }, [{ kind: 'invalidate', cache: 'standings', versionId: 'v2' }, { kind: 'invalidate', cache: 'standings', versionId: null }]);
    expect(all.invalidated).toBe(1);
    expect(standingsCache.get('b')).toBeUndefined();
    expect(kicks).toBe(1);
    // a worker process without an app has no cache: nothing is dropped, nothing counted
    expect((await applyEffects({ db: {} as never, log: silent, kick: () => {} }, [{ kind: 'invalidate', cache: 'standings', versionId: null }])).invalidated).toBe(0);
  });

  it('renders a link part of a mail line on the base URL of the app (with or without its trailing slash)', () => {
    expect(renderLine(['The entry: ', { path: '/entries/abc' }], 'http://p.test/')).toBe('The entry: http://p.test/entries/abc');
    expect(renderLine(['See ', { path: '/challenges/c' }, ' now'], 'http://p.test')).toBe('See http://p.test/challenges/c now');
    expect(renderLine('plain', 'http://p.test')).toBe('plain');
  });
});

describe('effects of services, applied once', () => {
  let w: EntryWorld;
  let kicks = 0;
  beforeAll(async () => {
    w = await makeEntryWorld();
    const kick = w.t.ctx.jobs.kick;
    w.t.ctx.jobs.kick = () => { kicks++; kick(); };
  }, 120_000);
  afterAll(async () => { await w.worker.stop(); await w.t.close(); });

  const submitted = async (label: string): Promise<string> => {
    const r = await w.memberA.raw.post('/api/challenges/chain-12/entries').set('Origin', ORIGIN).set('Content-Type', 'application/json').send(JSON.stringify(fullSweep(w, { label })));
    expect(r.status, r.text).toBe(201);
    expect((await w.memberA.post(`/api/entries/${r.body.id}/submit`)).status).toBe(200);
    return r.body.id;
  };
  const versionOf = async (id: string) => (await w.t.database.db.select({ v: entries.versionId }).from(entries).where(eq(entries.id, id)))[0].v;
  const standingsRows = async (versionId: string) => Number((await w.t.database.db.select({ n: count() }).from(standings).where(eq(standings.versionId, versionId)))[0].n);

  it('decideEntry returns its effects: one kick for the queued standings, the decision mail to the team, the followers on a publication', async () => {
    const id = await submitted('effects by the service');
    const { result, effects } = await decideEntry(w.t.database.db, { entryId: id, decision: 'publish', reason: 'clean sweep', actor: { kind: 'system', label: 'test moderator' }, now: w.t.ctx.now() });
    expect(result.jobIds).toHaveLength(1);
    expect(effects.map((e) => e.kind)).toEqual(['kick-jobs', 'mail-team', 'notify-followers']);
    const mail = effects[1] as Extract<Effect, { kind: 'mail-team' }>;
    expect(mail.teamIds).toEqual([w.teamA]);
    expect(mail.subject).toBe('Parallax: your entry "effects by the service" was published');
    expect(mail.lines.map((l) => renderLine(l, 'http://p.test'))).toEqual(expect.arrayContaining(['Moderator: a moderator', 'clean sweep', `The entry: http://p.test/entries/${id}`]));
    expect(effects[2]).toMatchObject({ kind: 'notify-followers', slug: 'chain-12', teamId: w.teamA, event: 'entry.published' });
    // nothing was applied by the service itself: no kick, no mail yet
    expect(kicks).toBe(0);
    await settle(w.t, w.worker);
    // a return queues nothing: no kick, only the team's mail
    const back = await submitted('returned by the service');
    const r = await decideEntry(w.t.database.db, { entryId: back, decision: 'return', reason: 'fix the units', actor: { kind: 'system', label: 'test moderator' }, now: w.t.ctx.now() });
    expect(r.effects.map((e) => e.kind)).toEqual(['mail-team']);
    // withdrawing a published entry changes the standings (a kick); withdrawing a draft does not
    expect((await withdrawEntry(w.t.database.db, { entryId: id, reason: 'superseded by a better run', actor: { kind: 'system', label: 'test' }, now: w.t.ctx.now() })).effects).toEqual([{ kind: 'kick-jobs' }]);
    expect((await withdrawEntry(w.t.database.db, { entryId: back, reason: 'abandoned', actor: { kind: 'system', label: 'test' }, now: w.t.ctx.now() })).effects).toEqual([]);
    await settle(w.t, w.worker);
  });

  it('a publication through the API kicks the worker once, queues one standings job and recomputes the standings once; the team is mailed once', async () => {
    const id = await submitted('published once');
    const versionId = await versionOf(id);
    await settle(w.t, w.worker);
    const rowsBefore = await standingsRows(versionId);
    const mailsBefore = Number((await w.t.database.db.select({ n: count() }).from(mailMessages).where(sql`${mailMessages.subject} like ${'%"published once" was published%'}`))[0].n);
    kicks = 0;
    const r = await w.mod.post(`/api/entries/${id}/decision`, { decision: 'publish', reason: 'well documented' });
    expect(r.status, r.text).toBe(200);
    expect(kicks).toBe(1);
    expect(r.body.jobIds).toHaveLength(1);
    // the team has two members (the lead and memberA): the decision mail reached both, counted in the answer
    expect(r.body.mailed).toBe(2);
    await settle(w.t, w.worker);
    expect(await standingsRows(versionId)).toBe(rowsBefore + 1);
    const mails = await w.t.database.db.select({ text: mailMessages.text }).from(mailMessages).where(sql`${mailMessages.subject} like ${'%"published once" was published%'}`);
    expect(mails.length - mailsBefore).toBe(2);
    expect(mails[0].text).toContain(`${w.t.config.baseUrl.replace(/\/$/, '')}/entries/${id}`);
    const queued = await w.t.database.db.select({ n: count() }).from(jobs).where(and(eq(jobs.kind, 'standings'), sql`${jobs.payload}->>'versionId' = ${versionId}`, sql`${jobs.id} = ${r.body.jobIds[0]}`));
    expect(Number(queued[0].n)).toBe(1);
  });

  it("a job's effects are applied by the worker through the app's applier, once, and are not stored with its result", async () => {
    await settle(w.t, w.worker);
    await w.worker.stop();
    kicks = 0;
    const standingsCache = w.t.ctx.standingsCache;
    standingsCache.set('job-key', '{}', 'e', 'job-version');
    const worker = await startWorker(w.t.database.db, w.t.ctx.log, { now: w.t.ctx.now, pollMs: 50, kinds: ['effects-probe' as never], extraHandlers: {
      'effects-probe': async () => ({ done: true, effects: [{ kind: 'kick-jobs' }, { kind: 'kick-jobs' }, { kind: 'invalidate', cache: 'standings', versionId: 'job-version' }] }),
    } });
    try {
      const id = await enqueueJob(w.t.database.db, 'effects-probe' as never, {});
      await worker.idle();
      const [j] = await w.t.database.db.select({ state: jobs.state, result: jobs.result }).from(jobs).where(eq(jobs.id, id));
      expect(j).toEqual({ state: 'done', result: { done: true } });
      expect(kicks).toBe(1);
      expect(standingsCache.get('job-key')).toBeUndefined();
    } finally {
      await worker.stop();
    }
  });
});

describe('one place', () => {
  it('no route, job, service or seed kicks the worker, drops a cache or sends mail itself (only server/effects.ts does)', () => {
    const root = path.resolve(__dirname, '../../server');
    const files: string[] = [];
    const walk = (d: string) => { for (const f of readdirSync(d)) { const p = path.join(d, f); if (statSync(p).isDirectory()) walk(p); else if (/\.ts$/.test(f)) files.push(p); } };
    walk(root);
    // the applier itself; the follower mail it calls; the worker's own loop; better-auth's account mail (its own queue, after the response); the mail transport
    const allowed = new Set(['effects.ts', 'services/notify-followers.ts', 'jobs/worker.ts', 'auth.ts', 'mail/mailer.ts', 'mail/queue.ts', 'mail/fake-smtp.ts'].map((f) => path.join(root, f)));
    const direct = /jobs\.kick\(\)|worker!?\.kick\(\)|standingsCache\.invalidate\(|notifyFollowers\(|\.send\(\{|sendMail\(/;
    const offenders = files.filter((f) => !allowed.has(f)).flatMap((f) => readFileSync(f, 'utf8').split('\n').map((line, i) => ({ f, i, line })))
      // comments, and the wiring of the worker's kick into the context (boot, the app's applier), are not calls
      .filter((x) => direct.test(x.line) && !/^\s*(\*|\/\/)/.test(x.line) && !/jobs\.kick = |kick: \(\) => ctx\.jobs\.kick\(\)/.test(x.line)).map((x) => `${path.relative(root, x.f)}:${x.i + 1}: ${x.line.trim().slice(0, 100)}`);
    expect(offenders).toEqual([]);
    expect(files.length).toBeGreaterThan(50);
  });
});
