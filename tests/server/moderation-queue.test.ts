/**
 * The review queue's checks are cached per challenge version under a fingerprint of what they
 * depend on (server/services/check-entries.ts). Here: after every change that moves a check, the
 * queue a moderator GETs equals the queue computed from scratch, and shows the change: a reference
 * added, a reference sealed and then public again by the clock alone, another entry published
 * (the identical-values check names its new state; the consensus is the new standings'), an entry
 * returned, edited and resubmitted within the same millisecond. And the cache is used when nothing
 * changed. Speed is measured in bench/moderation-queue.bench.ts, not here.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { desc, eq } from 'drizzle-orm';
import { ORIGIN, type Agent } from './helpers';
import { fullSweep, makeEntryWorld, settle, type EntryWorld } from './entries-fixtures';
import { references, standings, targets } from '../../server/db/schema';
import { QueueChecksCache, reviewQueue } from '../../server/services/check-entries';

let w: EntryWorld;
beforeAll(async () => { w = await makeEntryWorld(); }, 120_000);
afterAll(async () => { await w.worker.stop(); await w.t.close(); });

type Doc = ReturnType<typeof fullSweep>;
interface Item { id: string; flags: string[]; checks: { coverage: { answered: number }; scores: { exactReferences: number; scored: number }; outliers: { consensusComputedAt: string | null }; identical: { entryId: string; state: string; targets: number }[] } }

const send = (a: Agent, method: 'post' | 'put', path: string, body: unknown) => a.raw[method](path).set('Origin', ORIGIN).set('Content-Type', 'application/json').send(JSON.stringify(body));
/** values a little off the exact ones (agreeing on an exact value is not evidence of copying) */
const offset = (d: Doc, by = 0.001): Doc => ({ ...d, estimates: d.estimates.map((e: { value: number }) => ({ ...e, value: e.value * 0.99 + by })) });
async function submitted(label: string, doc: Doc): Promise<string> {
  const r = await send(w.memberA, 'post', '/api/challenges/chain-12/entries', { ...doc, label });
  expect(r.status, r.text).toBe(201);
  expect((await w.memberA.post(`/api/entries/${r.body.id}/submit`)).status).toBe(200);
  return r.body.id;
}

/**
 * the queue as a moderator gets it, checked against the same queue computed without a cache; the
 * background jobs settle first (a seal or a decision queues a standings recomputation, and one that
 * lands between the two reads would make them differ for a reason that is not the cache's)
 */
async function queue(): Promise<Map<string, Item>> {
  await settle(w.t, w.worker);
  const r = await w.mod.get('/api/moderation/queue');
  expect(r.status, r.text).toBe(200);
  const fresh = JSON.parse(JSON.stringify(await reviewQueue(w.t.database.db, w.t.clock.now)));
  expect(r.body.entries).toEqual(fresh);
  return new Map(r.body.entries.map((e: Item) => [e.id, e]));
}

describe('the review queue after changes', () => {
  let first = '';
  let copy = '';
  let removedTarget = '';

  it('a reference added later is scored at once', async () => {
    // one target without a reference when the entry is submitted
    const [t] = await w.t.database.db.select({ id: targets.id, key: targets.key }).from(targets).where(eq(targets.key, w.targets[5].key));
    removedTarget = t.key;
    const [ref] = await w.t.database.db.delete(references).where(eq(references.targetId, t.id)).returning();
    first = await submitted('first sweep', offset(fullSweep(w)));
    let q = await queue();
    expect(q.get(first)!.checks.scores).toMatchObject({ exactReferences: 59, scored: 59 });
    const { id: _id, ...row } = ref;
    await w.t.database.db.insert(references).values(row);
    q = await queue();
    expect(q.get(first)!.checks.scores).toMatchObject({ exactReferences: 60, scored: 60 });
  });

  it('a sealed reference leaves the scores, and returns when its date passes (the clock alone)', async () => {
    const r = await w.mod.post('/api/challenges/chain-12/seal', { targets: [removedTarget], until: new Date(w.t.clock.now.getTime() + 3_600_000).toISOString() });
    expect(r.status, r.text).toBe(200);
    let q = await queue();
    expect(q.get(first)!.checks.scores).toMatchObject({ exactReferences: 59, scored: 59 });
    w.t.clock.advance(2 * 3_600_000);
    q = await queue();
    expect(q.get(first)!.checks.scores).toMatchObject({ exactReferences: 60, scored: 60 });
  });

  it('another entry published: the identical-values check shows its state, the outliers use the new consensus', async () => {
    await settle(w.t, w.worker);
    copy = await submitted('copied sweep', offset(fullSweep(w)));
    let q = await queue();
    expect(q.get(copy)!.checks.identical).toEqual([expect.objectContaining({ entryId: first, state: 'in-review', targets: 60 })]);
    expect(q.get(first)!.checks.identical).toEqual([expect.objectContaining({ entryId: copy, state: 'in-review' })]);
    const before = q.get(copy)!.checks.outliers.consensusComputedAt;
    const d = await w.mod.post(`/api/entries/${first}/decision`, { decision: 'publish', reason: 'Checks pass.' });
    expect(d.status, d.text).toBe(200);
    q = await queue();
    expect(q.has(first)).toBe(false);
    expect(q.get(copy)!.checks.identical).toEqual([expect.objectContaining({ entryId: first, state: 'published', targets: 60 })]);
    await settle(w.t, w.worker);
    q = await queue();
    const [latest] = await w.t.database.db.select({ at: standings.computedAt }).from(standings).orderBy(desc(standings.computedAt)).limit(1);
    expect(q.get(copy)!.checks.outliers.consensusComputedAt).toBe(latest.at.toISOString());
    expect(q.get(copy)!.checks.outliers.consensusComputedAt).not.toBe(before);
  });

  it('an entry returned, edited and resubmitted in the same millisecond shows its new estimates', async () => {
    const ok = await w.mod.post(`/api/entries/${copy}/decision`, { decision: 'return', reason: 'Send your own values.' });
    expect(ok.status, ok.text).toBe(200);
    const doc = offset(fullSweep(w), 0.003);
    const put = await send(w.memberA, 'put', `/api/entries/${copy}`, { ...doc, label: 'copied sweep', estimates: doc.estimates.slice(0, 20) });
    expect(put.status, put.text).toBe(200);
    expect((await w.memberA.post(`/api/entries/${copy}/submit`)).status).toBe(200);
    const q = await queue();
    expect(q.get(copy)!.checks.coverage.answered).toBe(20);
    expect(q.get(copy)!.flags).toContain('partial-sweep');
    expect(q.get(copy)!.checks.identical).toEqual([]);
  });

  it('computes a version again only when something it depends on changed', async () => {
    const cache = new QueueChecksCache();
    const db = w.t.database.db;
    const a = JSON.stringify(await reviewQueue(db, w.t.clock.now, cache));
    expect(JSON.stringify(await reviewQueue(db, w.t.clock.now, cache))).toBe(a);
    expect({ computed: cache.computed, reused: cache.reused }).toEqual({ computed: 1, reused: 1 });
    const id = await submitted('third sweep', offset(fullSweep(w), 0.005));
    const q = await reviewQueue(db, w.t.clock.now, cache);
    expect(q.map((x) => x.id)).toContain(id);
    expect({ computed: cache.computed, reused: cache.reused }).toEqual({ computed: 2, reused: 1 });
    // nothing left in review: the version leaves the cache
    const ids = q.map((x) => x.id);
    for (const e of ids) expect((await w.mod.post(`/api/entries/${e}/decision`, { decision: 'reject', reason: 'Test over.' })).status).toBe(200);
    expect(await reviewQueue(db, w.t.clock.now, cache)).toEqual([]);
    expect(cache.versions.size).toBe(0);
  });
});
