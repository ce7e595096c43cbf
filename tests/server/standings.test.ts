/**
 * Standings end to end: a small published challenge, five entries, the cached standings and the
 * consensus values equal what the scoring library gives for the same numbers.
 */
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { agent, makeTestApp, setRole, signUpVerified, type TestApp } from './helpers';
import { settle } from './entries-fixtures';
import { startWorker, type Worker } from '../../server/jobs/worker';
import { entries, estimates, observables, organization, targets, references } from '../../server/db/schema';
import { recomputeStandings } from '../../server/services/recompute-standings';
import { consensus, scoreSweep, degreesOfEquivalence } from '../../shared/scoring';

let t: TestApp;
let worker: Worker;
const SPEC = {
  id: 'st-chain', version: 1, title: 'Standings chain', description: 'five entries',
  lattice: { kind: 'chain', n: 6 },
  circuit: { family: 'kicked-ising', steps: [1, 2], thetaH: [0.3, 0.7] },
  observables: [{ id: 'z2', pauli: 'Z2' }],
};
// invented test numbers: five entries x four targets (value, uncertainty)
const NUMBERS: Record<string, [number, number][]> = {
  A: [[0.95, 0.01], [0.76, 0.02], [0.80, 0.03], [0.30, 0.05]],
  B: [[0.96, 0.02], [0.77, 0.02], [0.78, 0.02], [0.35, 0.04]],
  C: [[0.94, 0.05], [0.70, 0.05], [0.85, 0.05], [0.20, 0.06]],
  D: [[0.90, 0.01], [0.79, 0.01], [0.60, 0.01], [0.10, 0.01]],
  E: [[0.955, 0.003], [0.765, 0.003], [0.81, 0.02], [0.33, 0.02]],
};
let keys: string[] = [];
const ids: Record<string, string> = {};

beforeAll(async () => {
  t = await makeTestApp();
  const mod = await signUpVerified(t, 'mod@s.test');
  await setRole(t, 'mod@s.test', 'moderator');
  worker = await startWorker(t.database.db, t.ctx.log, { now: t.ctx.now, pollMs: 100 });
  t.ctx.jobs.kick = () => worker.kick();
  expect((await mod.post('/api/challenges', SPEC)).status).toBe(201);
  expect((await mod.post('/api/challenges/st-chain/publish', {})).status).toBe(200);
  // every job of the publication runs to the end (references, the house baseline, standings): the
  // tests below expect the baseline to be there, and fail if it is not (settle throws on a timeout)
  const settled = await settle(t, worker);
  expect(settled.filter((j) => j.state === 'failed')).toEqual([]);
  const db = t.database.db;
  const tg = await db.select({ id: targets.id, key: targets.key, versionId: targets.versionId }).from(targets).orderBy(targets.key);
  keys = tg.map((x) => x.key);
  // the last two targets become unverifiable: drop their references (as if no exact method existed)
  for (const x of tg.slice(2)) await db.update(references).set({ value: null, method: 'none', reason: 'test: treated as unknown' }).where(eq(references.targetId, x.id));
  // one team per entry: the consensus counts one result per team (scoring rules, rules.ts)
  for (const name of Object.keys(NUMBERS)) await db.insert(organization).values({ id: `team-${name}`, name: `Team ${name}`, slug: `team-${name.toLowerCase()}` });
  let n = 0;
  for (const [name, nums] of Object.entries(NUMBERS)) {
    const id = randomUUID();
    ids[name] = id;
    await db.insert(entries).values({ id, lineageId: id, challengeSlug: 'st-chain', versionId: tg[0].versionId, teamId: `team-${name}`, state: 'published', track: name === 'D' ? 'hardware' : 'classical', methodFamily: 'other', label: `entry ${name}`, document: { resources: { cpuCoreHours: 10 - n } }, submittedAt: new Date(Date.now() + n * 1000), publishedAt: new Date() });
    await db.insert(estimates).values(nums.map(([value, u], k) => ({ entryId: id, targetKey: keys[k], value, uncertainty: u, kind: 'statistical' })));
    n++;
  }
  await recomputeStandings(db, tg[0].versionId, new Date());
}, 120_000);
afterAll(async () => { await worker.stop(); await t.close(); });

describe('standings and consensus', () => {
  it('consensus per unverifiable target equals the library (DerSimonian-Laird by default), the house baseline left out', async () => {
    const r = await agent(t).get('/api/challenges/st-chain/targets');
    expect(r.status).toBe(200);
    expect(r.body.estimator).toBe('random-effects-dl');
    // beforeAll ran every job of the publication (settle), so the house baseline exists: exactly one
    const baseline = (await t.database.db.select().from(entries).where(eq(entries.isBaseline, true)));
    expect(baseline).toHaveLength(1);
    for (const k of [2, 3]) {
      // the house baseline is a reference row: never in the consensus
      const ms = Object.values(NUMBERS).map((nums) => ({ value: nums[k][0], uncertainty: nums[k][1] }));
      const lib = consensus(ms, 'random-effects-dl');
      const got = r.body.targets.find((x: any) => x.key === keys[k]);
      expect(got.reference.status).toBe('none');
      expect(got.consensus.value).toBeCloseTo(lib.value, 12);
      expect(got.consensus.uncertainty).toBeCloseTo(lib.uncertainty, 12);
      expect(got.consensus.chi2).toBeCloseTo(lib.inputTest.chi2, 10);
      expect(got.consensus.teams).toBe(5);
      expect(got.consensus.excluded).toContain(baseline[0].id);
    }
  });

  it('entry metrics equal scoreSweep and the median |d|/U of the library, and the ranking follows the overall proper score', async () => {
    const r = await agent(t).get('/api/challenges/st-chain/standings');
    expect(r.status).toBe(200);
    expect(r.body.status).toBe('ready');
    const refs = (await agent(t).get('/api/challenges/st-chain/targets')).body.targets;
    const rows = r.body.entries.filter((e: any) => !e.isBaseline);
    expect(r.body.entries.filter((e: any) => e.isBaseline).every((e: any) => e.rank === null)).toBe(true);
    expect(rows).toHaveLength(5);
    for (const row of rows) {
      const name = row.label.split(' ')[1];
      const nums = NUMBERS[name];
      const s = scoreSweep(keys.map((key, k) => ({ targetId: key, estimate: { value: nums[k][0], uncertainty: nums[k][1] }, reference: refs[k].reference.status === 'exact' ? { value: refs[k].reference.value } : undefined })));
      expect(row.metrics.rmseVerifiable).toBeCloseTo(s.verifiable.rmse, 12);
      expect(row.metrics.meanZ2Verifiable).toBeCloseTo(s.verifiable.meanZ2, 9);
      expect(row.metrics.gridCoverage).toBe(1);
    }
    const scores = rows.map((e: any) => e.metrics.scoreOverall);
    expect([...scores].sort((a: number, b: number) => a - b)).toEqual(scores);
    expect(rows.map((e: any) => e.rank)).toEqual(rows.map((_: unknown, i: number) => i + 1));
  });

  it('the house baseline states its truncation bound capped at the observable\'s bound (issue 11), the raw figure kept in raw', async () => {
    const db = t.database.db;
    const [b] = await db.select().from(entries).where(eq(entries.isBaseline, true));
    const rows = await db.select({ u: estimates.uncertainty, kind: estimates.kind, raw: estimates.raw, bound: observables.bound })
      .from(estimates).innerJoin(targets, eq(targets.key, estimates.targetKey)).innerJoin(observables, eq(observables.id, targets.observableId))
      .where(eq(estimates.entryId, b.id));
    expect(rows.length).toBeGreaterThan(0);
    for (const r of rows) {
      // |<O>| <= sum |c| = bound (common practice): a stated bound above it carries no information
      expect(r.u).toBeLessThanOrEqual(r.bound);
      const raw = r.raw as { truncatedWeight: number };
      expect(r.u).toBe(Math.min(raw.truncatedWeight, r.bound));
    }
  });

  it('agreement of an entry is the median |d|/U over unverifiable targets', async () => {
    const r = await agent(t).get('/api/challenges/st-chain/standings');
    const d = r.body.entries.find((e: any) => e.label === 'entry D');
    const targetsR = (await agent(t).get('/api/challenges/st-chain/targets')).body.targets;
    const ratios = [2, 3].map((k) => {
      const ms = Object.values(NUMBERS).map((nums) => ({ value: nums[k][0], uncertainty: nums[k][1] }));
      const c = consensus(ms, 'random-effects-dl');
      const doe = degreesOfEquivalence(ms, c)[3];
      expect(targetsR[k].consensus).toBeTruthy();
      return Math.abs(doe.d) / doe.U;
    }).sort((a, b) => a - b);
    expect(d.metrics.agreementMedianRatio).toBeCloseTo((ratios[0] + ratios[1]) / 2, 12);
  });

  it('filters by track, reranks, validates the query and reconstructs a past date', async () => {
    const hw = await agent(t).get('/api/challenges/st-chain/standings?track=hardware');
    expect(hw.body.entries.map((e: any) => [e.label, e.rank])).toEqual([['entry D', 1]]);
    const bad = await agent(t).get('/api/challenges/st-chain/standings?metric=speed');
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toContain('metric must be one of');
    const past = await agent(t).get('/api/challenges/st-chain/standings?asOf=2000-01-01');
    // before the first standings row there is nothing to wait for: 'none', not 'pending' (the page would poll forever)
    expect(past.body).toMatchObject({ status: 'none', entries: [] });
    const etag = hw.headers.etag;
    const again = await agent(t).raw.get('/api/challenges/st-chain/standings?track=hardware').set('If-None-Match', etag);
    expect(again.status).toBe(304);
  });

  it('serves the pairwise agreement for a target', async () => {
    const r = await agent(t).get(`/api/challenges/st-chain/agreement?target=${encodeURIComponent(keys[3])}`);
    expect(r.status).toBe(200);
    const i = r.body.entries.findIndex((e: any) => e.label === 'entry A');
    const j = r.body.entries.findIndex((e: any) => e.label === 'entry D');
    expect(r.body.d[i][j]).toBeCloseTo(0.30 - 0.10, 12);
    expect(r.body.U[i][j]).toBeCloseTo(2 * Math.hypot(0.05, 0.01), 12);
    const avg = await agent(t).get('/api/challenges/st-chain/agreement');
    expect(avg.body.mode).toBe('average-unverifiable');
    expect(avg.body.meanRatio.length).toBe(avg.body.entries.length);
  });

  it('an entry page carries each estimate\'s scores: error and z against the reference, d and U against the consensus', async () => {
    const r = await agent(t).get(`/api/entries/${ids.A}`);
    expect(r.status).toBe(200);
    const refs = (await agent(t).get('/api/challenges/st-chain/targets')).body.targets;
    const byKey = new Map(r.body.scores.map((x: any) => [x.target, x]));
    const s0 = byKey.get(keys[0]) as any;
    expect(s0.reference.error).toBeCloseTo(NUMBERS.A[0][0] - refs[0].reference.value, 12);
    expect(s0.reference.z).toBeCloseTo((NUMBERS.A[0][0] - refs[0].reference.value) / NUMBERS.A[0][1], 9);
    const s3 = byKey.get(keys[3]) as any;
    expect(s3.reference).toBeNull();
    const c = refs[3].consensus;
    expect(s3.consensus.d).toBeCloseTo(NUMBERS.A[3][0] - c.value, 12);
    // included entry: u^2(d) = u^2 + tau^2 - u^2(y) (SCORING.md, degrees of equivalence)
    expect(s3.consensus.U).toBeCloseTo(2 * Math.sqrt(NUMBERS.A[3][1] ** 2 + c.tau2 - c.uncertainty ** 2), 12);
  });
});
