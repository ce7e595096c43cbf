/**
 * Entry lists: an entry hidden by the moderators is not listed for the public (moderators see it,
 * marked with the reason) and its page says "hidden by the moderators: <reason>" (issue 12 item
 * 16); listing a challenge's entries costs a fixed number of queries whatever the number of
 * entries (issue 14: it was about 7 per entry).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { agent, ORIGIN, type Agent } from './helpers';
import { fullSweep, makeEntryWorld, settle, type EntryWorld } from './entries-fixtures';

let w: EntryWorld;
const published: string[] = [];

async function publish(a: Agent, label: string) {
  const r = await a.raw.post('/api/challenges/chain-12/entries').set('Origin', ORIGIN).set('Content-Type', 'application/json').send(JSON.stringify(fullSweep(w, { label })));
  expect(r.status, r.text).toBe(201);
  expect((await a.post(`/api/entries/${r.body.id}/submit`)).status).toBe(200);
  expect((await w.mod.post(`/api/entries/${r.body.id}/decision`, { decision: 'publish', reason: 'fine' })).status).toBe(200);
  published.push(r.body.id);
  return r.body.id as string;
}

/** The number of SQL statements the database receives while `f` runs (PGlite: its query and exec calls). */
async function queriesDuring(f: () => Promise<unknown>): Promise<number> {
  const pg = w.t.database.pglite!;
  const q = pg.query.bind(pg);
  const x = pg.exec.bind(pg);
  let n = 0;
  pg.query = ((...a: Parameters<typeof q>) => { n++; return q(...a); }) as typeof pg.query;
  pg.exec = ((...a: Parameters<typeof x>) => { n++; return x(...a); }) as typeof pg.exec;
  try { await f(); } finally { pg.query = q; pg.exec = x; }
  return n;
}

beforeAll(async () => {
  w = await makeEntryWorld();
  await publish(w.memberA, 'A one');
  await publish(w.memberB, 'B one');
  await settle(w.t, w.worker);
}, 180_000);
afterAll(async () => { await w.worker.stop().catch(() => undefined); await w.t.close(); });

describe('entry lists', () => {
  it('a hidden entry leaves the public list, stays in the moderators\' list marked, and its page says why', async () => {
    const hidden = published[1];
    const reason = 'the method description contradicts the resources';
    const c = await w.mod.post(`/api/entries/${hidden}/curation`, { hidden: { reason } });
    expect(c.status, c.text).toBe(200);
    const pub = await agent(w.t).get('/api/challenges/chain-12/entries');
    expect(pub.status).toBe(200);
    expect(pub.body.entries.map((e: { id: string }) => e.id)).not.toContain(hidden);
    expect(pub.body.entries.map((e: { id: string }) => e.id)).toContain(published[0]);
    expect(pub.body.entries.every((e: { hidden: unknown }) => e.hidden === null)).toBe(true);
    const mod = await w.mod.get('/api/challenges/chain-12/entries');
    expect(mod.body.entries.find((e: { id: string }) => e.id === hidden)).toMatchObject({ hidden: { reason } });
    const page = await agent(w.t).get(`/api/entries/${hidden}`);
    expect(page.status).toBe(200);
    expect(page.body).toMatchObject({ state: 'published', hidden: { reason } });
    expect((await agent(w.t).get(`/api/entries/${published[0]}`)).body.hidden).toBeNull();
    // the catalogue does not count it either
    const cat = await agent(w.t).get('/api/challenges');
    expect(cat.body.challenges.find((x: { slug: string }) => x.slug === 'chain-12').entries.classical).toBe(pub.body.entries.filter((e: { track: string }) => e.track === 'classical').length);
    expect((await w.mod.post(`/api/entries/${hidden}/curation`, { hidden: null })).status).toBe(200);
  });

  it.skipIf(!!process.env.TEST_DATABASE_URL)('lists a challenge\'s entries in a fixed number of queries whatever their number', async () => {
    await settle(w.t, w.worker);
    await w.worker.stop(); // nothing else talks to the database while we count
    // the fewest of three runs: the app's reveal clock may query once in a while (every 10 s)
    const count = async () => {
      let n = 0;
      const runs: number[] = [];
      for (let i = 0; i < 3; i++) runs.push(await queriesDuring(async () => { const r = await agent(w.t).get('/api/challenges/chain-12/entries'); n = r.body.entries.length; }));
      return { entries: n, queries: Math.min(...runs) };
    };
    const small = await count();
    for (let i = 0; i < 4; i++) await publish(w.memberA, `A extra ${i}`);
    const large = await count();
    console.info(`GET /api/challenges/chain-12/entries: ${small.entries} entries ${small.queries} queries, ${large.entries} entries ${large.queries} queries`);
    expect(large.entries).toBe(small.entries + 4);
    expect(large.queries).toBe(small.queries);
    expect(large.queries).toBeLessThanOrEqual(8);
    // the entries' summaries: estimates and coverage of the full sweep, the median stated uncertainty
    const r = await agent(w.t).get('/api/challenges/chain-12/entries');
    const a = r.body.entries.find((e: { id: string }) => e.id === published[0]);
    expect(a.summary).toMatchObject({ estimates: w.targets.length, medianUncertainty: 0.01 });
    expect(a.coverage).toEqual({ targets: w.targets.length, covered: w.targets.length, fraction: 1 });
    expect(a.team.name).toBe('Team A');
  });
});
