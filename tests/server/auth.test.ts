import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { agent, lastMailTo, linkIn, makeTestApp, signUpVerified, TEST_PASSWORD, type TestApp } from './helpers';
import { session, verification } from '../../server/db/schema';

let t: TestApp;
beforeAll(async () => { t = await makeTestApp(); });
afterAll(async () => { await t.close(); });

describe('sign-up, verification, sign-in, sign-out', () => {
  it('walks the whole path through the fake mail server', async () => {
    const a = agent(t);
    const up = await a.post('/api/auth/sign-up/email', { email: 'new@lab.test', password: TEST_PASSWORD, name: 'New Person', callbackURL: '/verified' });
    expect(up.status).toBe(200);

    // not verified yet: sign-in is refused and /api/me shows a visitor
    const early = await a.post('/api/auth/sign-in/email', { email: 'new@lab.test', password: TEST_PASSWORD });
    expect(early.status).toBe(403);
    expect(early.body.code).toBe('EMAIL_NOT_VERIFIED');

    const mail = await lastMailTo(t, 'new@lab.test');
    expect(mail.subject).toMatch(/confirm your e-mail/i);
    const link = new URL(linkIn(mail.text));
    expect(link.origin).toBe(t.config.baseUrl);
    // the verification token is not stored in clear (storeIdentifier: hashed)
    const rows = await t.database.db.select().from(verification);
    for (const r of rows) expect(link.search).not.toContain(r.identifier);

    const v = await a.get(link.pathname + link.search);
    expect(v.status).toBe(302);
    expect(v.headers.location).toContain('/verified');

    const inn = await a.post('/api/auth/sign-in/email', { email: 'new@lab.test', password: TEST_PASSWORD });
    expect(inn.status).toBe(200);
    const cookie = String(inn.headers['set-cookie']);
    expect(cookie).toMatch(/parallax\.session_token=/);
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);

    const me = await a.get('/api/me');
    expect(me.body).toMatchObject({ kind: 'user', user: { email: 'new@lab.test', role: 'user', emailVerified: true }, teams: [] });

    const out = await a.post('/api/auth/sign-out', {});
    expect(out.status).toBe(200);
    expect((await a.get('/api/me')).body.kind).toBe('visitor');
  });
});

describe('password reset', () => {
  it('resets through the mailed link, revokes old sessions, and the token works once', async () => {
    const a = await signUpVerified(t, 'forgetful@lab.test');
    const other = agent(t);
    const req = await other.post('/api/auth/request-password-reset', { email: 'forgetful@lab.test', redirectTo: '/reset-password' });
    expect(req.status).toBe(200);
    const link = new URL(linkIn((await lastMailTo(t, 'forgetful@lab.test')).text));
    const hop = await other.get(link.pathname + link.search);
    expect(hop.status).toBe(302);
    const token = new URL(hop.headers.location, t.config.baseUrl).searchParams.get('token');
    expect(token).toBeTruthy();

    const reset = await other.post('/api/auth/reset-password', { newPassword: 'a-brand-new-secret-7', token });
    expect(reset.status).toBe(200);
    // sessions revoked on reset (RELIABILITY.md: session lifecycle)
    expect((await a.get('/api/me')).body.kind).toBe('visitor');
    // single use
    const again = await other.post('/api/auth/reset-password', { newPassword: 'another-new-secret-8', token });
    expect(again.status).toBe(400);

    expect((await other.post('/api/auth/sign-in/email', { email: 'forgetful@lab.test', password: TEST_PASSWORD })).status).toBe(401);
    expect((await other.post('/api/auth/sign-in/email', { email: 'forgetful@lab.test', password: 'a-brand-new-secret-7' })).status).toBe(200);
  });

  it('answers the same for unknown addresses (no account enumeration)', async () => {
    const a = agent(t);
    const known = await a.post('/api/auth/request-password-reset', { email: 'forgetful@lab.test', redirectTo: '/reset-password' });
    const unknown = await a.post('/api/auth/request-password-reset', { email: 'nobody@lab.test', redirectTo: '/reset-password' });
    expect(unknown.status).toBe(known.status);
    expect(unknown.body).toEqual(known.body);
  });
});

describe('teams: creation, invitation mail, acceptance', () => {
  it('a lead creates a team, invites by mail, the invitee accepts and is listed', async () => {
    const lead = await signUpVerified(t, 'lead@team.test', 'Lena Lead');
    const created = await lead.post('/api/auth/organization/create', { name: 'Qubit Orchard', slug: 'qubit-orchard' });
    expect(created.status).toBe(200);
    const teamId = created.body.id as string;
    expect((await lead.get('/api/me')).body.teams).toEqual([{ id: teamId, name: 'Qubit Orchard', slug: 'qubit-orchard', role: 'lead', track: 'classical' }]);

    const inv = await lead.post('/api/auth/organization/invite-member', { email: 'mate@team.test', role: 'member', organizationId: teamId });
    expect(inv.status).toBe(200);
    const mail = await lastMailTo(t, 'mate@team.test');
    expect(mail.subject).toBe('Join the team Qubit Orchard on Parallax');
    const link = new URL(linkIn(mail.text));
    const invitationId = link.pathname.split('/').pop()!;
    expect(link.pathname).toBe(`/invitations/${invitationId}`);

    const mate = await signUpVerified(t, 'mate@team.test', 'Mo Mate');
    const acc = await mate.post('/api/auth/organization/accept-invitation', { invitationId });
    expect(acc.status).toBe(200);

    const page = await agent(t).get(`/api/teams/${teamId}`);
    expect(page.status).toBe(200);
    expect(page.body.members.map((m: { name: string; role: string }) => [m.name, m.role])).toEqual([['Lena Lead', 'lead'], ['Mo Mate', 'member']]);
    expect(JSON.stringify(page.body)).not.toContain('@team.test'); // never e-mail addresses in public

    const invs = await lead.get(`/api/teams/${teamId}/invitations`);
    expect(invs.body.invitations[0]).toMatchObject({ email: 'mate@team.test', status: 'accepted', role: 'member' });
    expect((await mate.get(`/api/teams/${teamId}/invitations`)).status).toBe(403);
  });

  it('an unverified user cannot create a team', async () => {
    const a = agent(t);
    await a.post('/api/auth/sign-up/email', { email: 'unverified@team.test', password: TEST_PASSWORD, name: 'U' });
    const r = await a.post('/api/auth/organization/create', { name: 'Nope', slug: 'nope' });
    expect(r.status).toBe(401); // no session at all until the address is confirmed
  });
});

describe('team API keys', () => {
  it('created by a lead, usable in x-api-key, revoked at once, stored hashed', async () => {
    const lead = await signUpVerified(t, 'keys@team.test', 'Kai Keys');
    const teamId = (await lead.post('/api/auth/organization/create', { name: 'Key Holders', slug: 'key-holders' })).body.id;
    const made = await lead.post(`/api/teams/${teamId}/api-keys`, { name: 'sweep script' });
    expect(made.status).toBe(201);
    const key = made.body.key as string;
    expect(key).toMatch(/^plx_/);
    expect(new Date(made.body.expiresAt).getTime()).toBeGreaterThan(Date.now() + 100 * 86400_000);

    const list = await lead.get(`/api/teams/${teamId}/api-keys`);
    expect(list.body.keys).toHaveLength(1);
    expect(JSON.stringify(list.body)).not.toContain(key);
    const stored = await t.database.db.query.apikey.findFirst();
    expect(stored!.key).not.toBe(key); // hashed at rest

    const me = await agent(t).raw.get('/api/me').set('x-api-key', key);
    expect(me.body).toEqual({ kind: 'api-key', teamId, keyName: 'sweep script' });
    // hundreds of scripted requests are fine (the default quota would be 10 a day)
    for (let i = 0; i < 30; i++) expect((await agent(t).raw.get('/api/me').set('x-api-key', key)).status).toBe(200);

    const del = await lead.delete(`/api/teams/${teamId}/api-keys/${made.body.id}`);
    expect(del.status).toBe(200);
    const after = await agent(t).raw.get('/api/me').set('x-api-key', key);
    expect(after.status).toBe(401);
    expect(after.body.error.message).toMatch(/not valid/);
  });

  it('a plain member cannot create keys', async () => {
    const lead = await signUpVerified(t, 'lead2@team.test');
    const teamId = (await lead.post('/api/auth/organization/create', { name: 'Two', slug: 'two-team' })).body.id;
    await lead.post('/api/auth/organization/invite-member', { email: 'mem2@team.test', role: 'member', organizationId: teamId });
    const invitationId = new URL(linkIn((await lastMailTo(t, 'mem2@team.test')).text)).pathname.split('/').pop();
    const mem = await signUpVerified(t, 'mem2@team.test');
    await mem.post('/api/auth/organization/accept-invitation', { invitationId });
    const r = await mem.post(`/api/teams/${teamId}/api-keys`, { name: 'mine' });
    expect(r.status).toBe(403);
    expect(r.body.error.message).toBe('Only a team lead can do this.');
  });
});

describe('sessions', () => {
  it('end after the absolute lifetime however active they are', async () => {
    const a = await signUpVerified(t, 'longlived@lab.test');
    expect((await a.get('/api/me')).body.kind).toBe('user');
    const before = t.clock.now;
    t.clock.now = new Date(Date.now() + t.config.sessionMaxAgeSec * 1000 + 60_000);
    expect((await a.get('/api/me')).body.kind).toBe('visitor');
    t.clock.now = before;
    const left = await t.database.db.select().from(session).where(eq(session.userId, (await t.database.db.query.user.findFirst({ where: (u, { eq: e }) => e(u.email, 'longlived@lab.test') }))!.id));
    expect(left).toHaveLength(0);
  });
});
