import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { agent, makeTestApp, setRole, signUpVerified, type Agent, type TestApp } from './helpers';
import { startWorker, type Worker } from '../../server/jobs/worker';
import { canonicalJson } from '../../shared/physics/challenge';
import { entries, estimates } from '../../server/db/schema';

const spec = JSON.parse(readFileSync(new URL('../fixtures/challenges/chain-small.json', import.meta.url), 'utf8'));
let t: TestApp;
let mod: Agent;
let worker: Worker;

beforeAll(async () => {
  t = await makeTestApp();
  mod = await signUpVerified(t, 'mod@c.test', 'Moe Moderator');
  await setRole(t, 'mod@c.test', 'moderator');
  worker = await startWorker(t.database.db, t.ctx.log, { now: t.ctx.now, pollMs: 100 });
  t.ctx.jobs.kick = () => worker.kick();
}, 60_000);
afterAll(async () => { await worker.stop(); await t.close(); });

async function settle() {
  for (let i = 0; i < 600; i++) {
    await worker.idle();
    const r = await t.database.db.query.jobs.findMany();
    if (r.every((j) => j.state === 'done' || j.state === 'failed')) return r;
    await new Promise((res) => setTimeout(res, 100));
  }
  throw new Error('jobs did not settle');
}

describe('challenge drafts and publication', () => {
  it('rejects an invalid spec naming the field, and stores nothing', async () => {
    const bad = { ...spec, lattice: { kind: 'chain', n: 0 } };
    const r = await mod.post('/api/challenges', bad);
    expect(r.status).toBe(400);
    expect(r.body.error.problems[0].path).toBe('/lattice/n');
    const bad2 = { ...spec, observables: [{ id: 'zq', pauli: 'Z99' }] };
    const r2 = await mod.post('/api/challenges', bad2);
    expect(r2.status).toBe(400);
    expect(r2.body.error.problems[0].path).toMatch(/^\/observables\/0/);
    expect(r2.body.error.problems[0].message).toMatch(/99/);
    expect((await t.database.db.query.challenges.findMany()).length).toBe(0);
  });

  it('stores a draft that the public cannot see, publishes it and computes references in the background', async () => {
    const r = await mod.post('/api/challenges', spec);
    expect(r.status).toBe(201);
    expect(r.body).toMatchObject({ slug: 'chain-12', version: 1, targets: 60, instances: 12 });
    // the checksum is SHA-256 of the canonical serialisation (cross-checked with node:crypto)
    expect(r.body.checksum).toBe(createHash('sha256').update(canonicalJson(spec)).digest('hex'));

    expect((await agent(t).get('/api/challenges/chain-12')).status).toBe(404);
    expect((await mod.get('/api/challenges/chain-12')).status).toBe(200);
    expect((await mod.post('/api/challenges', spec)).status).toBe(409); // same checksum twice

    const p = await mod.post('/api/challenges/chain-12/publish', {});
    expect(p.status).toBe(200);
    const jobs = await settle();
    expect(jobs.filter((j) => j.state === 'failed')).toEqual([]);
    expect([...new Set(jobs.map((j) => j.kind))].sort()).toEqual(['baseline', 'references', 'standings']);

    const job = await agent(t).get(`/api/jobs/${p.body.jobId}`);
    expect(job.body).toMatchObject({ state: 'done', progress: 1 });

    const tg = await agent(t).get('/api/challenges/chain-12/targets');
    expect(tg.status).toBe(200);
    const byKey = new Map(tg.body.targets.map((x: { key: string; reference: { status: string; value: number } }) => [x.key, x.reference]));
    expect([...byKey.values()].every((ref: any) => ref.status === 'exact')).toBe(true);
    // facts from PHYSICS.md (Clifford points): thetaH = 0 leaves |0...0>: Z strings give 1, X gives 0;
    // thetaH = pi/2 makes <Z_q> = 0 for every t >= 1
    expect((byKey.get('t4-h0.000000:z6') as any).value).toBeCloseTo(1, 12);
    expect((byKey.get('t4-h0.000000:zz5') as any).value).toBeCloseTo(1, 12);
    expect((byKey.get('t2-h0.000000:x5') as any).value).toBeCloseTo(0, 12);
    expect((byKey.get('t2-h1.570796:z6') as any).value).toBeCloseTo(0, 12);
    const z1 = byKey.get('t1-h0.392699:z6') as any; // one step: <Z> = cos(thetaH) on a site (RZZ commutes with Z)
    expect(z1.value).toBeCloseTo(Math.cos(0.39269908169872414), 12);
    expect(z1.engineVersion).toMatch(/^parallax-engine/);
  });

  it('adds the house baseline, whose every value lies within its stated truncation bound of the reference', async () => {
    const [base] = await t.database.db.select().from(entries).where(eq(entries.isBaseline, true));
    expect(base).toBeTruthy();
    expect(base.state).toBe('published');
    const ests = await t.database.db.select().from(estimates).where(eq(estimates.entryId, base.id));
    expect(ests).toHaveLength(60);
    const refs = new Map((await agent(t).get('/api/challenges/chain-12/targets')).body.targets.map((x: any) => [x.key, x.reference.value]));
    for (const e of ests) expect(Math.abs(e.value - (refs.get(e.targetKey) as number))).toBeLessThanOrEqual(e.uncertainty + 1e-12);
  });

  it('serves the spec with its checksum and every instance as OpenQASM 3', async () => {
    const s = await agent(t).get('/api/challenges/chain-12/spec.json');
    expect(s.status).toBe(200);
    expect(s.headers['x-parallax-checksum']).toBe(`sha256:${createHash('sha256').update(canonicalJson(JSON.parse(s.text))).digest('hex')}`);
    const q = await agent(t).get('/api/challenges/chain-12/instances/t2-h0.785398/qasm');
    expect(q.status).toBe(200);
    expect(q.text.startsWith('OPENQASM 3.0;')).toBe(true);
    expect(q.text).toContain('qubit[12]');
    expect((q.text.match(/\brx\(/g) ?? []).length).toBe(24); // 2 steps x 12 qubits
    expect((await agent(t).get('/api/challenges/chain-12/instances/nope/qasm')).status).toBe(404);
  });

  it('a correction is a new version; the old one is superseded with the reason', async () => {
    const v2 = { ...spec, version: 2, observables: [...spec.observables, { id: 'z11', pauli: 'Z11' }] };
    expect((await mod.post('/api/challenges', v2)).status).toBe(201);
    const noReason = await mod.post('/api/challenges/chain-12/publish', {});
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.problems[0].path).toBe('/reason');
    expect((await mod.post('/api/challenges/chain-12/publish', { reason: 'added the edge spin z11' })).status).toBe(200);
    const c = await agent(t).get('/api/challenges/chain-12');
    expect(c.body.version.version).toBe(2);
    expect(c.body.versions.find((v: any) => v.version === 1)).toMatchObject({ state: 'superseded', supersededReason: 'added the edge spin z11' });
    const old = await agent(t).get('/api/challenges/chain-12/targets?version=1');
    expect(old.status).toBe(200);
    expect(old.body.targets).toHaveLength(60);
    await settle();
  });

  it('the catalogue lists published challenges with their size and exact share', async () => {
    const r = await agent(t).get('/api/challenges');
    const c = r.body.challenges.find((x: any) => x.slug === 'chain-12');
    expect(c).toMatchObject({ qubits: 12, family: 'kicked-ising', steps: { min: 1, max: 4 }, targets: 72, version: 2 });
    expect(c.exactTargets).toBe(72);
  });
});
