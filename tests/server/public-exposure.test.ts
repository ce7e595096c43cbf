/**
 * What the public may see (RELIABILITY.md item 20): entries in review, returned or rejected never
 * appear; e-mail addresses never appear; sealed references never leak before their date and
 * appear after it; CSV exports escape formula-like text; BibTeX and CITATION.cff carry their fields.
 */
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { agent, makeTestApp, setRole, signUpVerified, type TestApp } from './helpers';
import { startWorker, type Worker } from '../../server/jobs/worker';
import { entries, estimates, organization, references, targets } from '../../server/db/schema';
import { recomputeStandings } from '../../server/services/recompute-standings';
import { csvCell } from '../../server/routes/exports';

let t: TestApp;
let worker: Worker;
let versionId = '';
let sealedKey = '';
let sealedValue = 0;
const SPEC = { id: 'pub-chain', version: 1, title: 'Public chain {test} & 100%', description: 'exposure', license: 'CC-BY-4.0', lattice: { kind: 'chain', n: 5 }, circuit: { family: 'kicked-ising', steps: [1, 2], thetaH: [0.3] }, observables: [{ id: 'z2', pauli: 'Z2' }] };
const states = ['published', 'in-review', 'returned', 'rejected', 'draft'] as const;
const ids: Record<string, string> = {};
const PUBLIC_PATHS = ['/api/challenges', '/api/challenges/pub-chain', '/api/challenges/pub-chain/targets', '/api/challenges/pub-chain/standings', '/api/challenges/pub-chain/estimates',
  '/api/challenges/pub-chain/agreement', '/api/challenges/pub-chain/history', '/api/challenges/pub-chain/export.csv', '/api/challenges/pub-chain/export.csv?table=standings',
  '/api/challenges/pub-chain/export.json', '/api/challenges/pub-chain/package.json', '/api/teams', '/api/teams/team-p'];

async function allPublic(): Promise<string> {
  const bodies = await Promise.all(PUBLIC_PATHS.map(async (p) => { const r = await agent(t).get(p); expect(r.status, p).toBe(200); return r.text; }));
  return bodies.join('\n');
}

beforeAll(async () => {
  t = await makeTestApp();
  const mod = await signUpVerified(t, 'secret-mod@p.test', 'Mod');
  await setRole(t, 'secret-mod@p.test', 'moderator');
  worker = await startWorker(t.database.db, t.ctx.log, { now: t.ctx.now, pollMs: 100 });
  t.ctx.jobs.kick = () => worker.kick();
  expect((await mod.post('/api/challenges', SPEC)).status).toBe(201);
  const pub = await mod.post('/api/challenges/pub-chain/publish', {});
  versionId = pub.body.versionId;
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
  // seal one reference until a future date
  sealedKey = tg[1].key;
  const [ref] = await db.select().from(references).where(eq(references.targetId, tg[1].id));
  sealedValue = ref.value!;
  await db.update(references).set({ sealedUntil: new Date(Date.now() + 86400_000) }).where(eq(references.targetId, tg[1].id));
  await recomputeStandings(db, versionId);
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

  it('never shows a sealed reference before its date, and shows it after', async () => {
    const before = await agent(t).get('/api/challenges/pub-chain/targets');
    const sealed = before.body.targets.find((x: any) => x.key === sealedKey);
    expect(sealed.reference).toEqual({ status: 'sealed', sealedUntil: expect.any(String) });
    const all = await allPublic();
    expect(all).not.toContain(String(sealedValue));
    t.clock.advance(2 * 86400_000);
    await recomputeStandings(t.database.db, versionId, t.clock.now);
    const after = await agent(t).get('/api/challenges/pub-chain/targets');
    expect(after.body.targets.find((x: any) => x.key === sealedKey).reference).toMatchObject({ status: 'exact', value: sealedValue });
    t.clock.advance(-2 * 86400_000);
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
