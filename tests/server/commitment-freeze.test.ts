/**
 * A commitment checked at the reveal freezes the estimates it was checked against (issue 12 item 3):
 * a team may not copy the revealed values into its entry afterwards and keep "match". Both ways in:
 * a draft edited after the reveal, and an entry in review at the reveal, returned after the
 * submission window closed, edited and resubmitted. Metadata may still change; the public
 * commitment shows the current hash, and the review queue says whether the estimates still hash to
 * what was checked ('altered-after-reveal' otherwise).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { agent, ORIGIN, type Agent } from './helpers';
import { makeEntryWorld, settle, type EntryWorld } from './entries-fixtures';
import { entries, estimates, references, targets } from '../../server/db/schema';
import { commitmentHash } from '../../server/services/register-commitment';
import { enqueueDueReveals } from '../../server/jobs/reveal-job';

let w: EntryWorld;
const SPEC = { id: 'freeze-chain', version: 1, title: 'Freeze chain', description: 'a blind round', lattice: { kind: 'chain', n: 5 }, circuit: { family: 'kicked-ising', steps: [1, 2], thetaH: [0.3, 0.6] }, observables: [{ id: 'z2', pauli: 'Z2' }] };
const MIN = 60_000;
let checksum = '';
let refs: { key: string; value: number }[] = [];
const ids = { draft: '', returned: '' };

type Doc = { challenge: object; track: string; label: string; method: object; estimates: { target: string; value: number; uncertainty: number; uncertaintyKind: string }[] };
const docOf = (label: string, values: (r: { value: number }, i: number) => number): Doc => ({
  challenge: { id: 'freeze-chain', version: 1, checksum: `sha256:${checksum}` }, track: 'classical', label, method: { family: 'tensor-network' },
  estimates: refs.map((r, i) => ({ target: r.key, value: Number(values(r, i).toFixed(6)), uncertainty: 0.02, uncertaintyKind: 'statistical' })),
});
const guess = (label: string) => docOf(label, (r, i) => r.value + 0.003 * (i + 1));
const send = (a: Agent, method: 'post' | 'put', path: string, doc: Doc) => a.raw[method](path).set('Origin', ORIGIN).set('Content-Type', 'application/json').send(JSON.stringify(doc));

beforeAll(async () => {
  w = await makeEntryWorld();
  const draft = await w.mod.post('/api/challenges', SPEC);
  expect(draft.status, draft.text).toBe(201);
  checksum = draft.body.checksum;
  const until = new Date(w.t.clock.now.getTime() + 60 * MIN);
  expect((await w.mod.post('/api/challenges/freeze-chain/seal?version=1', { targets: 'all', until: until.toISOString() })).status).toBe(200);
  const pub = await w.mod.post('/api/challenges/freeze-chain/publish', {});
  expect(pub.status).toBe(200);
  await settle(w.t, w.worker);
  const rows = await w.t.database.db.select({ key: targets.key, value: references.value }).from(references).innerJoin(targets, eq(targets.id, references.targetId))
    .where(eq(targets.versionId, pub.body.versionId)).orderBy(targets.key);
  refs = rows.filter((r) => r.value !== null).map((r) => ({ key: r.key, value: r.value! }));
  expect(refs.length).toBe(4);

  // before the reveal: a draft (team A) and an entry in review (team B), each with its commitment
  for (const [k, a] of [['draft', w.memberA], ['returned', w.memberB]] as const) {
    const r = await send(a, 'post', '/api/challenges/freeze-chain/entries', guess(k));
    expect(r.status, r.text).toBe(201);
    ids[k] = r.body.id;
    const c = await a.post(`/api/entries/${r.body.id}/commitment`, { sha256: commitmentHash(guess(k).estimates) });
    expect(c.status, c.text).toBe(200);
  }
  expect((await w.memberB.post(`/api/entries/${ids.returned}/submit`)).status).toBe(200);
  // the submission window closes, then the reveal
  const closes = new Date(w.t.clock.now.getTime() + 30 * MIN);
  expect((await w.mod.post('/api/challenges/freeze-chain/settings', { submissionWindow: { closesAt: closes.toISOString() } })).status).toBe(200);
  w.t.clock.advance(61 * MIN);
  expect(await enqueueDueReveals(w.t.ctx)).toBe(1);
  await settle(w.t, w.worker);
  for (const id of Object.values(ids)) expect((await w.mod.get(`/api/entries/${id}/commitment`)).body.result).toBe('match');
}, 180_000);
afterAll(async () => { await w.worker.stop(); await w.t.close(); });

describe('estimates frozen once the commitment is checked', () => {
  it('a draft edited after the reveal: the revealed values are refused, a metadata change is taken', async () => {
    const copied = docOf('draft', (r) => r.value);
    const r = await send(w.memberA, 'put', `/api/entries/${ids.draft}`, copied);
    expect(r.status, r.text).toBe(409);
    expect(r.body.error.message).toMatch(/checked against its commitment at the reveal \(match/);
    expect(r.body.error.problems[0].path).toBe('/estimates');
    const stored = await w.t.database.db.select({ v: estimates.value }).from(estimates).where(eq(estimates.entryId, ids.draft));
    expect(stored.map((x) => x.v).sort()).toEqual(guess('draft').estimates.map((x) => x.value).sort());
    const relabel = await send(w.memberA, 'put', `/api/entries/${ids.draft}`, guess('draft, renamed'));
    expect(relabel.status, relabel.text).toBe(200);
  });

  it('a returned entry after the window closed: edit refused, resubmitted as checked, published still matching with its current hash public', async () => {
    expect((await w.mod.post(`/api/entries/${ids.returned}/decision`, { decision: 'return', reason: 'please add the method description' })).status).toBe(200);
    const copied = await send(w.memberB, 'put', `/api/entries/${ids.returned}`, docOf('returned', (r) => r.value));
    expect(copied.status, copied.text).toBe(409);
    const fixed = { ...guess('returned'), method: { family: 'tensor-network', description: 'MPS, bond dimension 64' } };
    expect((await send(w.memberB, 'put', `/api/entries/${ids.returned}`, fixed)).status).toBe(200);
    expect((await w.memberB.post(`/api/entries/${ids.returned}/submit`)).status).toBe(200);

    // the review queue shows the commitment and that the estimates still hash to what was checked
    const q = await w.mod.get('/api/moderation/queue');
    const item = q.body.entries.find((e: { id: string }) => e.id === ids.returned);
    expect(item.checks.commitment).toMatchObject({ result: 'match', unchangedSinceCheck: true });
    expect(item.flags).not.toContain('altered-after-reveal');
    // estimates changed behind the services' back (a database edit; the entry row is touched as every
    // write path does, which is what the queue's cache fingerprint watches): the queue says so
    const db = w.t.database.db;
    const key = refs[0].key;
    await db.update(estimates).set({ value: refs[0].value }).where(and(eq(estimates.entryId, ids.returned), eq(estimates.targetKey, key)));
    await db.update(entries).set({ updatedAt: w.t.clock.now }).where(eq(entries.id, ids.returned));
    const altered = (await w.mod.get('/api/moderation/queue')).body.entries.find((e: { id: string }) => e.id === ids.returned);
    expect(altered.flags).toContain('altered-after-reveal');
    expect(altered.checks.commitment.unchangedSinceCheck).toBe(false);
    await db.update(estimates).set({ value: guess('returned').estimates[0].value }).where(and(eq(estimates.entryId, ids.returned), eq(estimates.targetKey, key)));

    expect((await w.mod.post(`/api/entries/${ids.returned}/decision`, { decision: 'publish', reason: 'method described' })).status).toBe(200);
    const pub = await agent(w.t).get(`/api/entries/${ids.returned}/commitment`);
    expect(pub.status).toBe(200);
    expect(pub.body).toMatchObject({ result: 'match', computedSha256: commitmentHash(guess('returned').estimates) });
    expect(pub.body.currentSha256).toBe(pub.body.computedSha256);
  });
});
