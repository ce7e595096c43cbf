/**
 * The challenge settings on entries (server/services/validate-entry.ts, "challenge settings"):
 * open tracks, the submission window (on the injected clock) and the closed state refuse new
 * entries, submissions and revisions with a 409 naming the field, except that before the window
 * opens a draft is stored and edited with a warning (only its submission waits); drafts stay
 * editable; a returned entry can be resubmitted; the dry run warns instead. And the dry run's one pass: schema problems
 * and the checks against the challenge reported together.
 */
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { count, eq } from 'drizzle-orm';
import { ORIGIN } from './helpers';
import { CHAIN_SPEC, fullSweep, makeEntryWorld, type EntryWorld } from './entries-fixtures';
import { entries, estimates } from '../../server/db/schema';
import { publishEntry } from '../../server/services/publish-entry';
import { createEntry } from '../../server/services/create-entry';
import { checkEntry, parseEntryDocument } from '../../server/services/validate-entry';
import { AppError } from '../../server/errors';

let w: EntryWorld;
beforeAll(async () => { w = await makeEntryWorld(); }, 120_000);
afterAll(async () => { await w.worker.stop(); await w.t.close(); });
afterEach(async () => { await settings({ state: 'open', tracks: ['hardware', 'classical'], submissionWindow: null }); });

type Problem = { path: string; message: string };
const entryCount = async () => (await w.t.database.db.select({ n: count() }).from(entries).where(eq(entries.isBaseline, false)))[0].n;
const estimateCount = async () => (await w.t.database.db.select({ n: count() }).from(estimates))[0].n;
const stored = async () => [await entryCount(), await estimateCount()];
const json = (body: unknown) => (typeof body === 'string' ? body : JSON.stringify(body));
const post = (body: unknown) => w.memberA.raw.post('/api/challenges/chain-12/entries').set('Origin', ORIGIN).set('Content-Type', 'application/json').send(json(body));
const put = (id: string, body: unknown) => w.memberA.raw.put(`/api/entries/${id}`).set('Origin', ORIGIN).set('Content-Type', 'application/json').send(json(body));
const dry = (body: unknown) => request(w.t.app).post('/api/entries/validate').set('Content-Type', 'application/json').send(json(body));
const submit = (id: string) => w.memberA.post(`/api/entries/${id}/submit`);
const stateOf = async (id: string) => (await w.t.database.db.select({ s: entries.state }).from(entries).where(eq(entries.id, id)))[0].s;
async function settings(body: Record<string, unknown>) {
  const r = await w.mod.post('/api/challenges/chain-12/settings', body);
  expect(r.status, r.text).toBe(200);
}
const hardware = (over: Record<string, unknown> = {}) => fullSweep(w, { track: 'hardware', label: 'ZNE, 3 noise factors', method: { family: 'error-mitigated-hardware' }, ...over });
async function draft(doc: unknown = fullSweep(w)): Promise<string> {
  const r = await post(doc);
  expect(r.status, r.text).toBe(201);
  return r.body.id;
}
async function published(doc: unknown = fullSweep(w)): Promise<string> {
  const id = await draft(doc);
  expect((await submit(id)).status).toBe(200);
  await w.t.database.db.transaction((tx) => publishEntry(tx, id, { kind: 'system', label: 'test moderator' }, new Date()));
  return id;
}
/** a refusal by the settings: 409 with the field problems, and nothing stored */
async function refused(send: () => Promise<request.Response>): Promise<{ code: string; message: string; problems: Problem[] }> {
  const before = await stored();
  const r = await send();
  expect(r.status, r.text).toBe(409);
  expect(r.body.error.code).toBe('conflict');
  expect(await stored()).toEqual(before);
  return r.body.error;
}
const iso = (ms: number) => new Date(ms).toISOString();

describe('open tracks', () => {
  it('a closed track refuses new entries with a 409 naming /track and the open tracks; the open track takes them', async () => {
    await settings({ tracks: ['hardware'] });
    const e = await refused(() => post(fullSweep(w)));
    const msg = 'the classical track of chain-12 is closed; open tracks: hardware (the track says how the values were obtained: change it only if it is wrong)';
    expect(e.problems).toEqual([{ path: '/track', message: msg }]);
    expect(e.message).toBe(`/track: ${msg}`);
    // an API key is held to the same rule
    const k = await request(w.t.app).post('/api/challenges/chain-12/entries').set('x-api-key', w.keyA).set('Content-Type', 'application/json').send(json(fullSweep(w)));
    expect(k.status).toBe(409);
    const ok = await post(hardware());
    expect(ok.status, ok.text).toBe(201);
    expect(ok.body.warnings).toEqual([]);
  });

  it('the dry run reports the closed track as a warning, with acceptsEntries false and the score preview', async () => {
    await settings({ tracks: ['hardware'] });
    const before = await stored();
    const r = await dry(fullSweep(w));
    expect(r.status, r.text).toBe(200);
    expect(r.body).toMatchObject({ valid: true, stored: false, acceptsEntries: false });
    expect(r.body.warnings[0]).toEqual({ path: '/track', message: 'the classical track of chain-12 is closed; open tracks: hardware (the track says how the values were obtained: change it only if it is wrong)' });
    expect(r.body.scores.sweep.verifiable.scored).toBe(60);
    const h = await dry(hardware());
    expect(h.status).toBe(200);
    expect(h.body.acceptsEntries).toBe(true);
    expect(h.body.warnings).toEqual([]);
    expect(await stored()).toEqual(before);
  });

  it('a draft keeps a track that closed after it was made, but cannot be submitted in it, nor moved into a closed one', async () => {
    const hw = await draft(hardware());
    const cl = await draft(fullSweep(w));
    await settings({ tracks: ['classical'] });
    // editing in its own (now closed) track: saved, with the warning that it cannot be submitted
    const edit = await put(hw, hardware({ label: 'ZNE, 5 noise factors' }));
    expect(edit.status, edit.text).toBe(200);
    expect(edit.body.warnings[0]).toEqual({ path: '/track', message: 'the hardware track of chain-12 is closed; open tracks: classical: the draft cannot be submitted while its track is closed' });
    const s = await refused(() => submit(hw));
    expect(s.problems).toEqual([{ path: '/track', message: 'the hardware track of chain-12 is closed; open tracks: classical: the draft cannot be submitted while its track is closed' }]);
    expect(await stateOf(hw)).toBe('draft');
    // moving the classical draft into the closed hardware track is refused, and nothing changes
    const move = await refused(() => put(cl, hardware()));
    expect(move.problems).toEqual([{ path: '/track', message: 'the hardware track of chain-12 is closed; open tracks: classical: this entry is in the classical track, and an edit cannot move it into a closed one' }]);
    expect((await w.memberA.get(`/api/entries/${cl}`)).body.document.track).toBe('classical');
    expect((await submit(cl)).status).toBe(200);
  });

  it('no new revision of a published entry in a closed track; the published entry stays', async () => {
    const id = await published(hardware({ label: 'published hardware' }));
    await settings({ tracks: ['classical'] });
    const e = await refused(() => w.memberA.post(`/api/entries/${id}/revise`));
    expect(e.problems).toEqual([{ path: '/track', message: 'the hardware track of chain-12 is closed; open tracks: classical: no new revision of a hardware entry while its track is closed; the published entry stays as it is' }]);
    expect(await stateOf(id)).toBe('published');
    await settings({ tracks: ['classical', 'hardware'] });
    expect((await w.memberA.post(`/api/entries/${id}/revise`)).status).toBe(201);
  });
});

describe('the writing services check again in their transaction', () => {
  it('a check made before a moderator closed the track does not get an entry stored', async () => {
    const db = w.t.database.db;
    const check = await checkEntry(db, parseEntryDocument(json(fullSweep(w))), { slug: 'chain-12', now: w.t.clock.now });
    expect(check.refusals).toEqual([]);
    await settings({ tracks: ['hardware'] });
    const before = await stored();
    const actor = { kind: 'system', label: 'test' } as const;
    const err = await createEntry(db, { check, teamId: w.teamA, actor, now: w.t.clock.now }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(AppError);
    expect((err as AppError).status).toBe(409);
    expect((err as AppError).problems.map((p) => p.path)).toEqual(['/track']);
    expect(await stored()).toEqual(before);
    // and the window with the clock the caller passes, not the process's
    await settings({ tracks: ['classical'], submissionWindow: { closesAt: iso(w.t.clock.now.getTime() + 60_000) } });
    const late = await createEntry(db, { check, teamId: w.teamA, actor, now: new Date(w.t.clock.now.getTime() + 120_000) }).catch((e: unknown) => e);
    expect((late as AppError).status).toBe(409);
    expect((late as AppError).problems[0].message).toMatch(/^chain-12 takes no new entries since its submission window closed at /);
    expect(await stored()).toEqual(before);
    expect((await createEntry(db, { check, teamId: w.teamA, actor, now: w.t.clock.now })).state).toBe('draft');
  });
});

describe('the submission window, on the injected clock', () => {
  it('before it opens a draft is stored and edited with a warning, but not submitted; from opensAt (inclusive) it is; from closesAt (exclusive) no entry is created', async () => {
    const t0 = w.t.clock.now.getTime();
    const opens = t0 + 3_600_000;
    const closes = t0 + 7_200_000;
    await settings({ submissionWindow: { opensAt: iso(opens), closesAt: iso(closes) } });
    const wait = { path: '/challenge/id', message: `chain-12 takes no submissions before its submission window opens at ${iso(opens)}; a draft can be saved and edited meanwhile, and submitted from then on` };

    // a draft prepared in advance: stored (metadata and every estimate), with the warning saying from when it can be submitted
    const [n0, e0] = await stored();
    const early = await post(fullSweep(w, { label: 'prepared in advance' }));
    expect(early.status, early.text).toBe(201);
    expect(early.body.state).toBe('draft');
    expect(early.body.warnings).toEqual([wait]);
    expect(await stored()).toEqual([n0 + 1, e0 + early.body.estimates]);
    const id = early.body.id as string;
    // an API key may prepare one too
    const k = await request(w.t.app).post('/api/challenges/chain-12/entries').set('x-api-key', w.keyA).set('Content-Type', 'application/json').send(json(hardware()));
    expect(k.status, k.text).toBe(201);
    expect(k.body.warnings).toEqual([wait]);
    // edited: saved, with the same warning
    const edit = await put(id, fullSweep(w, { label: 'prepared in advance, edited' }));
    expect(edit.status, edit.text).toBe(200);
    expect(edit.body.warnings).toEqual([wait]);
    expect((await w.memberA.get(`/api/entries/${id}`)).body.document.label).toBe('prepared in advance, edited');
    // not submitted before opensAt: 409 saying from when, and the draft stays a draft
    const s = await refused(() => submit(id));
    expect(s.problems).toEqual([wait]);
    expect(s.message).toBe(`/challenge/id: ${wait.message}`);
    expect(await stateOf(id)).toBe('draft');
    // the dry run says the same: a draft would be stored, a submission would not be taken
    const d = await dry(fullSweep(w));
    expect(d.status).toBe(200);
    expect(d.body).toMatchObject({ valid: true, stored: false, acceptsDrafts: true, acceptsSubmissions: false, acceptsEntries: false });
    expect(d.body.warnings).toEqual([wait]);

    w.t.clock.advance(opens - w.t.clock.now.getTime() - 1); // the last millisecond before
    expect((await refused(() => submit(id))).problems).toEqual([wait]);
    w.t.clock.advance(1); // exactly opensAt
    const sent = await submit(id);
    expect(sent.status, sent.text).toBe(200);
    expect(sent.body).toMatchObject({ state: 'in-review', submittedAt: iso(opens) });
    const at = await dry(fullSweep(w));
    expect(at.body).toMatchObject({ acceptsDrafts: true, acceptsSubmissions: true, acceptsEntries: true, warnings: [] });
    const fresh = await post(fullSweep(w));
    expect(fresh.status).toBe(201);
    expect(fresh.body.warnings).toEqual([]);
    w.t.clock.advance(closes - w.t.clock.now.getTime() - 1); // the last millisecond inside
    expect((await post(fullSweep(w))).status).toBe(201);
    w.t.clock.advance(1); // exactly closesAt
    const late = await refused(() => post(fullSweep(w)));
    expect(late.problems).toEqual([{ path: '/challenge/id', message: `chain-12 takes no new entries since its submission window closed at ${iso(closes)}; a moderator can extend the window` }]);
    const ld = await dry(fullSweep(w));
    expect(ld.body).toMatchObject({ acceptsDrafts: false, acceptsSubmissions: false, acceptsEntries: false });
    expect(ld.body.warnings).toEqual(late.problems);
    // extending the window opens it again
    await settings({ submissionWindow: { closesAt: iso(closes + 60_000) } });
    expect((await post(fullSweep(w))).status).toBe(201);
  });

  it('before it opens, a closed challenge or a closed track still refuses a new draft (409, nothing stored); the open track takes it with the warning', async () => {
    const opens = w.t.clock.now.getTime() + 3_600_000;
    const wait = { path: '/challenge/id', message: `chain-12 takes no submissions before its submission window opens at ${iso(opens)}; a draft can be saved and edited meanwhile, and submitted from then on` };
    await settings({ state: 'closed', submissionWindow: { opensAt: iso(opens) } });
    const c = await refused(() => post(fullSweep(w)));
    expect(c.problems).toEqual([{ path: '/challenge/id', message: 'chain-12 is closed and takes no new entries; a moderator can open it again' }]);
    const cd = await dry(fullSweep(w));
    expect(cd.body).toMatchObject({ acceptsDrafts: false, acceptsSubmissions: false, acceptsEntries: false });
    expect(cd.body.warnings).toEqual([...c.problems, wait]);

    await settings({ state: 'open', tracks: ['hardware'] });
    const t = await refused(() => post(fullSweep(w)));
    expect(t.problems.map((p) => p.path)).toEqual(['/track']);
    const hw = await post(hardware());
    expect(hw.status, hw.text).toBe(201);
    expect(hw.body.warnings).toEqual([wait]);
    // and a draft is not moved into the closed track before the window opens either
    const move = await refused(() => put(hw.body.id, fullSweep(w)));
    expect(move.problems.map((p) => p.path)).toEqual(['/track']);
  });

  it('before it opens no new revision of a published entry; a returned entry is resubmitted as ever', async () => {
    const pub = await published(fullSweep(w, { label: 'published before the window was set' }));
    const back = await draft(fullSweep(w, { label: 'returned before the window was set' }));
    expect((await submit(back)).status).toBe(200);
    expect((await w.mod.post(`/api/entries/${back}/decision`, { decision: 'return', reason: 'Say which bond dimension you used.' })).status).toBe(200);
    const opens = w.t.clock.now.getTime() + 3_600_000;
    await settings({ submissionWindow: { opensAt: iso(opens) } });
    const r = await refused(() => w.memberA.post(`/api/entries/${pub}/revise`));
    expect(r.problems).toEqual([{ path: '/challenge/id', message: `chain-12 takes no new revisions before its submission window opens at ${iso(opens)}` }]);
    expect(await stateOf(pub)).toBe('published');
    const fix = await put(back, fullSweep(w, { label: 'returned before the window was set', method: { family: 'tensor-network', settings: { bondDimension: 512 } } }));
    expect(fix.status, fix.text).toBe(200);
    expect(fix.body.warnings).toEqual([]);
    const again = await submit(back);
    expect(again.status, again.text).toBe(200);
    expect(again.body.state).toBe('in-review');
  });

  it('a window with only an end, or only a start, is unbounded on the other side', async () => {
    const now = w.t.clock.now.getTime();
    await settings({ submissionWindow: { closesAt: iso(now + 60_000) } });
    expect((await post(fullSweep(w))).status).toBe(201);
    await settings({ submissionWindow: { opensAt: iso(now - 60_000), closesAt: null } });
    w.t.clock.advance(6 * 3_600_000); // long after (not days: the sessions live on the same clock)
    expect((await post(fullSweep(w))).status).toBe(201);
  });

  it('drafts stay editable after the window closes but are not submitted; a returned entry can be resubmitted', async () => {
    const kept = await draft(fullSweep(w, { label: 'kept draft' }));
    const back = await draft(fullSweep(w, { label: 'returned' }));
    expect((await submit(back)).status).toBe(200);
    const ret = await w.mod.post(`/api/entries/${back}/decision`, { decision: 'return', reason: 'Say which truncation you used.' });
    expect(ret.status, ret.text).toBe(200);
    const closes = w.t.clock.now.getTime() + 60_000;
    await settings({ submissionWindow: { closesAt: iso(closes) } });
    w.t.clock.advance(120_000);

    const edit = await put(kept, fullSweep(w, { label: 'kept draft, edited' }));
    expect(edit.status, edit.text).toBe(200);
    const msg = `chain-12 takes no submissions since its submission window closed at ${iso(closes)}; the draft stays editable, and can be submitted if a moderator extends the window`;
    expect(edit.body.warnings).toEqual([{ path: '/challenge/id', message: msg }]);
    expect((await w.memberA.get(`/api/entries/${kept}`)).body.document.label).toBe('kept draft, edited');
    const s = await refused(() => submit(kept));
    expect(s.problems).toEqual([{ path: '/challenge/id', message: msg }]);
    expect(s.message).toBe(`/challenge/id: ${msg}`);
    expect(await stateOf(kept)).toBe('draft');

    // the returned entry was submitted in time: it is fixed and sent back to review
    const fix = await put(back, fullSweep(w, { label: 'returned', method: { family: 'tensor-network', settings: { truncation: 1e-10 } } }));
    expect(fix.status, fix.text).toBe(200);
    expect(fix.body.warnings).toEqual([]);
    const again = await submit(back);
    expect(again.status, again.text).toBe(200);
    expect(again.body.state).toBe('in-review');
  });

  it('no new revision outside the window', async () => {
    const id = await published(fullSweep(w, { label: 'published before the close' }));
    const closes = w.t.clock.now.getTime() + 1_000;
    await settings({ submissionWindow: { closesAt: iso(closes) } });
    w.t.clock.advance(2_000);
    const e = await refused(() => w.memberA.post(`/api/entries/${id}/revise`));
    expect(e.problems).toEqual([{ path: '/challenge/id', message: `chain-12 takes no new revisions since its submission window closed at ${iso(closes)}; the published entry stays as it is (a moderator can extend the window)` }]);
  });
});

describe('a closed challenge', () => {
  it('takes no new entries, submissions or revisions (409); drafts stay editable; the dry run warns; reopening restores all', async () => {
    const pub = await published(fullSweep(w, { label: 'published before closing' }));
    const kept = await draft(fullSweep(w, { label: 'draft before closing' }));
    await settings({ state: 'closed', reason: 'Round 1 is over.' });

    const c = await refused(() => post(fullSweep(w)));
    expect(c.problems).toEqual([{ path: '/challenge/id', message: 'chain-12 is closed and takes no new entries; a moderator can open it again' }]);
    const s = await refused(() => submit(kept));
    expect(s.problems).toEqual([{ path: '/challenge/id', message: 'chain-12 is closed and takes no submissions; the draft stays editable, and can be submitted if a moderator opens the challenge again' }]);
    const r = await refused(() => w.memberA.post(`/api/entries/${pub}/revise`));
    expect(r.problems).toEqual([{ path: '/challenge/id', message: 'chain-12 is closed and takes no new revisions; the published entry stays as it is (a moderator can open the challenge again)' }]);
    expect((await put(kept, fullSweep(w, { label: 'edited while closed' }))).status).toBe(200);
    const d = await dry(fullSweep(w));
    expect(d.status).toBe(200);
    expect(d.body).toMatchObject({ valid: true, acceptsEntries: false });
    expect(d.body.warnings[0]).toEqual(c.problems[0]);

    await settings({ state: 'open' });
    expect((await submit(kept)).status).toBe(200);
    expect((await w.memberA.post(`/api/entries/${pub}/revise`)).status).toBe(201);
  });

  it('every reason is listed at once: closed, outside the window, closed track', async () => {
    const closes = w.t.clock.now.getTime() - 1_000;
    await settings({ state: 'closed', tracks: ['hardware'], submissionWindow: { closesAt: iso(closes) } });
    const e = await refused(() => post(fullSweep(w)));
    expect(e.problems.map((p) => p.path)).toEqual(['/challenge/id', '/challenge/id', '/track']);
    // with a schema problem as well it is a 400 that lists the refusals first, then the document's problems
    const before = await stored();
    const bad = fullSweep(w, { label: '' });
    const r = await post(bad);
    expect(r.status).toBe(400);
    expect(r.body.error.problems).toEqual([...e.problems, { path: '/label', message: 'must not be empty' }]);
    expect(await stored()).toEqual(before);
  });
});

describe('the dry run reports every independent problem in one pass', () => {
  it('schema problems together with unknown and duplicate targets and the physical bound', async () => {
    const doc = fullSweep(w, { label: 'L'.repeat(121) });
    const k = w.targets.findIndex((x) => x.observable === 'mz'); // 0
    doc.estimates[1].uncertainty = -1;
    doc.estimates[3].target = 't4-h0.78:z6';
    doc.estimates[7].target = doc.estimates[2].target;
    (doc.estimates[8] as Record<string, unknown>).value = '0.5';
    doc.estimates[k] = { ...doc.estimates[k], value: 1.8, uncertainty: 0.1 };
    const before = await stored();
    const r = await dry(doc);
    expect(r.status).toBe(400);
    expect(r.body.error.code).toBe('validation_failed');
    expect(r.body.error.problems).toEqual([
      { path: '/label', message: 'is 121 characters long; at most 120 are allowed (schemas/entry.schema.json)' },
      { path: '/estimates/1/uncertainty', message: 'uncertainty must be >= 0 (a standard uncertainty, 1 sigma); got -1' },
      { path: '/estimates/8/value', message: 'value must be a number, not the string "0.5": write the number without quotes' },
      // then the checks against the challenge, in the order of the estimates
      { path: `/estimates/${k}/value`, message: '|value| = 1.8 exceeds the physical bound 1 of observable mz by more than 3 uncertainties; check the sign convention or the normalisation' },
      { path: '/estimates/3/target', message: '"t4-h0.78:z6" is not a target of chain-12 v1; target ids look like "t4-h0.785398:z6" (GET /api/challenges/chain-12/targets lists them)' },
      { path: '/estimates/7/target', message: `"${doc.estimates[2].target}" appears twice (first at /estimates/2): give one estimate per target` },
    ]);
    // creating it says the same, and stores nothing
    const c = await post(doc);
    expect(c.status).toBe(400);
    expect(c.body.error.problems).toEqual(r.body.error.problems);
    expect(await stored()).toEqual(before);
  });

  it('a wrong checksum or version is reported beside schema problems', async () => {
    const sum = await dry(fullSweep(w, { label: '', challenge: { id: 'chain-12', version: 1, checksum: 'b'.repeat(64) } }));
    expect(sum.status).toBe(400);
    expect(sum.body.error.problems.map((p: Problem) => p.path)).toEqual(['/label', '/challenge/checksum']);
    expect(sum.body.error.problems[1].message).toContain(`is not the checksum of a published version of chain-12; the current version 1 has checksum "sha256:${w.checksum}"`);
    const ver = await dry(fullSweep(w, { track: 'quantum', challenge: { id: 'chain-12', version: 3, checksum: w.checksum } }));
    expect(ver.body.error.problems).toEqual([
      { path: '/track', message: 'must be one of "hardware", "classical"; got "quantum"' },
      { path: '/challenge/version', message: 'the checksum is that of version 1 of chain-12, not version 3: fix one of the two' },
    ]);
    const none = await dry(fullSweep(w, { method: {}, challenge: { id: 'no-such', version: 1, checksum: w.checksum } }));
    expect(none.body.error.problems.map((p: Problem) => p.path)).toEqual(['/method/family', '/challenge/id']);
  });

  it('a field the schema already names is not named twice, and malformed parts are skipped, not guessed', async () => {
    const doc = fullSweep(w) as Record<string, unknown> & { estimates: Record<string, unknown>[] };
    doc.estimates[0].target = 42;
    doc.estimates[1].target = 'x'.repeat(201);
    doc.estimates[2] = null as never;
    doc.estimates[3].target = 'no-such:target';
    const r = await dry(doc);
    expect(r.status).toBe(400);
    const paths = r.body.error.problems.map((p: Problem) => p.path);
    expect(paths).toEqual(['/estimates/0/target', '/estimates/1/target', '/estimates/2', '/estimates/3/target']);
    expect(r.body.error.problems[0].message).toBe('target must be a string, not 42');
    expect(r.body.error.problems[1].message).toBe('is 201 characters long; at most 200 are allowed (schemas/entry.schema.json)');
    expect(r.body.error.problems[3].message).toMatch(/^"no-such:target" is not a target of chain-12 v1/);
    // a malformed checksum: the schema's problem only, and no target checks without a version
    const bad = fullSweep(w, { challenge: { id: 'chain-12', version: 1, checksum: 'sha256:xyz' } });
    bad.estimates[0].target = 'no-such:target';
    const b = await dry(bad);
    expect(b.body.error.problems.map((p: Problem) => p.path)).toEqual(['/challenge/checksum']);
  });

  it('odd shapes of every part never make a 5xx: each answer is a 4xx with problems', async () => {
    const good = fullSweep(w);
    const bodies: unknown[] = [
      { ...good, challenge: [] }, { ...good, challenge: { id: 'chain-12' } }, { ...good, challenge: { id: ['chain-12'], checksum: w.checksum, version: 1 } },
      { ...good, challenge: { id: 'chain-12', checksum: w.checksum, version: 1.5 } }, { ...good, challenge: { id: 'chain-12', checksum: w.checksum, version: '1' } },
      { ...good, estimates: {} }, { ...good, estimates: 'all' }, { ...good, estimates: [null, 1, 'x', [], {}] }, { ...good, estimates: [] },
      { ...good, estimates: [{ target: '__proto__', value: 0, uncertainty: 0, uncertaintyKind: 'none' }, { target: 'constructor', value: 0, uncertainty: 0, uncertaintyKind: 'none' }, { target: 'toString' }] },
      { ...good, estimates: good.estimates.map((e: Record<string, unknown>) => ({ ...e, value: 1e300, uncertainty: -1e300 })) },
      { ...good, estimates: good.estimates.map((e: Record<string, unknown>) => ({ ...e, value: null, uncertainty: 'u' })) },
      { ...good, track: { hardware: true } }, { ...good, track: null }, { ...good, method: 'mps' }, { ...good, method: null },
      { challenge: good.challenge }, { estimates: good.estimates }, [good], 'x', 0, null, true,
      '{"challenge": {"id": "chain-12", "__proto__": {"checksum": 1}}, "estimates": [{"__proto__": {"target": "x"}}]}',
    ];
    for (const b of bodies) {
      for (const send of [() => dry(b), () => post(b)]) {
        const r = await send();
        expect(r.status, `${json(b).slice(0, 120)} -> ${r.text.slice(0, 200)}`).toBeGreaterThanOrEqual(400);
        expect(r.status, json(b).slice(0, 120)).toBeLessThan(500);
        expect(r.body.error.problems.length, json(b).slice(0, 120)).toBeGreaterThan(0);
      }
    }
  }, 60_000);
});

// last in the file: it publishes version 2 of chain-12, which every test above answers at version 1
describe('a draft whose version was superseded meanwhile', () => {
  it('is not sent to review: 409 naming /challenge/version and the current checksum; moved to the new version it is', async () => {
    const id = await draft();
    const v2 = { ...CHAIN_SPEC, version: 2, description: `${CHAIN_SPEC.description} (corrected)` };
    expect((await w.mod.post('/api/challenges', v2)).status).toBe(201);
    const pub = await w.mod.post('/api/challenges/chain-12/publish', { reason: 'description corrected' });
    expect(pub.status, pub.text).toBe(200);
    const e = await refused(() => submit(id));
    expect(e.problems).toEqual([{ path: '/challenge/version', message: 'version 1 is superseded; the current version is 2' }]);
    expect(e.message).toContain('(description corrected)');
    expect(e.message).toContain(pub.body.checksum);
    expect(await stateOf(id)).toBe('draft');
    // the same targets exist in version 2 (only the description changed): the moved draft goes to review
    const moved = await put(id, fullSweep(w, { challenge: { id: 'chain-12', version: 2, checksum: `sha256:${pub.body.checksum}`.replace('sha256:sha256:', 'sha256:') } }));
    expect(moved.status, moved.text).toBe(200);
    expect((await submit(id)).status).toBe(200);
    expect(await stateOf(id)).toBe('in-review');
  });
});
