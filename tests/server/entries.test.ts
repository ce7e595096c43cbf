import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { count, eq } from 'drizzle-orm';
import { agent, ORIGIN } from './helpers';
import { fullSweep, makeEntryWorld, type EntryWorld } from './entries-fixtures';
import { entries, estimates, jobs } from '../../server/db/schema';
import { publishEntry } from '../../server/services/publish-entry';

let w: EntryWorld;
beforeAll(async () => { w = await makeEntryWorld(); }, 120_000);
afterAll(async () => { if (process.env.SHOW_ERRORS) console.log(w.t.logs.filter((l) => l.includes('unhandled')).slice(0, 3).join('\n')); await w.worker.stop(); await w.t.close(); });

const entryCount = async () => (await w.t.database.db.select({ n: count() }).from(entries).where(eq(entries.isBaseline, false)))[0].n;
const estimateCount = async () => (await w.t.database.db.select({ n: count() }).from(estimates))[0].n;
const post = (body: unknown) => w.memberA.raw.post('/api/challenges/chain-12/entries').set('Origin', ORIGIN).set('Content-Type', 'application/json').send(typeof body === 'string' ? body : JSON.stringify(body));
const dry = (body: unknown) => request(w.t.app).post('/api/entries/validate').set('Content-Type', 'application/json').send(typeof body === 'string' ? body : JSON.stringify(body));
/** the problems of a 400, and a check that nothing was stored */
async function rejected(body: unknown, status = 400) {
  const before = [await entryCount(), await estimateCount()];
  const r = await post(body);
  expect(r.status, r.text).toBe(status);
  expect([await entryCount(), await estimateCount()]).toEqual(before);
  return r.body.error as { message: string; problems: { path: string; message: string }[] };
}
const mzIndex = () => w.targets.findIndex((x) => x.observable === 'mz');

describe('creating entries', () => {
  it('accepts a full-sweep entry as the JSON body, and gives it back unchanged', async () => {
    const doc = fullSweep(w);
    const r = await post(doc);
    expect(r.status, r.text).toBe(201);
    expect(r.body).toMatchObject({ state: 'draft', estimates: 60, coverage: { targets: 60, covered: 60, fraction: 1 }, warnings: [] });
    const g = await w.memberA.get(`/api/entries/${r.body.id}`);
    expect(g.status).toBe(200);
    expect(g.body.document).toEqual(doc);
    expect(g.body.team.id).toBe(w.teamA);
    // a draft is not public, and not visible to another team
    expect((await agent(w.t).get(`/api/entries/${r.body.id}`)).status).toBe(404);
    expect((await w.memberB.get(`/api/entries/${r.body.id}`)).status).toBe(404);
    expect((await w.mod.get(`/api/entries/${r.body.id}`)).status).toBe(200);
  });

  it('accepts a file upload in the multipart field "file"', async () => {
    const r = await w.memberA.raw.post('/api/challenges/chain-12/entries').set('Origin', ORIGIN).attach('file', Buffer.from(JSON.stringify(fullSweep(w))), 'entry.json');
    expect(r.status, r.text).toBe(201);
    expect(r.body.estimates).toBe(60);
    const wrongField = await w.memberA.raw.post('/api/challenges/chain-12/entries').set('Origin', ORIGIN).attach('document', Buffer.from('{}'), 'entry.json');
    expect(wrongField.status).toBe(400);
    expect(wrongField.body.error.message).toBe('Upload the entry document in the multipart field "file" (curl -F file=@entry.json), one file only.');
  });

  it('accepts a team API key (curl scripts), which implies its team and cannot post for another', async () => {
    const r = await request(w.t.app).post('/api/challenges/chain-12/entries').set('x-api-key', w.keyA).set('Content-Type', 'application/json').send(JSON.stringify(fullSweep(w)));
    expect(r.status, r.text).toBe(201);
    const [e] = await w.t.database.db.select().from(entries).where(eq(entries.id, r.body.id));
    expect(e.teamId).toBe(w.teamA);
    const other = await request(w.t.app).post(`/api/challenges/chain-12/entries?team=${w.teamB}`).set('x-api-key', w.keyA).send(fullSweep(w));
    expect(other.status).toBe(403);
    // curl -d without a Content-Type still works: the body is read as JSON text
    const form = await request(w.t.app).post('/api/challenges/chain-12/entries').set('x-api-key', w.keyA).set('Content-Type', 'application/x-www-form-urlencoded').send(JSON.stringify(fullSweep(w)));
    expect(form.status, form.text).toBe(201);
  });

  it('a visitor cannot create or submit; a user in several teams must say which', async () => {
    expect((await request(w.t.app).post('/api/challenges/chain-12/entries').set('Origin', ORIGIN).send(fullSweep(w))).status).toBe(401);
    const id = (await post(fullSweep(w))).body.id;
    expect((await agent(w.t).post(`/api/entries/${id}/submit`)).status).toBe(401);
    // the moderator is in no team
    const m = await w.mod.post('/api/challenges/chain-12/entries', fullSweep(w));
    expect(m.status).toBe(403);
    expect(m.body.error.message).toBe('Entries belong to teams and you are in none: create a team or accept an invitation first.');
    // lead A creates a second team: now ?team= is needed
    const t2 = (await w.leadA.post('/api/auth/organization/create', { name: 'Second team', slug: 'second-team' })).body.id;
    const r = await w.leadA.post('/api/challenges/chain-12/entries', fullSweep(w));
    expect(r.status).toBe(400);
    expect(r.body.error.message).toMatch(/^You are a member of 2 teams \(.*\): say which one this entry is for with \?team=<teamId>\.$/);
    expect((await w.leadA.post(`/api/challenges/chain-12/entries?team=${t2}`, fullSweep(w))).status).toBe(201);
  });
});

describe('the dry run', () => {
  it('returns the scores against the public exact references and stores nothing', async () => {
    const before = [await entryCount(), await estimateCount()];
    const r = await dry(fullSweep(w));
    expect(r.status, r.text).toBe(200);
    expect(r.body).toMatchObject({ valid: true, stored: false, estimates: 60, coverage: { covered: 60, targets: 60 } });
    expect(r.body.scores.exactReferences).toBe(60);
    expect(r.body.scores.sweep.verifiable).toMatchObject({ targets: 60, scored: 60, rmse: 0, fractionCovered: 1 });
    expect(r.body.scores.targets).toHaveLength(60);
    const off = fullSweep(w);
    off.estimates[1].value += 0.05; // an X5 target, exact value 0
    const r2 = await dry(off);
    expect(r2.status, r2.text).toBe(200);
    expect(r2.body.scores.sweep.verifiable.maxAbsError).toBeCloseTo(0.05, 12);
    expect(r2.body.scores.targets[1]).toMatchObject({ target: off.estimates[1].target, z: expect.closeTo(5, 9), covered: false });
    expect([await entryCount(), await estimateCount()]).toEqual(before);
  });

  it('returns the validation errors with their field paths and stores nothing', async () => {
    const before = [await entryCount(), await estimateCount()];
    const bad = fullSweep(w);
    bad.estimates[2] = { ...bad.estimates[2], uncertainty: -1 };
    const r = await dry(bad);
    expect(r.status).toBe(400);
    expect(r.body.error.problems).toEqual([{ path: '/estimates/2/uncertainty', message: 'uncertainty must be >= 0 (a standard uncertainty, 1 sigma); got -1' }]);
    expect([await entryCount(), await estimateCount()]).toEqual(before);
  });
});

describe('checks beyond the schema, each with its message', () => {
  it('the checksum must be that of a published version', async () => {
    const e = await rejected(fullSweep(w, { challenge: { id: 'chain-12', version: 1, checksum: 'a'.repeat(64) } }));
    expect(e.problems[0]).toEqual({ path: '/challenge/checksum', message: `"${'a'.repeat(64)}" is not the checksum of a published version of chain-12; the current version 1 has checksum "sha256:${w.checksum}" (GET /api/challenges/chain-12)` });
    expect(e.message).toBe(`/challenge/checksum: ${e.problems[0].message}`);
    const v = await rejected(fullSweep(w, { challenge: { id: 'chain-12', version: 2, checksum: w.checksum } }));
    expect(v.problems[0]).toEqual({ path: '/challenge/version', message: 'the checksum is that of version 1 of chain-12, not version 2: fix one of the two' });
    const c = await rejected(fullSweep(w, { challenge: { id: 'no-such', version: 1, checksum: w.checksum } }));
    expect(c.problems[0]).toEqual({ path: '/challenge/id', message: 'this entry answers "no-such" but was posted to /api/challenges/chain-12/entries: post it to /api/challenges/no-such/entries, or fix the id' });
    const d = await dry(fullSweep(w, { challenge: { id: 'no-such', version: 1, checksum: w.checksum } }));
    expect(d.body.error.problems[0]).toEqual({ path: '/challenge/id', message: 'there is no published challenge "no-such" (GET /api/challenges lists them)' });
  });

  it('every target id must exist in the version', async () => {
    const doc = fullSweep(w);
    doc.estimates[3].target = 't4-h0.78:z6';
    const e = await rejected(doc);
    expect(e.problems).toEqual([{ path: '/estimates/3/target', message: '"t4-h0.78:z6" is not a target of chain-12 v1; target ids look like "t4-h0.785398:z6" (GET /api/challenges/chain-12/targets lists them)' }]);
  });

  it('no duplicate target ids', async () => {
    const doc = fullSweep(w);
    doc.estimates[7].target = doc.estimates[2].target;
    const e = await rejected(doc);
    expect(e.problems).toEqual([{ path: '/estimates/7/target', message: `"${doc.estimates[2].target}" appears twice (first at /estimates/2): give one estimate per target` }]);
  });

  it('the uncertainty is a finite non-negative number and its kind is given', async () => {
    const doc = fullSweep(w);
    doc.estimates[1].uncertainty = -0.01;
    delete (doc.estimates[4] as Record<string, unknown>).uncertaintyKind;
    (doc.estimates[5] as Record<string, unknown>).uncertainty = 'Infinity';
    (doc.estimates[6] as Record<string, unknown>).uncertaintyKind = 'gaussian';
    const e = await rejected(doc);
    expect(e.problems).toEqual([
      { path: '/estimates/1/uncertainty', message: 'uncertainty must be >= 0 (a standard uncertainty, 1 sigma); got -0.01' },
      { path: '/estimates/4/uncertaintyKind', message: 'is missing: say what kind of uncertainty this is: "statistical", "systematic", "bound" or "none"' },
      { path: '/estimates/5/uncertainty', message: 'uncertainty must be a number, not the string "Infinity": JSON has no NaN or Infinity; leave this estimate out, or give a finite value with an honest uncertainty' },
      { path: '/estimates/6/uncertaintyKind', message: 'must be one of "statistical", "systematic", "bound", "none"; got "gaussian"' },
    ]);
  });

  it('physical bounds: outside by more than 3 uncertainties is an error, inside the band a warning', async () => {
    const k = mzIndex();
    const doc = fullSweep(w);
    doc.estimates[k] = { ...doc.estimates[k], value: 1.8, uncertainty: 0.1 };
    const e = await rejected(doc);
    expect(e.problems).toEqual([{ path: `/estimates/${k}/value`, message: '|value| = 1.8 exceeds the physical bound 1 of observable mz by more than 3 uncertainties; check the sign convention or the normalisation' }]);
    const z = w.targets.findIndex((x) => x.observable === 'z6');
    const doc2 = fullSweep(w);
    doc2.estimates[z] = { ...doc2.estimates[z], value: -1.02, uncertainty: 0.01 };
    const r = await post(doc2);
    expect(r.status).toBe(201);
    expect(r.body.warnings).toEqual([{ path: `/estimates/${z}/value`, message: '|value| = 1.02 exceeds the physical bound 1 of observable z6, within 3 uncertainties (u = 0.01): accepted, but worth a second look' }]);
  });

  it('coverage: a partial sweep is accepted with a warning the moderators see', async () => {
    const doc = fullSweep(w);
    doc.estimates = doc.estimates.slice(0, 40);
    const r = await post(doc);
    expect(r.status).toBe(201);
    expect(r.body.coverage).toEqual({ targets: 60, covered: 40, fraction: 40 / 60 });
    expect(r.body.warnings[0]).toEqual({ path: '/estimates', message: 'covers 40 of the 60 targets of chain-12 v1 (66.7%): a partial sweep is accepted, and moderators and the standings show the coverage' });
    const m = await w.mod.get(`/api/entries/${r.body.id}`);
    expect(m.body.coverage).toEqual({ targets: 60, covered: 40, fraction: 40 / 60 });
    expect(m.body.history[0].warnings[0].path).toBe('/estimates');
  });

  it('numbers as strings, NaN, Infinity, huge integers, duplicate keys and deep nesting are rejected clearly', async () => {
    const doc = fullSweep(w);
    (doc.estimates[0] as Record<string, unknown>).value = 'NaN';
    (doc.estimates[1] as Record<string, unknown>).value = '1.0';
    const e = await rejected(doc);
    expect(e.problems.slice(0, 2)).toEqual([
      { path: '/estimates/0/value', message: 'value must be a number, not the string "NaN": JSON has no NaN or Infinity; leave this estimate out, or give a finite value with an honest uncertainty' },
      { path: '/estimates/1/value', message: 'value must be a number, not the string "1.0": write the number without quotes' },
    ]);
    const text = JSON.stringify(fullSweep(w));
    const nan = await rejected(text.replace(/"value":1(?=[,}])/, '"value":NaN'));
    expect(nan.problems[0].message).toMatch(/^not valid JSON at line 1, column \d+ \(character \d+\): expected a JSON value \(NaN is not JSON: JSON has no NaN or Infinity; leave the estimate out or give a finite number\), found "NaN/);
    const big = await rejected(text.replace('"bondDimension":256', '"bondDimension":12345678901234567890'));
    expect(big.problems).toEqual([{ path: '/method/settings/bondDimension', message: 'the integer 12345678901234567890 is beyond 2^53 and cannot be stored exactly: write it as a decimal number (e.g. 1.5e20) or as a string if it is an identifier' }]);
    const dup = await rejected(text.replace('"uncertaintyKind":"statistical"', '"uncertaintyKind":"statistical","value":0.5'));
    expect(dup.problems).toEqual([{ path: '/estimates/0/value', message: 'the key "value" appears twice in the same object: keep one (JSON readers silently drop one of them)' }]);
    const deep = await rejected('{"a":'.repeat(10_000) + '1' + '}'.repeat(10_000));
    expect(deep.problems[0].message).toBe('the document is nested deeper than 32 levels (the limit): entries need at most 5');
    const syntax = await rejected('{"challenge": {"id": "chain-12",}');
    expect(syntax.problems[0].message).toBe('not valid JSON at line 1, column 33 (character 33): expected a key in double quotes, found "}"');
  });

  it('limits: file size, number of estimates, string lengths, unknown fields', async () => {
    const huge = JSON.stringify(fullSweep(w, { notes: 'x'.repeat(11 * 1024 * 1024) }));
    const e = await rejected(huge, 413);
    expect(e.message).toBe('The entry document is larger than the limit of 10 MiB (10485760 bytes). Write it without indentation, or split the sweep into several entries (at most 100000 estimates each).');
    const f = await w.memberA.raw.post('/api/challenges/chain-12/entries').set('Origin', ORIGIN).attach('file', Buffer.from(huge), 'entry.json');
    expect(f.status).toBe(413);
    const many = fullSweep(w, { estimates: Array.from({ length: 100_001 }, (_, i) => ({ target: `t${i}`, value: 0, uncertainty: 0, uncertaintyKind: 'none' })) });
    const m = await rejected(many);
    expect(m.problems).toEqual([{ path: '/estimates', message: 'has 100001 estimates; the limit is 100000 per entry (schemas/entry.schema.json): split the sweep into several entries' }]);
    const long = await rejected(fullSweep(w, { label: 'L'.repeat(121), tracks: 'hardware' }));
    expect(long.problems).toEqual([
      { path: '/tracks', message: 'unknown field "tracks": remove it or check the spelling (allowed here: $schema, challenge, track, label, method, resources, links, license, notes, estimates)' },
      { path: '/label', message: 'is 121 characters long; at most 120 are allowed (schemas/entry.schema.json)' },
    ]);
    const empty = await rejected('');
    expect(empty.message).toBe('Send the entry document (schemas/entry.schema.json) as the JSON body with Content-Type: application/json, or as the multipart field "file".');
  }, 60_000);
});

describe('editing, submitting, revisions and withdrawal', () => {
  it('a draft can be edited, a submitted entry is frozen, and team B can touch neither', async () => {
    const id = (await post(fullSweep(w))).body.id;
    const edited = fullSweep(w, { label: 'MPS, chi = 512' });
    expect((await w.memberB.raw.put(`/api/entries/${id}`).set('Origin', ORIGIN).send(edited)).status).toBe(403);
    expect((await w.memberB.post(`/api/entries/${id}/submit`)).status).toBe(403);
    expect((await w.memberB.post(`/api/entries/${id}/withdraw`, { reason: 'x' })).status).toBe(403);
    const put = await w.memberA.raw.put(`/api/entries/${id}`).set('Origin', ORIGIN).send(edited);
    expect(put.status, put.text).toBe(200);
    expect((await w.memberA.get(`/api/entries/${id}`)).body.document.label).toBe('MPS, chi = 512');
    const s = await w.memberA.post(`/api/entries/${id}/submit`);
    expect(s.status).toBe(200);
    expect(s.body.state).toBe('in-review');
    const frozen = await w.memberA.raw.put(`/api/entries/${id}`).set('Origin', ORIGIN).send(edited);
    expect(frozen.status).toBe(409);
    expect(frozen.body.error.message).toBe('This entry is in-review and frozen: only a draft or a returned entry can be edited.');
    expect((await w.memberA.post(`/api/entries/${id}/submit`)).status).toBe(409);
  });

  it('a new revision supersedes the published one; both stay visible; withdrawal keeps the history', async () => {
    const db = w.t.database.db;
    const first = fullSweep(w, { label: 'rev 1' });
    const id1 = (await post(first)).body.id;
    await w.memberA.post(`/api/entries/${id1}/submit`);
    await db.transaction((tx) => publishEntry(tx, id1, { kind: 'system', label: 'test moderator' }, new Date()));
    expect((await agent(w.t).get(`/api/entries/${id1}`)).status).toBe(200);
    const put = await w.memberA.raw.put(`/api/entries/${id1}`).set('Origin', ORIGIN).send(first);
    expect(put.status).toBe(409);
    expect(put.body.error.message).toBe(`This entry is published and is never edited in place: POST /api/entries/${id1}/revise creates a new draft revision.`);

    const rev = await w.memberA.post(`/api/entries/${id1}/revise`);
    expect(rev.status, rev.text).toBe(201);
    expect(rev.body).toMatchObject({ state: 'draft', revision: 2, lineageId: id1, supersedesId: id1 });
    const id2 = rev.body.id;
    expect((await w.memberA.get(`/api/entries/${id2}`)).body.document).toEqual(first);
    expect((await w.memberA.post(`/api/entries/${id1}/revise`)).status).toBe(409); // one open revision at a time
    const second = fullSweep(w, { label: 'rev 2' });
    second.estimates[0].uncertainty = 0.002;
    expect((await w.memberA.raw.put(`/api/entries/${id2}`).set('Origin', ORIGIN).send(second)).status).toBe(200);
    expect((await w.memberA.post(`/api/entries/${id2}/submit`)).status).toBe(200);
    await db.delete(jobs);
    await db.transaction((tx) => publishEntry(tx, id2, { kind: 'system', label: 'test moderator' }, new Date()));
    const queued = await db.select().from(jobs);
    expect(queued.map((j) => j.kind)).toEqual(['standings']);

    const pub1 = await agent(w.t).get(`/api/entries/${id1}`);
    const pub2 = await agent(w.t).get(`/api/entries/${id2}`);
    expect(pub1.body.state).toBe('superseded');
    expect(pub1.body.document).toEqual(first);
    expect(pub2.body.state).toBe('published');
    expect(pub2.body.document).toEqual(second);
    expect(pub2.body.revisions.map((r: { revision: number; state: string }) => [r.revision, r.state])).toEqual([[1, 'superseded'], [2, 'published']]);
    const list = await agent(w.t).get('/api/challenges/chain-12/entries');
    const ours = list.body.entries.filter((e: { lineageId: string }) => e.lineageId === id1);
    expect(ours.map((e: { id: string }) => e.id)).toEqual([id2]);
    expect(ours[0].summary.estimates).toBe(60);
    const team = await agent(w.t).get(`/api/teams/${w.teamA}/entries`);
    expect(team.body.entries.map((e: { state: string }) => e.state).sort()).toEqual(['published', 'superseded']);
    expect((await w.memberA.get(`/api/teams/${w.teamA}/entries`)).body.entries.length).toBeGreaterThan(2);

    const noReason = await w.memberA.post(`/api/entries/${id2}/withdraw`, {});
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.problems[0].path).toBe('/reason');
    const wd = await w.memberA.post(`/api/entries/${id2}/withdraw`, { reason: 'wrong sign convention for X5' });
    expect(wd.status).toBe(200);
    expect(wd.body).toMatchObject({ state: 'withdrawn', from: 'published' });
    const after = await agent(w.t).get(`/api/entries/${id2}`);
    expect(after.status).toBe(200);
    expect(after.body.state).toBe('withdrawn');
    expect(after.body.document).toEqual(second);
    expect(after.body.history.map((h: { action: string }) => h.action)).toEqual(['entry.revise', 'entry.update', 'entry.submit', 'entry.publish', 'entry.withdraw']);
    expect(after.body.history.at(-1).reason).toBe('wrong sign convention for X5');
    expect((await w.memberA.post(`/api/entries/${id2}/withdraw`, { reason: 'again' })).status).toBe(409);
    // a withdrawn draft never published stays private
    const id3 = (await post(fullSweep(w))).body.id;
    expect((await w.memberA.post(`/api/entries/${id3}/withdraw`, { reason: 'not needed' })).status).toBe(200);
    expect((await agent(w.t).get(`/api/entries/${id3}`)).status).toBe(404);
  });
});

describe('OpenAPI', () => {
  it('describes every route with its access and embeds the entry schema', async () => {
    const r = await agent(w.t).get('/api/openapi.json');
    expect(r.status).toBe(200);
    expect(r.body.openapi).toBe('3.1.0');
    for (const d of w.t.routes.defs) {
      const p = '/api' + d.path.replace(/:([A-Za-z0-9_]+)/g, '{$1}');
      expect(r.body.paths[p]?.[d.method], `${d.method} ${p}`).toBeTruthy();
    }
    const create = r.body.paths['/api/challenges/{slug}/entries'].post;
    expect(create.requestBody.content['application/json'].schema.$ref).toBe('#/components/schemas/Entry');
    expect(create.security).toEqual([{ session: [] }, { apiKey: [] }]);
    expect(r.body.components.schemas.Entry.title).toBe('Parallax entry');
    expect(r.body.components.schemas.Challenge).toBeTruthy();
  });
});
