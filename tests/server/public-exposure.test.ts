/**
 * What the public may see (RELIABILITY.md item 20): entries in review, returned or rejected never
 * appear; e-mail addresses never appear; sealed references never leak before their date and
 * appear after it; CSV exports escape formula-like text; BibTeX and CITATION.cff carry their fields.
 *
 * The sealed world: every reference of the challenge is sealed after the house baseline (exact on
 * this 5-qubit chain) has been published. Every public route of the route table is called (the list
 * is derived from t.routes, so a new public route is covered without editing this file; a route
 * whose path parameters the test cannot fill fails the test), with every entry page and every
 * target, team, instance and job; no sealed value may appear in any response before the date, in
 * any formatting (every number in the text is compared with the sealed values to its printed
 * precision), and every one appears after it (issue 12 item 2).
 */
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { agent, makeTestApp, ORIGIN, setRole, signUpVerified, type Agent, type TestApp } from './helpers';
import { startWorker, type Worker } from '../../server/jobs/worker';
import { entries, estimates, jobs, member, organization, references, targets, user } from '../../server/db/schema';
import { recomputeStandings } from '../../server/services/recompute-standings';
import { csvCell } from '../../server/routes/exports';

let t: TestApp;
let worker: Worker;
let versionId = '';
let sealedKey = '';
let sealedValue = 0;
let checksum = '';
let baselineId = '';
let mod: Agent;
let competingMod: Agent;
let sealedUntil: Date;
/** the sealed values a leak would show: every exact reference of the challenge that is not a short number like 0 or 1 */
let secrets: { key: string; value: number }[] = [];
const SPEC = { id: 'pub-chain', version: 1, title: 'Public chain {test} & 100%', description: 'exposure', license: 'CC-BY-4.0', lattice: { kind: 'chain', n: 5 }, circuit: { family: 'kicked-ising', steps: [1, 2], thetaH: [0.3, 0.7] }, observables: [{ id: 'z2', pauli: 'Z2' }] };
const states = ['published', 'in-review', 'returned', 'rejected', 'draft'] as const;
const ids: Record<string, string> = {};
/** Query variants of some routes (each route is also called without a query). */
const QUERIES: Record<string, string[]> = {
  '/challenges/:slug/export.csv': ['?table=standings'],
  '/challenges/:slug/standings': ['?view=private', '?track=classical'],
  '/challenges/:slug/estimates': ['?raw=0'],
};

/**
 * Every public GET route of the route table with its path parameters filled in every way the world
 * allows (every entry, target, instance, team, job), plus the query variants above. A parameter the
 * test does not know fails here: add it when a route with a new parameter becomes public.
 */
async function publicUrls(): Promise<string[]> {
  const db = t.database.db;
  const [tg, es, teams, js] = await Promise.all([
    db.select({ key: targets.key }).from(targets).where(eq(targets.versionId, versionId)),
    db.select({ id: entries.id }).from(entries),
    db.select({ id: organization.id }).from(organization),
    db.select({ id: jobs.id }).from(jobs),
  ]);
  const values: Record<string, string[]> = {
    slug: ['pub-chain'], entryId: es.map((e) => e.id), targetKey: tg.map((x) => x.key), teamId: teams.map((x) => x.id), jobId: js.map((j) => j.id),
    instanceKey: [...new Set(tg.map((x) => x.key.split(':')[0]))],
  };
  const urls: string[] = [];
  for (const d of t.routes.defs.filter((r) => r.access === 'public' && r.method === 'get')) {
    let paths = [d.path];
    for (const param of d.path.match(/:\w+/g) ?? []) {
      const name = param.slice(1);
      expect(values[name], `no values for ${param} of the public route ${d.path}: teach the exposure test this parameter`).toBeDefined();
      paths = paths.flatMap((p) => values[name].map((v) => p.replace(param, encodeURIComponent(v))));
    }
    for (const p of paths) for (const q of ['', ...(QUERIES[d.path] ?? [])]) urls.push(`/api${p}${q}`);
  }
  for (const key of values.targetKey) urls.push(`/api/challenges/pub-chain/agreement?target=${encodeURIComponent(key)}`);
  return urls;
}

/** The text of every public response (GET routes from the table, and the public dry run with a full sweep). */
async function allPublic(a: Agent = agent(t), { ok = false } = {}): Promise<string> {
  const urls = await publicUrls();
  expect(urls.length).toBeGreaterThan(40);
  const bodies = await Promise.all(urls.map(async (p) => {
    const r = await a.get(p);
    expect(r.status, p).toBeLessThan(500);
    if (ok && !p.includes('/jobs/') && !p.match(/\/entries\/[^/]+(\/|$)/)) expect(r.status, p).toBe(200);
    return r.text;
  }));
  // the public POST routes: the dry run (called below with a document answering every target) and
  // the one-click unfollow (it takes a token and answers with the subject only: called below too)
  const posts = t.routes.defs.filter((r) => r.access === 'public' && r.method !== 'get').map((r) => r.path).sort();
  expect(posts).toEqual(['/entries/validate', '/follows/unfollow']);
  const unfollow = await a.raw.post('/api/follows/unfollow').set('Origin', ORIGIN).set('Content-Type', 'application/json').send(JSON.stringify({ token: 'not-a-token' }));
  expect(unfollow.status).toBeLessThan(500);
  bodies.push(unfollow.text);
  const doc = { challenge: { id: 'pub-chain', version: 1, checksum: `sha256:${checksum}` }, track: 'classical', label: 'dry', method: { family: 'other' }, estimates: secrets.map((x) => ({ target: x.key, value: 0.25, uncertainty: 0.01, uncertaintyKind: 'statistical' })) };
  const dry = await a.raw.post('/api/entries/validate').set('Origin', ORIGIN).set('Content-Type', 'application/json').send(JSON.stringify(doc));
  expect(dry.status, dry.text).toBe(200);
  return [...bodies, dry.text].join('\n');
}

/**
 * The sealed values found in a text, in any formatting: every number written with at least 6
 * significant digits that equals a sealed value to the precision it is written with (toFixed,
 * toPrecision, the shortest round-trip form), or within 1e-9 of it (the baseline's near-exact value).
 */
function leaks(text: string): string[] {
  const found = new Set<string>();
  for (const m of text.matchAll(/-?\d+(?:\.\d+)?(?:[eE][-+]?\d+)?/g)) {
    const tok = m[0];
    const digits = tok.replace(/^-/, '').replace(/[eE].*$/, '').replace('.', '').replace(/^0+/, '');
    const x = Number(tok);
    // expectation values are bounded by the observable's bound (1 here): larger numbers are ids, dates, counts
    if (digits.length < 6 || !(Math.abs(x) <= 1)) continue;
    const decimals = (tok.replace(/[eE].*$/, '').split('.')[1] ?? '').length - Number(tok.match(/[eE]([-+]?\d+)$/)?.[1] ?? 0);
    for (const s of secrets) if (Math.abs(x - s.value) <= Math.max(0.5 * 10 ** -decimals, 1e-9)) found.add(s.key);
  }
  return [...found].sort();
}

beforeAll(async () => {
  t = await makeTestApp();
  mod = await signUpVerified(t, 'secret-mod@p.test', 'Mod');
  await setRole(t, 'secret-mod@p.test', 'moderator');
  worker = await startWorker(t.database.db, t.ctx.log, { now: t.ctx.now, pollMs: 100 });
  t.ctx.jobs.kick = () => worker.kick();
  expect((await mod.post('/api/challenges', SPEC)).status).toBe(201);
  const pub = await mod.post('/api/challenges/pub-chain/publish', {});
  versionId = pub.body.versionId;
  checksum = pub.body.checksum;
  for (let i = 0; i < 300 && (await t.database.db.query.jobs.findMany()).some((j) => j.state !== 'done' && j.state !== 'failed'); i++) { await worker.idle(); await new Promise((r) => setTimeout(r, 100)); }
  const db = t.database.db;
  await db.insert(organization).values({ id: 'team-p', name: 'Team P', slug: 'team-p' });
  const tg = await db.select().from(targets).where(eq(targets.versionId, versionId)).orderBy(targets.key);
  for (const s of states) {
    const id = randomUUID();
    ids[s] = id;
    await db.insert(entries).values({ id, lineageId: id, challengeSlug: 'pub-chain', versionId, teamId: 'team-p', state: s, track: 'classical', methodFamily: 'other', label: s === 'published' ? '=HYPERLINK("http://evil.test")' : `secret ${s} entry`, document: {}, submittedAt: new Date(), publishedAt: s === 'published' ? new Date() : null });
    await db.insert(estimates).values(tg.map((x) => ({ entryId: id, targetKey: x.key, value: s === 'published' ? 0.5 : 0.123456789, uncertainty: 0.01, kind: 'statistical' })));
  }
  // seal every reference until a future date, after the house baseline was published (through the API)
  const [bl] = await db.select({ id: entries.id }).from(entries).where(eq(entries.isBaseline, true));
  baselineId = bl.id;
  sealedUntil = new Date(t.clock.now.getTime() + 86400_000);
  expect((await mod.post('/api/challenges/pub-chain/seal', { targets: 'all', until: sealedUntil.toISOString() })).status).toBe(200);
  const refs = await db.select({ key: targets.key, value: references.value }).from(references).innerJoin(targets, eq(targets.id, references.targetId)).where(eq(targets.versionId, versionId)).orderBy(targets.key);
  secrets = refs.filter((r) => r.value !== null && String(Math.abs(r.value)).replace(/^0\.?0*/, '').length >= 6).map((r) => ({ key: r.key, value: r.value! }));
  sealedKey = secrets[0].key;
  sealedValue = secrets[0].value;
  // the baseline's estimates are the sealed values (to 1e-9): the entry page is where they leaked
  const be = await db.select({ target: estimates.targetKey, value: estimates.value }).from(estimates).where(eq(estimates.entryId, baselineId));
  expect(be.filter((x) => secrets.some((s) => s.key === x.target && Math.abs(s.value - x.value) < 1e-9)).length).toBe(secrets.length);
  await t.ctx.applyEffects((await recomputeStandings(db, versionId, t.clock.now)).effects);
  // a moderator who is also a member of a team: competes, so sees what the public sees
  competingMod = await signUpVerified(t, 'competing-mod@p.test', 'Competing Mod');
  await setRole(t, 'competing-mod@p.test', 'moderator');
  const [cu] = await db.select({ id: user.id }).from(user).where(eq(user.email, 'competing-mod@p.test'));
  await db.insert(member).values({ id: randomUUID(), organizationId: 'team-p', userId: cu.id, role: 'member' });
}, 120_000);
afterAll(async () => { await worker.stop(); await t.close(); });

describe('public exposure', () => {
  it('shows only published entries, and no e-mail address, on every public endpoint', async () => {
    const all = await allPublic();
    expect(all).toContain(ids.published);
    for (const s of states.filter((x) => x !== 'published')) {
      expect(all).not.toContain(ids[s]);
      expect(all).not.toContain(`secret ${s} entry`);
    }
    expect(all).not.toContain('0.123456789');
    expect(all).not.toMatch(/@p\.test/);
  });

  it('never shows a sealed value before its date on any public route or entry page, and shows each after it', async () => {
    expect(secrets.length).toBeGreaterThanOrEqual(3);
    const before = await agent(t).get('/api/challenges/pub-chain/targets');
    const sealed = before.body.targets.find((x: any) => x.key === sealedKey);
    expect(sealed.reference).toEqual({ status: 'sealed', sealedUntil: sealedUntil.toISOString() });
    // the house baseline's page: its estimates of sealed targets are withheld, and it says so
    const page = await agent(t).get(`/api/entries/${baselineId}`);
    expect(page.status).toBe(200);
    expect(page.body.document.estimates.map((x: any) => x.target)).not.toContain(sealedKey);
    expect(page.body.withheld).toMatchObject({ estimates: expect.any(Number), until: sealedUntil.toISOString() });
    expect(leaks(page.text)).toEqual([]);
    expect(leaks(await allPublic(agent(t), { ok: true }))).toEqual([]);
    // a moderator in a team competes: nothing sealed either, not even the private standings view
    expect(leaks(await allPublic(competingMod))).toEqual([]);
    expect((await competingMod.get('/api/challenges/pub-chain/standings?view=private')).body.view).toBe('public');
    // a moderator in no team may see them before the date (PRODUCT.md: moderators seal for blind rounds)
    expect((await mod.get('/api/challenges/pub-chain/standings?view=private')).body.view).toBe('private');
    const modTargets = await mod.get('/api/challenges/pub-chain/targets');
    expect(modTargets.body.targets.find((x: any) => x.key === sealedKey).reference).toMatchObject({ status: 'exact', value: sealedValue, sealedUntil: sealedUntil.toISOString() });
    expect(leaks((await mod.get(`/api/entries/${baselineId}`)).text)).toEqual(secrets.map((x) => x.key).sort());

    t.clock.advance(2 * 86400_000);
    await t.ctx.applyEffects((await recomputeStandings(t.database.db, versionId, t.clock.now)).effects);
    const after = await agent(t).get('/api/challenges/pub-chain/targets');
    expect(after.body.targets.find((x: any) => x.key === sealedKey).reference).toMatchObject({ status: 'exact', value: sealedValue });
    expect(leaks((await agent(t).get(`/api/entries/${baselineId}`)).text)).toEqual(secrets.map((x) => x.key).sort());
    expect((await agent(t).get(`/api/entries/${baselineId}`)).body.withheld).toBeNull();
    expect(leaks(await allPublic())).toEqual(secrets.map((x) => x.key).sort());
    t.clock.advance(-2 * 86400_000);
  });

  it('finds a sealed value in every formatting the API uses (the detector itself)', () => {
    const v = secrets[0].value;
    for (const text of [JSON.stringify({ v }), String(v), v.toPrecision(8), v.toFixed(7), `${v.toExponential(9)}`, `x,${v.toPrecision(12)},y`, String(v + 3e-10)]) expect(leaks(text), text).toEqual([secrets[0].key]);
    for (const text of [v.toPrecision(4), String(v + 1e-4), '0.5', ids.published]) expect(leaks(text), text).toEqual([]);
  });

  it('escapes formula-like text in CSV exports but keeps numbers', async () => {
    const r = await agent(t).get('/api/challenges/pub-chain/export.csv');
    expect(r.headers['content-type']).toContain('text/csv');
    expect(r.text).toContain(`"'=HYPERLINK(""http://evil.test"")"`);
    expect(r.text.split('\r\n')[0]).toBe('target,entry_id,label,team,track,value,uncertainty,uncertainty_kind,reference,reference_method,consensus,consensus_uncertainty');
    // OWASP CSV injection guidance (common practice): = + - @ tab CR at the start of text are neutralised
    for (const s of ['=1+1', '+1', '-1+2', '@SUM(A1)', '\tx', '\rx']) expect(csvCell(s).replace(/^"/, '').startsWith("'")).toBe(true);
    expect(csvCell(-0.25)).toBe('-0.25');
    expect(csvCell('a,b')).toBe('"a,b"');
  });

  it('gives BibTeX and CITATION.cff with the version, checksum and licence', async () => {
    const c = await agent(t).get('/api/challenges/pub-chain');
    const bib = await agent(t).get('/api/challenges/pub-chain/cite.bib');
    expect(bib.text).toMatch(/^@misc\{parallax-pub-chain-v1,/);
    expect(bib.text).toContain(c.body.version.checksum);
    expect(bib.text).toContain('Public chain test \\& 100\\%'); // braces dropped, & and % escaped
    const cff = await agent(t).get('/api/challenges/pub-chain/CITATION.cff');
    expect(cff.text).toMatch(/^cff-version: 1\.2\.0\n/);
    expect(cff.text).toContain('title: "Public chain {test} & 100%"');
    expect(cff.text).toContain('license: "CC-BY-4.0"');
    expect(cff.text).toContain(`value: "sha256:${c.body.version.checksum}"`);
    const e = await agent(t).get(`/api/entries/${ids.published}/cite.bib`);
    expect(e.status).toBe(200);
    expect(e.text).toContain('author       = {{Team P}}');
    expect((await agent(t).get(`/api/entries/${ids['in-review']}/cite.bib`)).status).toBe(404);
  });

  it('the data package lists each file with the SHA-256 of what the server serves', async () => {
    const p = await agent(t).get('/api/challenges/pub-chain/package.json');
    expect(p.body.resources.length).toBe(6);
    for (const f of p.body.resources) {
      const got = await agent(t).get(new URL(f.path).pathname + new URL(f.path).search);
      const { createHash } = await import('node:crypto');
      expect(`sha256:${createHash('sha256').update(got.text).digest('hex')}`, f.name).toBe(f.hash);
      expect(Buffer.byteLength(got.text)).toBe(f.bytes);
    }
  });
});
