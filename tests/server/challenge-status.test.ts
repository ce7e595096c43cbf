/**
 * What the public challenge API says about taking entries (server/routes/challenges.ts,
 * submissionsStatus): the state, the open tracks, the submission window, acceptsEntriesNow (a
 * submission would be taken) and acceptsDraftsNow (a new draft would be stored) on the injected
 * clock, with a short reason when no submission is taken, on GET /api/challenges/:slug and in the
 * catalogue. The answer is the enforcement's (entryGateStatus over the rules of gateProblems in
 * server/services/validate-entry.ts): the dry run's acceptsSubmissions and acceptsDrafts agree
 * with it in every case.
 */
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { fullSweep, makeEntryWorld, type EntryWorld } from './entries-fixtures';
import { submissionsStatus } from '../../server/routes/challenges';
import { entryGateStatus, gateProblems } from '../../server/services/validate-entry';

let w: EntryWorld;
beforeAll(async () => { w = await makeEntryWorld(); }, 120_000);
afterAll(async () => { await w.worker.stop(); await w.t.close(); });
afterEach(async () => { await settings({ state: 'open', tracks: ['hardware', 'classical'], submissionWindow: null }); });

async function settings(body: Record<string, unknown>) {
  const r = await w.mod.post('/api/challenges/chain-12/settings', body);
  expect(r.status, r.text).toBe(200);
}
/** the status as a visitor without an account sees it, on the page and in the catalogue (which must agree) */
async function status() {
  const page = await request(w.t.app).get('/api/challenges/chain-12');
  expect(page.status, page.text).toBe(200);
  const list = await request(w.t.app).get('/api/challenges');
  expect(list.status).toBe(200);
  const row = list.body.challenges.find((c: { slug: string }) => c.slug === 'chain-12');
  expect(row.submissions).toEqual(page.body.submissions);
  expect(row.state).toBe(page.body.state);
  return { state: page.body.state as string, ...page.body.submissions };
}
/** what the enforcement says of a new entry in each track (the dry run stores nothing) */
async function enforced() {
  const dry = (doc: unknown) => request(w.t.app).post('/api/entries/validate').set('Content-Type', 'application/json').send(JSON.stringify(doc));
  const cl = await dry(fullSweep(w));
  const hw = await dry(fullSweep(w, { track: 'hardware', method: { family: 'error-mitigated-hardware' } }));
  expect(cl.status, cl.text).toBe(200);
  expect(hw.status, hw.text).toBe(200);
  for (const r of [cl, hw]) expect(r.body.acceptsEntries).toBe(r.body.acceptsSubmissions);
  const of = (r: request.Response) => ({ acceptsEntriesNow: r.body.acceptsSubmissions as boolean, acceptsDraftsNow: r.body.acceptsDrafts as boolean });
  return { hardware: of(hw), classical: of(cl) };
}
type Accepts = { acceptsEntriesNow: boolean; acceptsDraftsNow: boolean };
async function agrees(s: { tracks: Record<'hardware' | 'classical', Accepts>} & Accepts) {
  const e = await enforced();
  const pick = (t: Accepts) => ({ acceptsEntriesNow: t.acceptsEntriesNow, acceptsDraftsNow: t.acceptsDraftsNow });
  expect(e).toEqual({ hardware: pick(s.tracks.hardware), classical: pick(s.tracks.classical) });
  expect(s.acceptsEntriesNow).toBe(e.hardware.acceptsEntriesNow || e.classical.acceptsEntriesNow);
  expect(s.acceptsDraftsNow).toBe(e.hardware.acceptsDraftsNow || e.classical.acceptsDraftsNow);
}
const iso = (ms: number) => new Date(ms).toISOString();
/** a whole minute at least `ms` after the clock, and its short form */
const minuteAfter = (ms: number) => Math.ceil((w.t.clock.now.getTime() + ms) / 60_000) * 60_000;
const utc = (ms: number) => `${iso(ms).slice(0, 10)} ${iso(ms).slice(11, 16)} UTC`;
const BOTH_OPEN = { hardware: { acceptsEntriesNow: true, acceptsDraftsNow: true, reason: null }, classical: { acceptsEntriesNow: true, acceptsDraftsNow: true, reason: null } };

describe('the public challenge API says whether the challenge takes entries now', () => {
  it('open, with no window: both tracks take entries, no reason, the server clock as asOf', async () => {
    const s = await status();
    expect(s).toEqual({
      state: 'open', acceptsEntriesNow: true, acceptsDraftsNow: true, reason: null, openTracks: ['hardware', 'classical'],
      window: { opensAt: null, closesAt: null }, tracks: BOTH_OPEN, asOf: w.t.clock.now.toISOString(),
    });
    await agrees(s);
  });

  it('closed by a moderator: no track takes entries, reason "submissions closed"', async () => {
    await settings({ state: 'closed', reason: 'Round 1 is over.' });
    const s = await status();
    expect(s).toMatchObject({
      state: 'closed', acceptsEntriesNow: false, acceptsDraftsNow: false, reason: 'submissions closed', openTracks: ['hardware', 'classical'],
      tracks: { hardware: { acceptsEntriesNow: false, acceptsDraftsNow: false, reason: 'submissions closed' }, classical: { acceptsEntriesNow: false, acceptsDraftsNow: false, reason: 'submissions closed' } },
    });
    await agrees(s);
  });

  it('before the window opens: no submission ("opens <date> UTC") but drafts; from opensAt on (inclusive) it takes submissions', async () => {
    const opens = minuteAfter(3_600_000);
    const closes = opens + 86_400_000;
    await settings({ submissionWindow: { opensAt: iso(opens), closesAt: iso(closes) } });
    const before = await status();
    expect(before).toMatchObject({ state: 'open', acceptsEntriesNow: false, acceptsDraftsNow: true, reason: `opens ${utc(opens)}`, window: { opensAt: iso(opens), closesAt: iso(closes) } });
    expect(before.tracks.classical).toEqual({ acceptsEntriesNow: false, acceptsDraftsNow: true, reason: `opens ${utc(opens)}` });
    expect(before.tracks.hardware).toEqual(before.tracks.classical);
    await agrees(before);

    w.t.clock.advance(opens - w.t.clock.now.getTime() - 1); // the last millisecond before
    const last = await status();
    expect(last).toMatchObject({ acceptsEntriesNow: false, acceptsDraftsNow: true });
    await agrees(last);
    w.t.clock.advance(1); // exactly opensAt
    const at = await status();
    expect(at).toMatchObject({ acceptsEntriesNow: true, reason: null, tracks: BOTH_OPEN, asOf: iso(opens) });
    await agrees(at);
  });

  it('after the window: "closed <date> UTC"; closesAt is exclusive', async () => {
    const closes = minuteAfter(3_600_000);
    await settings({ submissionWindow: { closesAt: iso(closes) } });
    const open = await status();
    expect(open).toMatchObject({ acceptsEntriesNow: true, acceptsDraftsNow: true, reason: null, window: { opensAt: null, closesAt: iso(closes) } });

    w.t.clock.advance(closes - w.t.clock.now.getTime() - 1); // the last millisecond inside
    const last = await status();
    expect(last.acceptsEntriesNow).toBe(true);
    await agrees(last);
    w.t.clock.advance(1); // exactly closesAt
    const after = await status();
    expect(after).toMatchObject({
      state: 'open', acceptsEntriesNow: false, acceptsDraftsNow: false, reason: `closed ${utc(closes)}`,
      tracks: { hardware: { acceptsEntriesNow: false, acceptsDraftsNow: false, reason: `closed ${utc(closes)}` }, classical: { acceptsEntriesNow: false, acceptsDraftsNow: false, reason: `closed ${utc(closes)}` } },
    });
    await agrees(after);
  });

  it('a closed track: the challenge still takes entries in the open one; the closed one says "<track> track closed"', async () => {
    await settings({ tracks: ['hardware'] });
    const s = await status();
    expect(s).toMatchObject({
      state: 'open', acceptsEntriesNow: true, acceptsDraftsNow: true, reason: null, openTracks: ['hardware'],
      tracks: { hardware: { acceptsEntriesNow: true, acceptsDraftsNow: true, reason: null }, classical: { acceptsEntriesNow: false, acceptsDraftsNow: false, reason: 'classical track closed' } },
    });
    await agrees(s);
  });

  it('before the window opens with a closed track: drafts only in the open track; a closed challenge takes no drafts before the window either', async () => {
    const opens = minuteAfter(3_600_000);
    await settings({ tracks: ['classical'], submissionWindow: { opensAt: iso(opens) } });
    const s = await status();
    expect(s).toMatchObject({
      state: 'open', acceptsEntriesNow: false, acceptsDraftsNow: true, reason: `opens ${utc(opens)}`, openTracks: ['classical'],
      tracks: { hardware: { acceptsEntriesNow: false, acceptsDraftsNow: false, reason: `opens ${utc(opens)}; hardware track closed` }, classical: { acceptsEntriesNow: false, acceptsDraftsNow: true, reason: `opens ${utc(opens)}` } },
    });
    await agrees(s);
    await settings({ state: 'closed' });
    const c = await status();
    expect(c).toMatchObject({ state: 'closed', acceptsEntriesNow: false, acceptsDraftsNow: false, reason: `submissions closed; opens ${utc(opens)}` });
    expect(c.tracks.classical).toEqual({ acceptsEntriesNow: false, acceptsDraftsNow: false, reason: `submissions closed; opens ${utc(opens)}` });
    await agrees(c);
  });

  it('every reason at once: closed, past the window, a closed track', async () => {
    const closes = minuteAfter(-3_600_000) - 30_000; // an hour ago, at :30 s: seconds are shown when there are any
    await settings({ state: 'closed', tracks: ['classical'], submissionWindow: { closesAt: iso(closes) } });
    const s = await status();
    const shown = `${iso(closes).slice(0, 10)} ${iso(closes).slice(11, 19)} UTC`;
    expect(s).toMatchObject({
      acceptsEntriesNow: false, acceptsDraftsNow: false, reason: `submissions closed; closed ${shown}`, openTracks: ['classical'],
      tracks: { hardware: { acceptsEntriesNow: false, acceptsDraftsNow: false, reason: `submissions closed; closed ${shown}; hardware track closed` }, classical: { acceptsEntriesNow: false, acceptsDraftsNow: false, reason: `submissions closed; closed ${shown}` } },
    });
    await agrees(s);
  });
});

describe('the status is the enforcement (pure)', () => {
  const now = new Date('2026-12-01T12:00:00Z');
  const cases = [
    { state: 'open', settings: {} },
    { state: 'closed', settings: {} },
    { state: 'draft', settings: {} },
    { state: 'open', settings: { tracks: [] } },
    { state: 'open', settings: { tracks: ['classical'] } },
    { state: 'open', settings: { submissionWindow: { opensAt: '2026-12-01T12:00:00Z' } } },
    { state: 'open', settings: { submissionWindow: { opensAt: '2026-12-01T12:00:00.001Z' } } },
    { state: 'open', settings: { tracks: ['hardware'], submissionWindow: { opensAt: '2026-12-24T00:00:00Z' } } },
    { state: 'closed', settings: { submissionWindow: { opensAt: '2026-12-24T00:00:00Z' } } },
    { state: 'open', settings: { submissionWindow: { closesAt: '2026-12-01T12:00:00Z' } } },
    { state: 'open', settings: { submissionWindow: { opensAt: 'not a date', closesAt: '2026-12-24T00:00:00Z' } } },
  ];
  it('acceptsEntriesNow of each track is "gateProblems has nothing against a submission", acceptsDraftsNow "... against a new entry"', () => {
    for (const c of cases) {
      const g = entryGateStatus({ slug: 'x', ...c }, now);
      const s = submissionsStatus({ slug: 'x', ...c }, now);
      for (const t of ['hardware', 'classical'] as const) {
        const submit = gateProblems({ slug: 'x', ...c }, t, now, 'submit');
        const create = gateProblems({ slug: 'x', ...c }, t, now, 'create');
        expect(g.tracks[t].acceptsEntries, JSON.stringify(c)).toBe(submit.length === 0);
        expect(g.tracks[t].acceptsDrafts, JSON.stringify(c)).toBe(create.length === 0);
        expect(g.tracks[t].reasons.length > 0, JSON.stringify(c)).toBe(submit.length > 0);
        expect(s.tracks[t], JSON.stringify(c)).toMatchObject({ acceptsEntriesNow: submit.length === 0, acceptsDraftsNow: create.length === 0 });
        // whatever takes a submission takes a draft
        if (submit.length === 0) expect(create).toEqual([]);
      }
    }
  });

  it('short reasons: no track open, a state other than closed, an invalid date ignored as the enforcement ignores it', () => {
    expect(submissionsStatus({ slug: 'x', state: 'open', settings: { tracks: [] } }, now)).toMatchObject({ acceptsEntriesNow: false, reason: 'no track open', openTracks: [] });
    expect(submissionsStatus({ slug: 'x', state: 'draft', settings: {} }, now)).toMatchObject({ acceptsEntriesNow: false, reason: 'not open (draft)' });
    expect(submissionsStatus({ slug: 'x', state: 'open', settings: { submissionWindow: { opensAt: 'not a date', closesAt: '2026-12-24T00:00:00Z' } } }, now))
      .toMatchObject({ acceptsEntriesNow: true, reason: null, window: { opensAt: null, closesAt: '2026-12-24T00:00:00.000Z' } });
    expect(submissionsStatus({ slug: 'x', state: 'open', settings: { submissionWindow: { closesAt: '2026-12-01T00:00:00Z' } } }, now).reason).toBe('closed 2026-12-01 00:00 UTC');
  });
});
