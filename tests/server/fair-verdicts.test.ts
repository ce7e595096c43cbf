/**
 * Fair verdicts (issue 11), played through the API: a small challenge with twelve targets, six
 * with exact references and six treated as unknown (their exact values kept here as the truth),
 * and the kinds of entry that used to game the standings:
 * - honest: truth + noise of size 0.01, u = 0.01 (two teams: "honest" and "careful", u = 0.003);
 * - mediocre: truth + noise of size 0.03 with honest u = 0.03, and "inflated": the same values
 *   claiming u = 10;
 * - partial: the two easiest targets only, exactly (u = 0);
 * - exact: every target to the last bits (values off by a few ulps) with u = 0;
 * - sybil: one team, four near-copies (1e-11 apart) of biased values (truth + 0.05, u = 0.005);
 * - solo: one target nobody else answers, 0.5 off the truth;
 * - the house baseline.
 * All numbers are invented for this test (the noise is a fixed list, not drawn).
 */
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { desc, eq } from 'drizzle-orm';
import { agent, makeTestApp, setRole, signUpVerified, type TestApp } from './helpers';
import { startWorker, type Worker } from '../../server/jobs/worker';
import { entries, estimates, organization, targets, references, standings } from '../../server/db/schema';
import { recomputeStandings, rescoreOutdatedStandings } from '../../server/services/recompute-standings';
import { PREVIOUS_SCORING_RULES_VERSION, SCORING_RULES_VERSION } from '../../shared/scoring/rules';

let t: TestApp;
let worker: Worker;
const SPEC = {
  id: 'fair-game', version: 1, title: 'Fair verdicts game', description: 'twelve targets, honest and gaming entries',
  lattice: { kind: 'chain', n: 6 },
  circuit: { family: 'kicked-ising', steps: [1, 2, 3], thetaH: [0.3, 0.7] },
  observables: [{ id: 'z2', pauli: 'Z2' }, { id: 'x3', pauli: 'X3' }],
};
// fixed pseudo-noise in [-1, 1] (invented)
const NOISE = [0.31, -0.72, 0.15, 0.88, -0.43, 0.05, -0.97, 0.64, -0.21, 0.49, -0.58, 0.27];
const places: Record<string, Record<string, string>> = {};

let keys: string[] = [];
const truth: Record<string, number> = {};
let solo = '';

beforeAll(async () => {
  t = await makeTestApp();
  const mod = await signUpVerified(t, 'mod@fair.test');
  await setRole(t, 'mod@fair.test', 'moderator');
  worker = await startWorker(t.database.db, t.ctx.log, { pollMs: 100 });
  t.ctx.jobs.kick = () => worker.kick();
  expect((await mod.post('/api/challenges', SPEC)).status).toBe(201);
  expect((await mod.post('/api/challenges/fair-game/publish', {})).status).toBe(200);
  for (let i = 0; i < 300 && (await t.database.db.query.jobs.findMany()).some((j) => j.state !== 'done' && j.state !== 'failed'); i++) { await worker.idle(); await new Promise((r) => setTimeout(r, 100)); }
  const db = t.database.db;
  const tg = await db.select({ id: targets.id, key: targets.key, versionId: targets.versionId, value: references.value }).from(targets).innerJoin(references, eq(references.targetId, targets.id)).orderBy(targets.key);
  keys = tg.map((x) => x.key);
  expect(keys).toHaveLength(12);
  for (const x of tg) truth[x.key] = x.value as number;
  // every other target becomes unverifiable (as if no exact method existed); the truth is kept here
  const unverifiable = tg.filter((_, i) => i % 2 === 1);
  for (const x of unverifiable) await db.update(references).set({ value: null, method: 'none', reason: 'test: treated as unknown' }).where(eq(references.targetId, x.id));
  solo = unverifiable[unverifiable.length - 1].key;
  const common = keys.filter((k) => k !== solo);
  const verifiable = tg.filter((_, i) => i % 2 === 0).map((x) => x.key);
  const easiest = verifiable.slice(0, 2);
  const ulps = (x: number, n: number) => x + n * Math.max(Math.abs(x), 1) * 2 ** -52;
  const game: Record<string, { team: string; est: [string, number, number][] }> = {
    honest: { team: 'team-honest', est: common.map((k, i) => [k, truth[k] + 0.01 * NOISE[i], 0.01]) },
    careful: { team: 'team-careful', est: common.map((k, i) => [k, truth[k] + 0.003 * NOISE[(i + 5) % 12], 0.003]) },
    mediocre: { team: 'team-mediocre', est: common.map((k, i) => [k, truth[k] + 0.03 * NOISE[(i + 3) % 12], 0.03]) },
    inflated: { team: 'team-inflated', est: common.map((k, i) => [k, truth[k] + 0.03 * NOISE[(i + 3) % 12], 10]) },
    partial: { team: 'team-partial', est: easiest.map((k) => [k, truth[k], 0]) },
    exact: { team: 'team-exact', est: common.map((k, i) => [k, ulps(truth[k], (i % 3) - 1), 0]) },
    sybil1: { team: 'team-sybil', est: common.map((k, i) => [k, truth[k] + 0.05 + 0.002 * NOISE[i], 0.005]) },
    sybil2: { team: 'team-sybil', est: common.map((k, i) => [k, truth[k] + 0.05 + 0.002 * NOISE[i] + 1e-11, 0.005]) },
    sybil3: { team: 'team-sybil', est: common.map((k, i) => [k, truth[k] + 0.05 + 0.002 * NOISE[i] + 2e-11, 0.005]) },
    sybil4: { team: 'team-sybil', est: common.map((k, i) => [k, truth[k] + 0.05 + 0.002 * NOISE[i] - 1e-11, 0.005]) },
    solo: { team: 'team-solo', est: [[solo, truth[solo] + 0.5, 0.01]] },
  };
  let n = 0;
  for (const team of new Set(Object.values(game).map((g) => g.team))) await db.insert(organization).values({ id: team, name: team, slug: team });
  for (const [name, g] of Object.entries(game)) {
    const id = randomUUID();
    await db.insert(entries).values({ id, lineageId: id, challengeSlug: 'fair-game', versionId: tg[0].versionId, teamId: g.team, state: 'published', track: 'classical', methodFamily: 'other', label: `entry ${name}`, document: { resources: { cpuCoreHours: 1 } }, submittedAt: new Date(Date.UTC(2026, 10, 1) + n * 1000), publishedAt: new Date() });
    await db.insert(estimates).values(g.est.map(([targetKey, value, uncertainty]) => ({ entryId: id, targetKey, value, uncertainty, kind: uncertainty === 0 ? 'none' : 'statistical' })));
    n++;
  }
  await recomputeStandings(db, tg[0].versionId, new Date());
}, 120_000);
afterAll(async () => {
  // the places, for the report (before / after the change)
  console.log(JSON.stringify(places, null, 1));
  await worker.stop();
  await t.close();
});

const nameOf = (e: { label: string; isBaseline: boolean }) => (e.isBaseline ? 'baseline' : e.label.replace('entry ', ''));

async function standingsFor(metric?: string) {
  const r = await agent(t).get(`/api/challenges/fair-game/standings${metric ? `?metric=${metric}` : ''}`);
  expect(r.status).toBe(200);
  const rows = r.body.entries as any[];
  places[metric ?? 'default'] = Object.fromEntries(rows.map((e) => [nameOf(e), e.rank === null || e.rank === undefined ? 'not ranked' : String(e.rank)]));
  return r.body;
}

const by = (body: any) => new Map<string, any>((body.entries as any[]).map((e) => [nameOf(e), e]));

describe('fair verdicts: a small game through the API', () => {
  it('records the places under every metric; ranks are 1..n with a rank interval that contains the rank', async () => {
    for (const m of [undefined, 'crps-verifiable', 'agreement']) {
      const body = await standingsFor(m);
      expect(body.scoringRulesVersion).toBe(SCORING_RULES_VERSION);
      const ranked = (body.entries as any[]).filter((e) => e.rank !== null);
      expect(ranked.map((e) => e.rank)).toEqual(ranked.map((_, i) => i + 1));
      for (const e of ranked) {
        expect(e.rankInterval[0]).toBeLessThanOrEqual(e.rankInterval[1]);
        expect(e.rankInterval[0]).toBeGreaterThanOrEqual(1);
        expect(e.rankInterval[1]).toBeLessThanOrEqual(ranked.length);
        expect(e.rulesVersion).toBe(SCORING_RULES_VERSION);
      }
    }
  });

  it('partial: ranks below every complete entry that is as good on its two targets; coverage 2 of 11 is shown', async () => {
    const r = by(await standingsFor());
    const p = r.get('partial');
    expect(p.coverage.overall).toEqual({ answered: 2, ranked: 11 });
    for (const n of ['honest', 'careful', 'exact', 'mediocre']) expect(r.get(n).rank, n).toBeLessThan(p.rank);
    expect(r.get('exact').coverage.overall).toEqual({ answered: 11, ranked: 11 });
  });

  it('inflated: claiming u = 10 on the same values ranks below the honest u, under every metric', async () => {
    for (const m of [undefined, 'crps-verifiable', 'agreement']) {
      const r = by(await standingsFor(m));
      expect(r.get('inflated').rank, String(m)).toBeGreaterThan(r.get('mediocre').rank);
    }
  });

  it('exact with rounding noise: covered on every verifiable target, z finite, first on the exact references', async () => {
    const r = by(await standingsFor('crps-verifiable'));
    const x = r.get('exact');
    expect(x.metrics.coveredVerifiable).toBe(1);
    expect(Number.isFinite(x.metrics.meanZ2Verifiable)).toBe(true);
    expect(x.rank).toBe(1);
    expect(x.metrics.scoreVerifiable).toBeLessThan(1e-14);
  });

  it('sybil: four near-copies count once in the consensus and are flagged as one team; the careful entry is not pushed below them', async () => {
    const body = await standingsFor('agreement');
    const r = by(body);
    const tg = (await agent(t).get('/api/challenges/fair-game/targets')).body.targets as any[];
    const unv = tg.filter((x) => x.reference.status !== 'exact' && x.key !== solo);
    expect(unv.length).toBe(5);
    // six teams answered (honest, careful, mediocre, inflated, exact, sybil): six results, one per team;
    // the sybil team's three older copies and the baseline are listed as not included
    const sybilIds = ['sybil1', 'sybil2', 'sybil3'].map((n) => r.get(n).id);
    for (const x of unv) {
      expect(x.consensus.teams).toBe(6);
      expect(x.consensus.includedCount).toBe(6);
      expect(x.consensus.excluded).toEqual(expect.arrayContaining(sybilIds));
      expect(x.consensus.excluded).not.toContain(r.get('sybil4').id);
    }
    for (const n of ['sybil1', 'sybil2', 'sybil3', 'sybil4']) expect(r.get('careful').rank).toBeLessThan(r.get(n).rank);
    // near-copies across teams, for review: mediocre and inflated post the same values (the sybil
    // copies are one team's, which the consensus already counts once)
    expect(body.nearCopies.map((x: any) => [x.teamA, x.teamB].sort())).toEqual([['team-inflated', 'team-mediocre']]);
  });

  it('solo: its target has no consensus and is not ranked; the solo entry, with nothing ranked answered, is last', async () => {
    const body = await standingsFor();
    const r = by(body);
    const tg = (await agent(t).get('/api/challenges/fair-game/targets')).body.targets as any[];
    const st = tg.find((x) => x.key === solo);
    expect(st.consensus.value).toBeNull();
    expect(st.consensus.ranked).toBe(false);
    expect(r.get('solo').coverage.overall.answered).toBe(0);
    expect(r.get('solo').rank).toBe(Math.max(...(body.entries as any[]).filter((e) => e.rank !== null).map((e) => e.rank)));
  });

  it('house baseline: listed as an unranked reference row, bound capped at the observable bound, never in the consensus', async () => {
    const body = await standingsFor();
    const b = (body.entries as any[]).find((e) => e.isBaseline);
    expect(b.rank).toBeNull();
    expect(b.isReference).toBe(true);
    expect(b.bound.max).toBeLessThanOrEqual(1);
    const tg = (await agent(t).get('/api/challenges/fair-game/targets')).body.targets as any[];
    for (const x of tg.filter((y) => y.consensus.value !== null)) expect(x.consensus.excluded).toContain(b.id);
  });

  it('an entry page scores the exact entry as covered with its rules version', async () => {
    const r = by(await standingsFor());
    const page = await agent(t).get(`/api/entries/${r.get('exact').id}`);
    expect(page.status).toBe(200);
    expect(page.body.scoringRulesVersion).toBe(SCORING_RULES_VERSION);
    const withRef = (page.body.scores as any[]).filter((x) => x.reference);
    expect(withRef.length).toBe(6);
    for (const x of withRef) {
      expect(x.reference.covered).toBe(true);
      expect(x.reference.crps).toBeLessThan(1e-14);
    }
  });

  it('a change of the scoring rules is a rescoring: standings recomputed, history says "Scoring rules X -> Y"', async () => {
    const db = t.database.db;
    // as if the newest row had been computed under the previous rules
    const [latest] = await db.select({ id: standings.id }).from(standings).orderBy(desc(standings.computedAt)).limit(1);
    await db.update(standings).set({ scoringRulesVersion: PREVIOUS_SCORING_RULES_VERSION }).where(eq(standings.id, latest.id));
    const stale = await agent(t).get('/api/challenges/fair-game/standings?track=classical');
    expect(stale.body.status).toBe('rescoring');
    expect((await rescoreOutdatedStandings(db)).length).toBe(1);
    worker.kick();
    for (let i = 0; i < 100 && (await db.query.jobs.findMany()).some((j) => j.state !== 'done' && j.state !== 'failed'); i++) { await worker.idle(); await new Promise((r) => setTimeout(r, 100)); }
    const h = await agent(t).get('/api/challenges/fair-game/history');
    const ev = (h.body.events as any[]).find((e) => e.kind === 'rescoring');
    expect(ev.summary).toContain(`Scoring rules ${PREVIOUS_SCORING_RULES_VERSION} -> ${SCORING_RULES_VERSION}`);
    expect(await rescoreOutdatedStandings(db)).toEqual([]);
  });
});

describe('one planner, one configured budget', () => {
  it('/plan and the authoring preview plan with REFERENCE_* budget the reference job uses', async () => {
    // a budget too small for any exact method: the public plan must not promise one
    const small = await makeTestApp({ referenceBudget: { secondsPerTarget: 1e-12, coneQubitLimit: 1, tnThreads: 1 } });
    try {
      const mod = await signUpVerified(small, 'mod@plan.test');
      await setRole(small, 'mod@plan.test', 'moderator');
      const spec = { ...SPEC, id: 'plan-budget', title: 'Plan budget' };
      const preview = await mod.post('/api/challenges/preview', spec);
      expect(preview.status, preview.text).toBe(200);
      expect(preview.body.plans.every((p: any) => p.method === null)).toBe(true);
      expect((await mod.post('/api/challenges', spec)).status).toBe(201);
      expect((await mod.post('/api/challenges/plan-budget/publish', {})).status).toBe(200);
      const plan = await agent(small).get('/api/challenges/plan-budget/plan');
      expect(plan.status).toBe(200);
      expect(plan.body.plans.every((p: any) => p.method === null && typeof p.reason === 'string')).toBe(true);
      // the default budget of the same server code plans exact methods for this small chain
      const open = await agent(t).get('/api/challenges/fair-game/plan');
      expect(open.body.plans.every((p: any) => p.method !== null)).toBe(true);
    } finally {
      await small.close();
    }
  }, 60_000);
});
