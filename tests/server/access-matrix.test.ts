/**
 * The authorisation matrix (RELIABILITY.md item 13): every API route x every kind of caller has an
 * expected status, written out below. A route added to the server without a row here fails the
 * first test, so the table cannot fall behind the code.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { publishEntry } from '../../server/services/publish-entry';
import { lastMailTo, linkIn, makeTestApp, ORIGIN, setRole, signUpVerified, type Agent, type TestApp } from './helpers';

type Caller = 'anon' | 'memberA' | 'leadA' | 'memberB' | 'moderator' | 'admin' | 'keyA';
const CALLERS: Caller[] = ['anon', 'memberA', 'leadA', 'memberB', 'moderator', 'admin', 'keyA'];
type Row = Record<Caller, number>;

// row shapes, spelt out so each route's line says exactly who gets what
const ALL_200: Row = { anon: 200, memberA: 200, leadA: 200, memberB: 200, moderator: 200, admin: 200, keyA: 200 };
const LEAD_A = (ok: number): Row => ({ anon: 401, memberA: 403, leadA: ok, memberB: 403, moderator: 403, admin: 403, keyA: 403 });
const MODERATOR = (ok: number): Row => ({ anon: 401, memberA: 403, leadA: 403, memberB: 403, moderator: ok, admin: ok, keyA: 403 });
const ADMIN = (ok: number): Row => ({ anon: 401, memberA: 403, leadA: 403, memberB: 403, moderator: 403, admin: ok, keyA: 403 });
// team A's members and its API key; team B, moderators and admins are refused (entries are the team's own)
const TEAM_A = (ok: number): Row => ({ anon: 401, memberA: ok, leadA: ok, memberB: 403, moderator: 403, admin: 403, keyA: ok });

interface Probe { row: Row; path: (ids: Ids) => string; body?: (ids: Ids) => object }
interface Ids { teamA: string; teamB: string; memberBUserId: string; messageId: string; jobId: string; checksum: string; spareKeyId: string; adminFollowId: string; unfollowToken: string; entryDraft: string; entrySubmit: string; entryWithdraw: string; entryPublished: string; entryReview: string; entryDelete: string }
// a spec the moderators' routes accept (400 for everyone else never happens: access is checked first)
const SPEC = { id: 'matrix-chain', version: 1, title: 'Matrix chain', description: 'x', lattice: { kind: 'chain', n: 4 }, circuit: { family: 'kicked-ising', steps: [1], thetaH: [0.1] }, observables: [{ id: 'z1', pauli: 'Z1' }] };

// an entry for the seeded challenge (one target)
const ENTRY = (i: Ids) => ({ challenge: { id: 'seeded-chain', version: 1, checksum: i.checksum }, track: 'classical', label: 'matrix', method: { family: 'exact' }, estimates: [{ target: 't1-h0.100000:z1', value: 0.99, uncertainty: 0.01, uncertaintyKind: 'statistical' }] });

const MATRIX: Record<string, Probe> = {
  'GET /health': { row: ALL_200, path: () => '/api/health' },
  'GET /me': { row: ALL_200, path: () => '/api/me' },
  'GET /teams': { row: ALL_200, path: () => '/api/teams' },
  'GET /teams/:teamId': { row: ALL_200, path: (i) => `/api/teams/${i.teamA}` },
  'GET /teams/:teamId/invitations': { row: LEAD_A(200), path: (i) => `/api/teams/${i.teamA}/invitations` },
  'GET /teams/:teamId/api-keys': { row: LEAD_A(200), path: (i) => `/api/teams/${i.teamA}/api-keys` },
  'POST /teams/:teamId/api-keys': { row: LEAD_A(201), path: (i) => `/api/teams/${i.teamA}/api-keys`, body: () => ({ name: 'matrix' }) },
  // an existing second key of team A (not the one keyA uses): everyone but the lead is refused on it, so a
  // wrong decision for an earlier caller revokes it and the lead's call then fails with 404
  'DELETE /teams/:teamId/api-keys/:keyId': { row: LEAD_A(200), path: (i) => `/api/teams/${i.teamA}/api-keys/${i.spareKeyId}` },
  'GET /admin/users': { row: ADMIN(200), path: () => '/api/admin/users' },
  'POST /admin/users/:userId/role': { row: ADMIN(200), path: (i) => `/api/admin/users/${i.memberBUserId}/role`, body: () => ({ role: 'user' }) },
  'POST /admin/users/:userId/ban': { row: ADMIN(200), path: (i) => `/api/admin/users/${i.memberBUserId}/ban`, body: () => ({ banned: false }) },
  'GET /admin/outbox': { row: ADMIN(200), path: () => '/api/admin/outbox' },
  'GET /admin/outbox/:messageId': { row: ADMIN(200), path: (i) => `/api/admin/outbox/${i.messageId}` },
  'GET /challenges': { row: ALL_200, path: () => '/api/challenges' },
  'GET /challenges/:slug': { row: ALL_200, path: () => '/api/challenges/seeded-chain' },
  'GET /challenges/:slug/targets': { row: ALL_200, path: () => '/api/challenges/seeded-chain/targets' },
  'GET /challenges/:slug/spec.json': { row: ALL_200, path: () => '/api/challenges/seeded-chain/spec.json' },
  'GET /challenges/:slug/instances/:instanceKey/qasm': { row: ALL_200, path: () => '/api/challenges/seeded-chain/instances/t1-h0.100000/qasm' },
  'GET /challenges/:slug/plan': { row: ALL_200, path: () => '/api/challenges/seeded-chain/plan' },
  'POST /challenges/preview': { row: MODERATOR(200), path: () => '/api/challenges/preview', body: () => SPEC },
  // the first moderator call stores the draft (201); the admin's identical call then meets the checksum (409)
  'POST /challenges': { row: { ...MODERATOR(201), admin: 409 }, path: () => '/api/challenges', body: () => SPEC },
  // nothing left to publish for the second caller
  'POST /challenges/:slug/publish': { row: { ...MODERATOR(200), admin: 409 }, path: () => '/api/challenges/matrix-chain/publish', body: () => ({}) },
  'GET /jobs/:jobId': { row: ALL_200, path: (i) => `/api/jobs/${i.jobId}` },
  // entries: members of team B post for team B (201); moderators and admins are in no team (403)
  'POST /challenges/:slug/entries': { row: { ...TEAM_A(201), memberB: 201 }, path: () => '/api/challenges/seeded-chain/entries', body: ENTRY },
  'POST /entries/validate': { row: ALL_200, path: () => '/api/entries/validate', body: ENTRY },
  // a draft: its team and moderators see it, nobody else learns it exists
  'GET /entries/:entryId': { row: { anon: 404, memberA: 200, leadA: 200, memberB: 404, moderator: 200, admin: 200, keyA: 200 }, path: (i) => `/api/entries/${i.entryDraft}` },
  'PUT /entries/:entryId': { row: TEAM_A(200), path: (i) => `/api/entries/${i.entryDraft}`, body: ENTRY },
  // the first caller of the team moves it; the later ones meet the new state (409)
  'POST /entries/:entryId/submit': { row: { ...TEAM_A(200), leadA: 409, keyA: 409 }, path: (i) => `/api/entries/${i.entrySubmit}/submit` },
  'POST /entries/:entryId/withdraw': { row: { ...TEAM_A(200), leadA: 409, keyA: 409 }, path: (i) => `/api/entries/${i.entryWithdraw}/withdraw`, body: () => ({ reason: 'matrix' }) },
  'POST /entries/:entryId/revise': { row: { ...TEAM_A(201), leadA: 409, keyA: 409 }, path: (i) => `/api/entries/${i.entryPublished}/revise` },
  'GET /teams/:teamId/entries': { row: ALL_200, path: (i) => `/api/teams/${i.teamA}/entries` },
  'GET /challenges/:slug/entries': { row: ALL_200, path: () => '/api/challenges/seeded-chain/entries' },
  'GET /openapi.json': { row: ALL_200, path: () => '/api/openapi.json' },
  'GET /challenges/:slug/standings': { row: ALL_200, path: () => '/api/challenges/seeded-chain/standings' },
  'GET /challenges/:slug/agreement': { row: ALL_200, path: () => '/api/challenges/seeded-chain/agreement' },
  'GET /challenges/:slug/estimates': { row: ALL_200, path: () => '/api/challenges/seeded-chain/estimates' },
  'GET /challenges/:slug/targets/:targetKey': { row: ALL_200, path: () => '/api/challenges/seeded-chain/targets/t1-h0.100000:z1' },
  'GET /challenges/:slug/targets/:targetKey/light-cone': { row: ALL_200, path: () => '/api/challenges/seeded-chain/targets/t1-h0.100000:z1/light-cone' },
  'GET /challenges/:slug/history': { row: ALL_200, path: () => '/api/challenges/seeded-chain/history' },
  'GET /challenges/:slug/export.csv': { row: ALL_200, path: () => '/api/challenges/seeded-chain/export.csv' },
  'GET /challenges/:slug/export.json': { row: ALL_200, path: () => '/api/challenges/seeded-chain/export.json' },
  'GET /challenges/:slug/package.json': { row: ALL_200, path: () => '/api/challenges/seeded-chain/package.json' },
  'GET /challenges/:slug/cite.bib': { row: ALL_200, path: () => '/api/challenges/seeded-chain/cite.bib' },
  'GET /challenges/:slug/CITATION.cff': { row: ALL_200, path: () => '/api/challenges/seeded-chain/CITATION.cff' },
  // a published entry is citable by anyone (a draft is not: the test after the matrix)
  'GET /entries/:entryId/cite.bib': { row: ALL_200, path: (i) => `/api/entries/${i.entryPublished}/cite.bib` },
  // moderation: team leads and API keys cannot moderate
  'GET /moderation/queue': { row: MODERATOR(200), path: () => '/api/moderation/queue' },
  // the moderator decides; the admin's later call finds it decided (409)
  'POST /entries/:entryId/decision': { row: { ...MODERATOR(200), admin: 409 }, path: (i) => `/api/entries/${i.entryReview}/decision`, body: () => ({ decision: 'return', reason: 'matrix' }) },
  'POST /entries/:entryId/curation': { row: MODERATOR(200), path: (i) => `/api/entries/${i.entryPublished}/curation`, body: () => ({ featured: true }) },
  'POST /challenges/:slug/targets/:targetKey/dispute': { row: MODERATOR(200), path: () => '/api/challenges/seeded-chain/targets/t1-h0.100000:z1/dispute', body: () => ({ disputed: false }) },
  'POST /challenges/:slug/settings': { row: MODERATOR(200), path: () => '/api/challenges/seeded-chain/settings', body: () => ({ license: 'CC-BY-4.0' }) },
  'POST /challenges/:slug/seal': { row: MODERATOR(200), path: () => '/api/challenges/seeded-chain/seal', body: () => ({ targets: 'all', until: new Date(Date.now() + 86400_000).toISOString() }) },
  // after the seal above: team A (members and its key) may commit to its entry
  'POST /entries/:entryId/commitment': { row: TEAM_A(200), path: (i) => `/api/entries/${i.entryPublished}/commitment`, body: () => ({ sha256: 'a'.repeat(64) }) },
  // before the reveal: team A and moderators only
  'GET /entries/:entryId/commitment': { row: { anon: 404, memberA: 200, leadA: 200, memberB: 404, moderator: 200, admin: 200, keyA: 200 }, path: (i) => `/api/entries/${i.entryPublished}/commitment` },
  'GET /audit': { row: MODERATOR(200), path: () => '/api/audit' },
  // for scripts (issue 13)
  'GET /challenges/:slug/sample-entry.json': { row: ALL_200, path: () => '/api/challenges/seeded-chain/sample-entry.json' },
  'GET /challenges/:slug/spec.canonical.json': { row: ALL_200, path: () => '/api/challenges/seeded-chain/spec.canonical.json' },
  'GET /entries/:entryId/entry.json': { row: { anon: 404, memberA: 200, leadA: 200, memberB: 404, moderator: 200, admin: 200, keyA: 200 }, path: (i) => `/api/entries/${i.entryDraft}/entry.json` },
  // the first member of team A deletes the draft; after that it is gone for everyone (404)
  'DELETE /entries/:entryId': { row: { anon: 401, memberA: 200, leadA: 404, memberB: 404, moderator: 404, admin: 404, keyA: 404 }, path: (i) => `/api/entries/${i.entryDelete}` },
  // following: signed-in users only; API keys are for entries
  'GET /me/follows': { row: { anon: 401, memberA: 200, leadA: 200, memberB: 200, moderator: 200, admin: 200, keyA: 403 }, path: () => '/api/me/follows' },
  'POST /follows': { row: { anon: 401, memberA: 201, leadA: 201, memberB: 201, moderator: 201, admin: 201, keyA: 403 }, path: () => '/api/follows', body: () => ({ subjectType: 'challenge', subjectId: 'seeded-chain' }) },
  // an existing follow of the admin (the last signed-in caller): the others' calls meet a follow that
  // exists but is not theirs (404, and it must stay: the admin's own call then removes it)
  'DELETE /follows/:followId': { row: { anon: 401, memberA: 404, leadA: 404, memberB: 404, moderator: 404, admin: 200, keyA: 403 }, path: (i) => `/api/follows/${i.adminFollowId}` },
  // the token of an existing follow of member B: whoever holds it unfollows (anon first, 200); used once, later calls find nothing
  'POST /follows/unfollow': { row: { anon: 200, memberA: 404, leadA: 404, memberB: 404, moderator: 404, admin: 404, keyA: 404 }, path: () => '/api/follows/unfollow', body: (i) => ({ token: i.unfollowToken }) },
  'GET /challenges/:slug/feed.atom': { row: ALL_200, path: () => '/api/challenges/seeded-chain/feed.atom' },
};

let t: TestApp;
const as: Partial<Record<Caller, Agent>> = {};
let key = '';
let ids: Ids;

async function teamWithMember(lead: Agent, name: string, memberEmail: string) {
  const teamId = (await lead.post('/api/auth/organization/create', { name, slug: name.toLowerCase().replace(/\W+/g, '-') })).body.id as string;
  await lead.post('/api/auth/organization/invite-member', { email: memberEmail, role: 'member', organizationId: teamId });
  const invitationId = new URL(linkIn((await lastMailTo(t, memberEmail)).text)).pathname.split('/').pop();
  const m = await signUpVerified(t, memberEmail);
  expect((await m.post('/api/auth/organization/accept-invitation', { invitationId })).status).toBe(200);
  return { teamId, member: m };
}

beforeAll(async () => {
  t = await makeTestApp();
  as.leadA = await signUpVerified(t, 'lead-a@m.test');
  const a = await teamWithMember(as.leadA, 'Team A', 'member-a@m.test');
  as.memberA = a.member;
  const leadB = await signUpVerified(t, 'lead-b@m.test');
  const b = await teamWithMember(leadB, 'Team B', 'member-b@m.test');
  as.memberB = b.member;
  as.moderator = await signUpVerified(t, 'mod@m.test');
  await setRole(t, 'mod@m.test', 'moderator');
  as.admin = await signUpVerified(t, 'admin@m.test');
  await setRole(t, 'admin@m.test', 'admin');
  key = (await as.leadA.post(`/api/teams/${a.teamId}/api-keys`, { name: 'matrix key' })).body.key;
  const users = (await as.admin.get('/api/admin/users')).body.users as { id: string; email: string }[];
  const outbox = (await as.admin.get('/api/admin/outbox')).body.messages as { id: string }[];
  // a published challenge for the public routes
  const seeded = { ...SPEC, id: 'seeded-chain', title: 'Seeded chain' };
  expect((await as.moderator.post('/api/challenges', seeded)).status).toBe(201);
  const pub = await as.moderator.post('/api/challenges/seeded-chain/publish', {});
  expect(pub.status).toBe(200);
  ids = { teamA: a.teamId, teamB: b.teamId, memberBUserId: users.find((u) => u.email === 'member-b@m.test')!.id, messageId: outbox[0].id, jobId: pub.body.jobId, checksum: pub.body.checksum, spareKeyId: '', adminFollowId: '', unfollowToken: '', entryDraft: '', entrySubmit: '', entryWithdraw: '', entryPublished: '', entryReview: '', entryDelete: '' };
  // existing objects for the routes that act on one: a second API key of team A, a follow of the
  // admin (team B), and a follow of member B (team A) whose unfollow token is read from the database
  const spare = await as.leadA.post(`/api/teams/${a.teamId}/api-keys`, { name: 'spare key' });
  expect(spare.status).toBe(201);
  ids.spareKeyId = spare.body.id;
  const adminFollow = await as.admin.post('/api/follows', { subjectType: 'team', subjectId: b.teamId });
  expect(adminFollow.status).toBe(201);
  ids.adminFollowId = adminFollow.body.id;
  const bFollow = await as.memberB.post('/api/follows', { subjectType: 'team', subjectId: a.teamId });
  expect(bFollow.status).toBe(201);
  const bRow = await t.database.db.query.follows.findFirst({ where: (f, { eq }) => eq(f.id, bFollow.body.id as string) });
  ids.unfollowToken = bRow!.token;
  // team A's entries in the states the entry routes need
  const newEntry = async () => {
    const r = await as.memberA!.post('/api/challenges/seeded-chain/entries', ENTRY(ids));
    expect(r.status).toBe(201);
    return r.body.id as string;
  };
  ids.entryDraft = await newEntry();
  ids.entrySubmit = await newEntry();
  ids.entryWithdraw = await newEntry();
  ids.entryPublished = await newEntry();
  ids.entryReview = await newEntry();
  ids.entryDelete = await newEntry();
  expect((await as.memberA!.post(`/api/entries/${ids.entryReview}/submit`)).status).toBe(200);
  expect((await as.memberA!.post(`/api/entries/${ids.entryPublished}/submit`)).status).toBe(200);
  await t.database.db.transaction((tx) => publishEntry(tx, ids.entryPublished, { kind: 'system', label: 'matrix' }, new Date()));
}, 120_000);
afterAll(async () => { await t.close(); });

describe('authorisation matrix', () => {
  it('has a row for every route the server declares, and no stale rows', () => {
    const declared = t.routes.defs.map((d) => `${d.method.toUpperCase()} ${d.path}`).sort();
    expect(Object.keys(MATRIX).sort()).toEqual(declared);
  });

  for (const [route, probe] of Object.entries(MATRIX)) {
    it(route, async () => {
      const [method] = route.split(' ');
      const got: Partial<Row> = {};
      for (const c of CALLERS) {
        const p = probe.path(ids);
        const body = probe.body?.(ids);
        let res;
        if (c === 'anon' || c === 'keyA') {
          const r = request(t.app)[method.toLowerCase() as 'get'](p).set('Origin', ORIGIN);
          if (c === 'keyA') r.set('x-api-key', key);
          res = body ? await r.send(body) : await r;
        } else {
          const a = as[c]!;
          const m = method.toLowerCase() as 'get' | 'post' | 'put' | 'delete';
          res = m === 'get' ? await a.get(p) : m === 'delete' ? await a.delete(p) : m === 'put' ? await a.put(p, body) : await a.post(p, body);
        }
        got[c] = res.status;
      }
      expect(got).toEqual(probe.row);
    });
  }

  it('an entry that is not published is not citable by anyone, its own team included', async () => {
    const got: Partial<Row> = {};
    for (const c of CALLERS) {
      const p = `/api/entries/${ids.entryDraft}/cite.bib`;
      const r = c === 'anon' || c === 'keyA' ? request(t.app).get(p).set('Origin', ORIGIN) : as[c]!.get(p);
      if (c === 'keyA') (r as request.Test).set('x-api-key', key);
      got[c] = (await r).status;
    }
    expect(got).toEqual({ anon: 404, memberA: 404, leadA: 404, memberB: 404, moderator: 404, admin: 404, keyA: 404 });
  });
});
