/**
 * GET /challenges/:slug/targets/:targetKey: one target's reference with provenance, every public
 * estimate with its degree of equivalence, raw zero-noise data with the server's fits, and the
 * same observable at the other grid points. Hidden entries never appear.
 */
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { agent, makeTestApp, setRole, signUpVerified, type TestApp } from './helpers';
import { startWorker, type Worker } from '../../server/jobs/worker';
import { entries, estimates, organization, targets } from '../../server/db/schema';
import { recomputeStandings } from '../../server/services/recompute-standings';

let t: TestApp;
let worker: Worker;
const SPEC = { id: 'target-chain', version: 1, title: 'Target chain', description: 'one target', lattice: { kind: 'chain', n: 5 }, circuit: { family: 'kicked-ising', steps: [1, 2], thetaH: [0.3, 0.6] }, observables: [{ id: 'z2', pauli: 'Z2' }, { id: 'x1', pauli: 'X1' }] };
const KEY = 't1-h0.300000:z2';
const ids = { hw: randomUUID(), cl: randomUUID(), hidden: randomUUID() };

beforeAll(async () => {
  t = await makeTestApp();
  const mod = await signUpVerified(t, 'target-mod@p.test', 'Mod');
  await setRole(t, 'target-mod@p.test', 'moderator');
  worker = await startWorker(t.database.db, t.ctx.log, { pollMs: 100 });
  t.ctx.jobs.kick = () => worker.kick();
  expect((await mod.post('/api/challenges', SPEC)).status).toBe(201);
  const pub = await mod.post('/api/challenges/target-chain/publish', {});
  const versionId = pub.body.versionId;
  for (let i = 0; i < 300 && (await t.database.db.query.jobs.findMany()).some((j) => j.state !== 'done' && j.state !== 'failed'); i++) { await worker.idle(); await new Promise((r) => setTimeout(r, 100)); }
  const db = t.database.db;
  await db.insert(organization).values({ id: 'team-t', name: 'Team T', slug: 'team-t' });
  const tg = await db.select().from(targets).where(eq(targets.versionId, versionId));
  const base = { challengeSlug: 'target-chain', versionId, teamId: 'team-t', state: 'published', methodFamily: 'other', document: {}, submittedAt: new Date(), publishedAt: new Date() } as const;
  await db.insert(entries).values([
    { ...base, id: ids.hw, lineageId: ids.hw, track: 'hardware', label: 'device run' },
    { ...base, id: ids.cl, lineageId: ids.cl, track: 'classical', label: 'tensor run' },
    { ...base, id: ids.hidden, lineageId: ids.hidden, track: 'classical', label: 'hidden run', hiddenReason: 'spam' },
  ]);
  // linear noise data: E(c) = 1 - 0.2 c, so every polynomial model extrapolates to exactly 1
  const noiseScaled = [1, 2, 3].map((c) => ({ scale: c, value: 1 - 0.2 * c, uncertainty: 0.01 }));
  await db.insert(estimates).values(tg.map((x) => ({ entryId: ids.hw, targetKey: x.key, value: 0.95, uncertainty: 0.02, kind: 'statistical', raw: x.key === KEY ? { noiseScaled, unmitigated: 0.8 } : null })));
  await db.insert(estimates).values(tg.map((x) => ({ entryId: ids.cl, targetKey: x.key, value: 0.9, uncertainty: 0.001, kind: 'systematic' })));
  await db.insert(estimates).values(tg.map((x) => ({ entryId: ids.hidden, targetKey: x.key, value: 0.111222333, uncertainty: 0.01, kind: 'statistical' })));
  await recomputeStandings(db, versionId, new Date());
}, 120_000);
afterAll(async () => { await worker.stop(); await t.close(); });

describe('one target', () => {
  it('gives the exact reference with its provenance and each estimate against it', async () => {
    const r = await agent(t).get(`/api/challenges/target-chain/targets/${KEY}`);
    expect(r.status).toBe(200);
    expect(r.body.observable.spec).toEqual({ id: 'z2', pauli: 'Z2' });
    expect(r.body.reference.status).toBe('exact');
    // one step: RX(0.3) then RZZ layers; Z2 commutes with the ZZ layer, so <Z2> = cos 0.3 (textbook single-qubit rotation)
    expect(r.body.reference.value).toBeCloseTo(Math.cos(0.3), 10);
    expect(r.body.reference.method).toEqual(expect.any(String));
    expect(r.body.engineVersion).toMatch(/parallax-engine/);
    const labels = r.body.estimates.filter((e: any) => !e.entry.isBaseline).map((e: any) => e.entry.label).sort();
    expect(labels).toEqual(['device run', 'tensor run']); // and the house baseline
    const cl = r.body.estimates.find((e: any) => e.entry.id === ids.cl);
    expect(cl.equivalence.against).toBe('reference');
    expect(cl.equivalence.d).toBeCloseTo(0.9 - Math.cos(0.3), 12);
    expect(cl.equivalence.U).toBeCloseTo(2 * 0.001, 12); // the reference is exact: u(d) = u
  });

  it("gives the hardware entry's noise-scaled data with the server's fits", async () => {
    const r = await agent(t).get(`/api/challenges/target-chain/targets/${KEY}`);
    const hw = r.body.estimates.find((e: any) => e.entry.id === ids.hw);
    expect(hw.zne.points).toHaveLength(3);
    const rich = hw.zne.fits.find((f: any) => f.model.startsWith('richardson'));
    expect(rich.ok).toBe(true);
    expect(rich.value).toBeCloseTo(1, 10); // Richardson through three collinear points: the line's intercept
    // Richardson weights for c = 1, 2, 3 are (3, -3, 1) (Temme, Bravyi and Gambetta 2017): u = 0.01 sqrt(19)
    expect(rich.uncertainty).toBeCloseTo(0.01 * Math.sqrt(19), 10);
    expect(r.body.estimates.find((e: any) => e.entry.id === ids.cl).zne).toBeNull();
  });

  it('lists the same observable at the other depths and angles, and never a hidden entry', async () => {
    const r = await agent(t).get(`/api/challenges/target-chain/targets/${KEY}`);
    expect(r.body.siblings.map((s: any) => s.key).sort()).toEqual(['t1-h0.300000:z2', 't1-h0.600000:z2', 't2-h0.300000:z2', 't2-h0.600000:z2']);
    expect(JSON.stringify(r.body)).not.toContain('0.111222333');
    expect(JSON.stringify(r.body)).not.toContain(ids.hidden);
  });

  it('answers 404 naming the target for an unknown key', async () => {
    const r = await agent(t).get('/api/challenges/target-chain/targets/t9-h0.300000:z2');
    expect(r.status).toBe(404);
    expect(JSON.stringify(r.body)).toContain('t9-h0.300000:z2');
  });
});
