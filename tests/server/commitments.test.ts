/**
 * Blind rounds: a draft version sealed before it is published (the reference job writes its rows
 * sealed, through the trigger), no sealed value in any public endpoint or export before the date,
 * commitments registered before the reveal, and at the reveal (injectable clock): values public,
 * standings recomputed, one matching and one mismatching commitment, the teams e-mailed, the
 * audit and the public history.
 */
import { createHash } from 'node:crypto';
import { execFileSync } from 'node:child_process';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { agent, lastMailTo, ORIGIN, type Agent } from './helpers';
import { makeEntryWorld, settle, WORLD_EMAILS, type EntryWorld } from './entries-fixtures';
import { auditLog, entryCommitments, references, targets } from '../../server/db/schema';
import { commitmentHash, commitmentString } from '../../server/services/register-commitment';
import { enqueueDueReveals } from '../../server/jobs/reveal-job';

let w: EntryWorld;
const SPEC = { id: 'blind-chain', version: 1, title: 'Blind chain', description: 'a blind round', lattice: { kind: 'chain', n: 5 }, circuit: { family: 'kicked-ising', steps: [1, 2], thetaH: [0.3, 0.6] }, observables: [{ id: 'z2', pauli: 'Z2' }] };
const HOUR = 3600_000;
let until: Date;
let refs: { key: string; value: number }[] = [];
let checksum = '';
const entryIds: Record<'honest' | 'liar', string> = { honest: '', liar: '' };
const docs: Record<string, { estimates: { target: string; value: number; uncertainty: number; uncertaintyKind: string }[] }> = {};

const PUBLIC_PATHS = ['/api/challenges', '/api/challenges/blind-chain', '/api/challenges/blind-chain/targets', '/api/challenges/blind-chain/standings', '/api/challenges/blind-chain/estimates',
  '/api/challenges/blind-chain/agreement', '/api/challenges/blind-chain/history', '/api/challenges/blind-chain/export.csv', '/api/challenges/blind-chain/export.csv?table=standings',
  '/api/challenges/blind-chain/export.json', '/api/challenges/blind-chain/package.json', '/api/challenges/blind-chain/plan'];
async function allPublic(): Promise<string> {
  const extra = refs.flatMap((r) => [`/api/challenges/blind-chain/standings?target=${encodeURIComponent(r.key)}`, `/api/challenges/blind-chain/targets/${encodeURIComponent(r.key)}/light-cone`]);
  const ids = Object.values(entryIds).flatMap((id) => [`/api/entries/${id}`, `/api/entries/${id}/commitment`]);
  const bodies = await Promise.all([...PUBLIC_PATHS, ...extra, ...ids].map(async (p) => (await agent(w.t).get(p)).text));
  return bodies.join('\n');
}
const leaks = (text: string) => refs.filter((r) => text.includes(String(r.value)) || text.includes(r.value.toPrecision(10))).map((r) => r.key);

async function entry(a: Agent, label: string, shift: number) {
  const estimates = refs.map((r, i) => ({ target: r.key, value: Number((r.value + shift * (i + 1)).toFixed(6)), uncertainty: 0.02, uncertaintyKind: 'statistical' }));
  const doc = { challenge: { id: 'blind-chain', version: 1, checksum: `sha256:${checksum}` }, track: 'classical', label, method: { family: 'tensor-network' }, estimates };
  const r = await a.raw.post('/api/challenges/blind-chain/entries').set('Origin', ORIGIN).set('Content-Type', 'application/json').send(JSON.stringify(doc));
  expect(r.status, r.text).toBe(201);
  docs[r.body.id] = doc;
  return r.body.id as string;
}

beforeAll(async () => {
  w = await makeEntryWorld();
  const draft = await w.mod.post('/api/challenges', SPEC);
  expect(draft.status, draft.text).toBe(201);
  checksum = draft.body.checksum;
  until = new Date(w.t.clock.now.getTime() + HOUR);
  // sealed while still a draft: the values are sealed from the moment they are written
  const s = await w.mod.post('/api/challenges/blind-chain/seal?version=1', { targets: 'all', until: until.toISOString() });
  expect(s.status, s.text).toBe(200);
  expect(s.body).toMatchObject({ targets: 4, referencesSealedNow: 0, pendingReferences: 4 });
  const pub = await w.mod.post('/api/challenges/blind-chain/publish', {});
  expect(pub.status).toBe(200);
  await settle(w.t, w.worker);
  const rows = await w.t.database.db.select({ key: targets.key, value: references.value, sealedUntil: references.sealedUntil }).from(references).innerJoin(targets, eq(targets.id, references.targetId))
    .where(eq(targets.versionId, pub.body.versionId)).orderBy(targets.key);
  expect(rows.every((r) => r.sealedUntil?.toISOString() === until.toISOString())).toBe(true);
  refs = rows.filter((r) => r.value !== null).map((r) => ({ key: r.key, value: r.value! }));
}, 180_000);
afterAll(async () => { await w.worker.stop(); await w.t.close(); });

describe('blind round', () => {
  it('the reference job wrote its values sealed (trigger), none of them public', async () => {
    expect(refs.length).toBe(4);
    const t = await agent(w.t).get('/api/challenges/blind-chain/targets');
    expect(t.body.targets.every((x: { reference: { status: string } }) => x.reference.status === 'sealed')).toBe(true);
    expect(leaks(await allPublic())).toEqual([]);
  });

  it('rejects a seal date in the past and unknown targets', async () => {
    expect((await w.mod.post('/api/challenges/blind-chain/seal', { targets: 'all', until: new Date(w.t.clock.now.getTime() - 1000).toISOString() })).status).toBe(400);
    expect((await w.mod.post('/api/challenges/blind-chain/seal', { targets: ['nope'], until: until.toISOString() })).status).toBe(400);
    expect((await w.mod.post('/api/challenges/blind-chain/seal', { targets: 'all', until: 'tomorrow' })).status).toBe(400);
  });

  it('teams register commitments before the reveal (one honest, one not)', async () => {
    entryIds.honest = await entry(w.memberA, 'honest', 0.001);
    entryIds.liar = await entry(w.memberB, 'liar', -0.002);
    for (const [id, a] of [[entryIds.honest, w.memberA], [entryIds.liar, w.memberB]] as const) {
      expect((await a.post(`/api/entries/${id}/submit`)).status).toBe(200);
      expect((await w.mod.post(`/api/entries/${id}/decision`, { decision: 'publish', reason: 'blind round entry' })).status).toBe(200);
    }
    await settle(w.t, w.worker);
    // the recipe: sha256sum of the canonical string gives the same hash
    const canonical = commitmentString(docs[entryIds.honest].estimates);
    expect(canonical.startsWith('[["')).toBe(true);
    expect(canonical).not.toMatch(/\s/);
    const viaShell = execFileSync('sha256sum', { input: canonical }).toString().split(' ')[0];
    expect(viaShell).toBe(commitmentHash(docs[entryIds.honest].estimates));
    expect(createHash('sha256').update(canonical).digest('hex')).toBe(viaShell);
    // the API key of team A may commit too
    const r = await request(entryIds.honest).set('x-api-key', w.keyA).send({ sha256: viaShell.toUpperCase() });
    expect(r.status, r.text).toBe(200);
    expect(r.body).toMatchObject({ sha256: viaShell, result: 'pending', revealAt: until.toISOString() });
    // team B commits to numbers other than the ones it submitted
    const other = commitmentHash(docs[entryIds.liar].estimates.map((e) => ({ ...e, value: e.value + 0.01 })));
    expect((await w.memberB.post(`/api/entries/${entryIds.liar}/commitment`, { sha256: other })).status).toBe(200);
    expect((await w.memberA.post(`/api/entries/${entryIds.liar}/commitment`, { sha256: other })).status).toBe(403);
    expect((await w.memberB.post(`/api/entries/${entryIds.liar}/commitment`, { sha256: 'xyz' })).status).toBe(400);
    // before the reveal: the team and moderators see it, the public does not
    expect((await agent(w.t).get(`/api/entries/${entryIds.honest}/commitment`)).status).toBe(404);
    const mine = await w.memberA.get(`/api/entries/${entryIds.honest}/commitment`);
    expect(mine.body).toMatchObject({ result: 'pending', currentSha256: viaShell });
    expect(leaks(await allPublic())).toEqual([]);
  });

  it('a commitment needs an open sealed round', async () => {
    const id = (await w.memberA.raw.post('/api/challenges/chain-12/entries').set('Origin', ORIGIN).set('Content-Type', 'application/json').send(JSON.stringify({ challenge: { id: 'chain-12', version: 1, checksum: `sha256:${w.checksum}` }, track: 'classical', label: 'x', method: { family: 'other' }, estimates: [{ target: w.targets[0].key, value: 0.1, uncertainty: 0.1, uncertaintyKind: 'statistical' }] }))).body.id;
    const r = await w.memberA.post(`/api/entries/${id}/commitment`, { sha256: 'a'.repeat(64) });
    expect(r.status).toBe(409);
    expect(r.body.error.message).toMatch(/no sealed round open/);
  });

  it('nothing happens before the date', async () => {
    w.t.clock.advance(HOUR - 60_000);
    expect(await enqueueDueReveals(w.t.ctx)).toBe(0);
    expect(leaks(await allPublic())).toEqual([]);
  });

  it('at the reveal: values public, standings recomputed, commitments checked both ways, teams e-mailed, audited', async () => {
    w.t.clock.advance(2 * 60_000);
    expect(await enqueueDueReveals(w.t.ctx)).toBe(1);
    await settle(w.t, w.worker);
    const t = await agent(w.t).get('/api/challenges/blind-chain/targets');
    expect(t.body.targets.map((x: { reference: { status: string; value: number } }) => x.reference.status)).toEqual(['exact', 'exact', 'exact', 'exact']);
    expect(leaks(await allPublic()).sort()).toEqual(refs.map((r) => r.key).sort());
    const st = await agent(w.t).get('/api/challenges/blind-chain/standings');
    // recomputed at the reveal, with the references known
    expect(st.body.computedAt).toBe(w.t.clock.now.toISOString());
    const honest = await agent(w.t).get(`/api/entries/${entryIds.honest}/commitment`);
    expect(honest.status).toBe(200);
    expect(honest.body).toMatchObject({ result: 'match' });
    // after the check the current hash is public: the estimates still hash to what was checked
    expect(honest.body.currentSha256).toBe(honest.body.computedSha256);
    const liar = await agent(w.t).get(`/api/entries/${entryIds.liar}/commitment`);
    expect(liar.body).toMatchObject({ result: 'mismatch', computedSha256: commitmentHash(docs[entryIds.liar].estimates) });
    const ma = await lastMailTo(w.t, WORLD_EMAILS.memberA);
    expect(ma.subject).toBe('Parallax: reference values of blind-chain revealed');
    expect(ma.text).toContain('"honest": matches its estimates');
    const mb = await lastMailTo(w.t, WORLD_EMAILS.leadB);
    expect(mb.text).toContain('"liar": does NOT match its estimates');
    const db = w.t.database.db;
    expect(await db.select().from(auditLog).where(and(eq(auditLog.action, 'references.unseal'), eq(auditLog.subjectId, 'blind-chain')))).toHaveLength(1);
    expect((await db.select().from(entryCommitments)).map((c) => c.result).sort()).toEqual(['match', 'mismatch']);
    const h = await agent(w.t).get('/api/challenges/blind-chain/history');
    expect(h.body.events.map((e: { kind: string }) => e.kind)).toEqual(expect.arrayContaining(['references.seal', 'references.unseal']));
    // a second reveal run changes nothing; a checked commitment cannot be replaced
    expect(await enqueueDueReveals(w.t.ctx)).toBe(0);
    expect((await w.memberB.post(`/api/entries/${entryIds.liar}/commitment`, { sha256: commitmentHash(docs[entryIds.liar].estimates) })).status).toBe(409);
  });
});

function request(id: string) {
  return agent(w.t).raw.post(`/api/entries/${id}/commitment`).set('Origin', ORIGIN);
}
