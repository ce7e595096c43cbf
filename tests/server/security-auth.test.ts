/**
 * Issue 12, the accounts and teams findings, each reproduced as the attack the review made:
 * 4 team metadata over the team's own fields, reserved and look-alike names; 5 a banned user's API
 * key; 6 unlimited invitation mails and teams; 7 the house team's slug taken first; 9 the sign-in
 * lockout of any account from any address; 12 the timing of password-reset requests; 13
 * better-auth's own admin and API-key endpoints; 15 javascript: and data: links in entries.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { and, count, eq } from 'drizzle-orm';
import { agent, lastMailTo, linkIn, makeTestApp, ORIGIN, setRole, signUpVerified, TEST_PASSWORD, type Agent, type TestApp } from './helpers';
import { auditLog, apikey, mailMessages, member, organization, signInFailures, user } from '../../server/db/schema';
import { HOUSE_TEAM } from '../../server/jobs/baseline-job';
import { createApp } from '../../server/app';
import { createLogger } from '../../server/log';
import { lookAlikeKey } from '../../server/services/team-rules';
import { OPEN_AUTH_PATHS } from '../../server/middleware/auth-paths';
import { schemaProblems } from '../../server/services/validate-entry';
import { FULL_ENTRY } from './entries-fixtures';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp({
    // the production throttle (helpers.ts raises it for flows that sign in many users), and the
    // client address from X-Forwarded-For (one trusted proxy hop) so a test can play two addresses
    signInThrottle: { windowMs: 10_000, maxFailures: 3, perAddressFailures: 30, maxDelayMs: 15 * 60_000, forgetAfterMs: 86_400_000 },
    trustProxyHops: 1,
  });
});
afterAll(async () => { await t.close(); });

const mailsTo = async (to: string) => { await t.ctx.mailQueue.idle(); return Number((await t.database.db.select({ n: count() }).from(mailMessages).where(eq(mailMessages.to, to)))[0].n); };
const makeTeam = (a: Agent, name: string, slug: string, metadata?: object) => a.post('/api/auth/organization/create', { name, slug, ...(metadata ? { metadata } : {}) });

describe('item 4: team metadata and names', () => {
  let lead: Agent;
  let teamId = '';
  beforeAll(async () => {
    lead = await signUpVerified(t, 'lead4@sec.test', 'Lina Four');
    const r = await makeTeam(lead, 'Qubit Orchard', 'qubit-orchard', { track: 'hardware', description: 'Trapped ions.' });
    expect(r.status, r.text).toBe(200);
    teamId = r.body.id;
  });

  it('an organization update whose metadata claims another id and name is refused (400 naming the fields); the page keeps its own', async () => {
    const r = await lead.post('/api/auth/organization/update', { organizationId: teamId, data: { metadata: { id: HOUSE_TEAM.id, name: HOUSE_TEAM.name, track: 'classical' } } });
    expect(r.status, r.text).toBe(400);
    expect(r.body.message).toBe('metadata may hold only "track" and "description"; remove "id", "name".');
    const page = await agent(t).get(`/api/teams/${teamId}`);
    expect(page.body).toMatchObject({ id: teamId, name: 'Qubit Orchard', slug: 'qubit-orchard', track: 'hardware', description: 'Trapped ions.' });
  });

  it('metadata stored before the rule (or written around it) never replaces id, name, slug or members on the team pages', async () => {
    // before the fix: GET /api/teams/:id answered id "parallax-house" and the house team's name
    await t.database.db.update(organization).set({ metadata: JSON.stringify({ id: HOUSE_TEAM.id, name: HOUSE_TEAM.name, slug: HOUSE_TEAM.slug, members: [], track: 'quantum-magic', description: 'x'.repeat(600) }) }).where(eq(organization.id, teamId));
    const page = await agent(t).get(`/api/teams/${teamId}`);
    expect(page.body).toMatchObject({ id: teamId, name: 'Qubit Orchard', slug: 'qubit-orchard' });
    expect(page.body.members).toEqual([{ name: 'Lina Four', role: 'lead', since: expect.any(String) }]);
    expect(page.body).not.toHaveProperty('track'); // not one of the two tracks
    expect(page.body).not.toHaveProperty('description'); // over 500 characters
    const list = await agent(t).get('/api/teams');
    const row = list.body.teams.find((x: { id: string }) => x.id === teamId);
    expect(row).toMatchObject({ id: teamId, name: 'Qubit Orchard', slug: 'qubit-orchard', members: 1 });
    expect(list.body.teams.filter((x: { id: string }) => x.id === HOUSE_TEAM.id)).toHaveLength(1);
  });

  it('a valid update of track and description goes through', async () => {
    const r = await lead.post('/api/auth/organization/update', { organizationId: teamId, data: { metadata: { track: 'classical', description: 'Now simulating.' } } });
    expect(r.status, r.text).toBe(200);
    expect((await agent(t).get(`/api/teams/${teamId}`)).body).toMatchObject({ track: 'classical', description: 'Now simulating.' });
  });

  it.each([
    ['Parallax house baseline', 'house-copy', /reserved/],
    ['PARALLAX HOUSE BASELINE', 'house-copy', /reserved/],
    ['Pаrallax Team', 'pteam', /reserved/], // Cyrillic а
    ['Team Ten', 'parallax-house', /slug "parallax-house" is reserved/],
    ['Team Ten', 'parallax-official', /reserved/],
    ['QUBIT ORCHARD', 'orchard-two', /too close to the existing team "Qubit Orchard"/],
    ['Qubit 0rchard', 'orchard-three', /too close/], // digit zero
    ['Qubit Órchard', 'orchard-four', /too close/], // accent
    ['Qubit Оrchard', 'orchard-five', /too close/], // Cyrillic О
    ['Other Orchard', 'qubit-0rchard', /too close to the existing slug "qubit-orchard"/],
  ])('refuses the name %j with slug %j', async (name, slug, msg) => {
    const r = await makeTeam(lead, name, slug);
    expect(r.status, r.text).toBe(400);
    expect(r.body.message).toMatch(msg);
  });

  it('a lead cannot rename a team to a reserved or look-alike name either', async () => {
    const r = await lead.post('/api/auth/organization/update', { organizationId: teamId, data: { name: 'Parallax House Baseline' } });
    expect(r.status).toBe(400);
    expect((await agent(t).get(`/api/teams/${teamId}`)).body.name).toBe('Qubit Orchard');
  });

  it('look-alike keys (checked against the mapping, common practice for confusable detection)', () => {
    expect(lookAlikeKey('Qubit Orchard')).toBe(lookAlikeKey('qubit  0RCHARD'));
    expect(lookAlikeKey('Qubit Orchard')).toBe(lookAlikeKey('Qubіt Оrchard')); // Cyrillic і and О
    expect(lookAlikeKey('Qubit Orchard')).not.toBe(lookAlikeKey('Qubit Orchards'));
  });
});

describe('item 5: a ban revokes the API keys the user made and their team roles', () => {
  it('the banned lead’s key is refused at once; the key row and the membership are gone; the audit line says so', async () => {
    const lead = await signUpVerified(t, 'lead5@sec.test', 'Bo Banned');
    const teamId = (await makeTeam(lead, 'Ban Test Team', 'ban-test-team')).body.id;
    const made = await lead.post(`/api/teams/${teamId}/api-keys`, { name: 'sweep' });
    expect(made.status).toBe(201);
    const [row] = await t.database.db.select().from(apikey).where(eq(apikey.id, made.body.id));
    const [u] = await t.database.db.select().from(user).where(eq(user.email, 'lead5@sec.test'));
    expect(row.createdBy).toBe(u.id);
    expect((await lead.get(`/api/teams/${teamId}/api-keys`)).body.keys[0]).toMatchObject({ name: 'sweep', createdBy: 'Bo Banned' });
    expect((await request(t.app).get('/api/me').set('x-api-key', made.body.key)).status).toBe(200);

    const admin = await signUpVerified(t, 'admin5@sec.test');
    await setRole(t, 'admin5@sec.test', 'admin');
    const ban = await admin.post(`/api/admin/users/${u.id}/ban`, { banned: true, reason: 'abuse' });
    expect(ban.status, ban.text).toBe(200);
    expect(ban.body).toMatchObject({ banned: true, keysRevoked: 1, teamsLeft: 1 });
    // before the fix: 200 (the ban only ended sessions)
    const after = await request(t.app).get('/api/me').set('x-api-key', made.body.key);
    expect(after.status).toBe(401);
    expect(await t.database.db.select().from(apikey).where(eq(apikey.createdBy, u.id))).toHaveLength(0);
    expect(await t.database.db.select().from(member).where(eq(member.userId, u.id))).toHaveLength(0);
    const [line] = await t.database.db.select().from(auditLog).where(and(eq(auditLog.action, 'user.ban'), eq(auditLog.subjectId, u.id)));
    expect(line.details).toMatchObject({ keysRevoked: [made.body.id], teamsLeft: [teamId] });
  });

  it('the actor middleware refuses a key whose creator is banned or no longer leads the team, even if the key row is still there', async () => {
    const lead = await signUpVerified(t, 'lead5b@sec.test');
    const teamId = (await makeTeam(lead, 'Second Ban Team', 'second-ban-team')).body.id;
    const key = (await lead.post(`/api/teams/${teamId}/api-keys`, { name: 'k' })).body.key as string;
    const [u] = await t.database.db.select().from(user).where(eq(user.email, 'lead5b@sec.test'));
    await t.database.db.update(user).set({ banned: true }).where(eq(user.id, u.id)); // banned by another path (better-auth's own admin)
    const r = await request(t.app).get('/api/me').set('x-api-key', key);
    expect(r.status).toBe(401);
    expect(r.body.error.message).toMatch(/banned or no longer leads the team/);
    await t.database.db.update(user).set({ banned: false }).where(eq(user.id, u.id));
    expect((await request(t.app).get('/api/me').set('x-api-key', key)).status).toBe(200);
    await t.database.db.update(member).set({ role: 'member' }).where(eq(member.userId, u.id));
    expect((await request(t.app).get('/api/me').set('x-api-key', key)).status).toBe(401);
  });
});

describe('item 6: invitation mails, teams per user, team names', () => {
  it('re-inviting one address: at most 3 mails a day to that recipient, then 429 with Retry-After', async () => {
    const lead = await signUpVerified(t, 'lead6@sec.test');
    const teamId = (await makeTeam(lead, 'Inviting Team', 'inviting-team')).body.id;
    const codes: number[] = [];
    for (let i = 0; i < 10; i++) {
      const r = await lead.post('/api/auth/organization/invite-member', { email: 'target6@sec.test', role: 'member', organizationId: teamId, resend: true });
      codes.push(r.status);
    }
    // before the fix: 10 x 200 and 10 mails
    expect(codes).toEqual([200, 200, 200, 429, 429, 429, 429, 429, 429, 429]);
    expect(await mailsTo('target6@sec.test')).toBe(3);
    const r = await lead.post('/api/auth/organization/invite-member', { email: 'Target6@sec.test', role: 'member', organizationId: teamId, resend: true });
    expect(r.status).toBe(429);
    expect(r.headers['retry-after']).toBe('86400');
    expect(r.body.message).toMatch(/This address has received 3 invitations in the last 24 hours/);
    t.clock.advance(86_400_000 + 1000); // the limit reads the injected clock
    expect((await lead.post('/api/auth/organization/invite-member', { email: 'target6@sec.test', role: 'member', organizationId: teamId, resend: true })).status).toBe(200);
  });

  it('one sender: at most 20 invitation mails an hour', async () => {
    const lead = await signUpVerified(t, 'lead6b@sec.test');
    const teamId = (await makeTeam(lead, 'Mass Mailers', 'mass-mailers')).body.id;
    const codes: number[] = [];
    for (let i = 0; i < 22; i++) codes.push((await lead.post('/api/auth/organization/invite-member', { email: `spam${i}@sec.test`, role: 'member', organizationId: teamId })).status);
    expect(codes.filter((c) => c === 200)).toHaveLength(20);
    expect(codes.slice(20)).toEqual([429, 429]);
    t.clock.advance(3600_000 + 1000);
    expect((await lead.post('/api/auth/organization/invite-member', { email: 'spam21@sec.test', role: 'member', organizationId: teamId })).status).toBe(200);
  });

  it("a user's name that carries a link is not quoted in the invitation or welcome mail", async () => {
    const lead = await signUpVerified(t, 'linky@sec.test', 'Prizes at https://evil.test/win');
    const welcome = await lastMailTo(t, 'linky@sec.test');
    expect(welcome.text).toContain('Welcome to Parallax, new member.');
    expect(welcome.text).not.toContain('evil.test');
    const teamId = (await makeTeam(lead, 'Plain Name Team', 'plain-name-team')).body.id;
    expect((await lead.post('/api/auth/organization/invite-member', { email: 'linky-target@sec.test', role: 'member', organizationId: teamId })).status).toBe(200);
    const mail = await lastMailTo(t, 'linky-target@sec.test');
    // before the fix: "Prizes at https://evil.test/win invites you ..."
    expect(mail.text).toMatch(/^A team lead invites you to the team "Plain Name Team"/);
    expect(mail.text).not.toContain('evil.test');
  });

  it('a user leads at most 5 teams', async () => {
    const a = await signUpVerified(t, 'collector@sec.test');
    const codes: number[] = [];
    for (let i = 0; i < 7; i++) codes.push((await makeTeam(a, `Collector Team ${'ABCDEFG'[i]}`, `collector-${i}`)).status);
    expect(codes).toEqual([200, 200, 200, 200, 200, 403, 403]);
    const r = await makeTeam(a, 'Collector Team H', 'collector-h');
    expect(r.body.message).toMatch(/You already lead 5 teams/);
  });

  it.each([
    ['Click https://evil.test/win', /web or e-mail address/],
    ['Visit www example', /web or e-mail address/],
    ['free-prizes.com', /web or e-mail address/],
    ['Mail me@evil.test', /web or e-mail address/],
    ['Team <script>', /letters, digits, spaces/],
    ['Team\r\nBcc: victim', /letters, digits, spaces/],
    ['x', /2 to 80 characters/],
    ['y'.repeat(81), /2 to 80 characters/],
  ])('refuses the team name %j', async (name, msg) => {
    const a = await signUpVerified(t, `names-${Math.random().toString(36).slice(2, 8)}@sec.test`);
    const r = await makeTeam(a, name, 'some-slug');
    expect(r.status).toBe(400);
    expect(r.body.message).toMatch(msg);
  });
});

describe('item 7: the house team is part of the schema', () => {
  it('exists in a fresh database with the id, name and slug the baseline job uses; nobody can take its slug', async () => {
    const [h] = await t.database.db.select().from(organization).where(eq(organization.id, HOUSE_TEAM.id));
    expect(h).toMatchObject(HOUSE_TEAM);
    const a = await signUpVerified(t, 'squatter@sec.test');
    // before the fix: 200, the squatter's team took the slug and the baseline insert failed later
    const r = await makeTeam(a, 'House Squatters', HOUSE_TEAM.slug);
    expect(r.status).toBe(400);
    expect(await t.database.db.select().from(organization).where(eq(organization.slug, HOUSE_TEAM.slug))).toHaveLength(1);
  });
});

describe('item 9: sign-in throttle per (account, address), in the database', () => {
  const signIn = (ip: string, email: string, password: string) =>
    request(t.app).post('/api/auth/sign-in/email').set('Origin', ORIGIN).set('X-Forwarded-For', ip).send({ email, password });

  it('three failures from one address slow that address down on that account only; the owner signs in from another', async () => {
    await signUpVerified(t, 'victim9@sec.test');
    const codes: number[] = [];
    for (let i = 0; i < 5; i++) codes.push((await signIn('198.51.100.7', 'victim9@sec.test', 'wrong-password-1')).status);
    expect(codes).toEqual([401, 401, 401, 429, 429]);
    // before the fix: 429 for the owner too (the account was locked for every address)
    expect((await signIn('203.0.113.20', 'victim9@sec.test', TEST_PASSWORD)).status).toBe(200);
    // and the attacker's address may still sign in to its own account
    await signUpVerified(t, 'attacker9@sec.test');
    expect((await signIn('198.51.100.7', 'attacker9@sec.test', TEST_PASSWORD)).status).toBe(200);
  });

  it('the delays double with every further failure: 10 s, 20 s, 40 s', async () => {
    await signUpVerified(t, 'slow9@sec.test');
    for (let i = 0; i < 3; i++) await signIn('198.51.100.8', 'slow9@sec.test', 'wrong-password-1');
    const waits: number[] = [];
    for (let i = 0; i < 3; i++) {
      const blocked = await signIn('198.51.100.8', 'slow9@sec.test', 'wrong-password-1');
      expect(blocked.status).toBe(429);
      waits.push(Number(blocked.headers['retry-after']));
      t.clock.advance(waits[i] * 1000);
      expect((await signIn('198.51.100.8', 'slow9@sec.test', 'wrong-password-1')).status).toBe(401);
    }
    expect(waits).toEqual([10, 20, 40]);
    // a success clears the pair
    t.clock.advance(80_000);
    expect((await signIn('198.51.100.8', 'slow9@sec.test', TEST_PASSWORD)).status).toBe(200);
    expect((await signIn('198.51.100.8', 'slow9@sec.test', 'wrong-password-1')).status).toBe(401);
  });

  it('a second server process on the same database sees the block (the counts are not in one process’s memory)', async () => {
    await signUpVerified(t, 'shared9@sec.test');
    for (let i = 0; i < 3; i++) await signIn('198.51.100.9', 'shared9@sec.test', 'wrong-password-1');
    const second = await createApp({ database: t.database, mailer: { send: async () => {}, close: () => {} }, config: t.config, log: createLogger('silent'), now: () => t.clock.now, serveClient: false });
    const r = await request(second.app).post('/api/auth/sign-in/email').set('Origin', ORIGIN).set('X-Forwarded-For', '198.51.100.9')
      .send({ email: 'shared9@sec.test', password: TEST_PASSWORD });
    expect(r.status).toBe(429);
  });

  it('a counter idle for 24 hours starts again from zero, and its row is dropped', async () => {
    await signUpVerified(t, 'idle9@sec.test');
    for (let i = 0; i < 3; i++) await signIn('198.51.100.11', 'idle9@sec.test', 'wrong-password-1');
    expect((await signIn('198.51.100.11', 'idle9@sec.test', 'wrong-password-1')).status).toBe(429);
    t.clock.advance(86_400_000 + 1000);
    // three free failures again (a counter that carried on would block after the first)
    const codes: number[] = [];
    for (let i = 0; i < 3; i++) codes.push((await signIn('198.51.100.11', 'idle9@sec.test', 'wrong-password-1')).status);
    expect(codes).toEqual([401, 401, 401]);
    const rows = await t.database.db.select().from(signInFailures);
    expect(rows.every((r) => r.lastFailureAt.getTime() >= t.clock.now.getTime() - 86_400_000)).toBe(true);
  });

  it('spraying many accounts from one address is slowed after 30 failures', async () => {
    const codes: number[] = [];
    for (let i = 0; i < 32; i++) codes.push((await signIn('198.51.100.10', `nobody${i}@sec.test`, 'wrong-password-1')).status);
    expect(codes.slice(0, 30).every((c) => c === 401)).toBe(true);
    expect(codes.slice(30)).toEqual([429, 429]);
  });
});

describe('item 12: password-reset requests do not wait for the mail', () => {
  it('an existing and an unknown address answer in the same time while SMTP takes 400 ms; the mail still arrives', async () => {
    await signUpVerified(t, 'reset12@sec.test');
    const realSend = t.ctx.mailer.send.bind(t.ctx.mailer);
    t.ctx.mailer.send = async (m) => { await new Promise((r) => setTimeout(r, 400)); return realSend(m); };
    try {
      const timed = async (email: string) => {
        const t0 = performance.now();
        const r = await agent(t).post('/api/auth/request-password-reset', { email, redirectTo: '/reset-password' });
        expect(r.status).toBe(200);
        return performance.now() - t0;
      };
      const known: number[] = [];
      const unknown: number[] = [];
      for (let i = 0; i < 3; i++) { known.push(await timed('reset12@sec.test')); unknown.push(await timed(`nobody12-${i}@sec.test`)); }
      const med = (a: number[]) => a.sort((x, y) => x - y)[1];
      // before the fix: the known address took over 400 ms (the SMTP exchange was awaited)
      expect(med(known)).toBeLessThan(300);
      expect(Math.abs(med(known) - med(unknown))).toBeLessThan(150);
      const mail = await lastMailTo(t, 'reset12@sec.test'); // waits for the queue
      expect(mail.subject).toBe('Reset your Parallax password');
      expect(linkIn(mail.text)).toContain('/reset-password/');
    } finally {
      t.ctx.mailer.send = realSend;
    }
  });
});

describe("item 13: better-auth's own admin and API-key endpoints are closed", () => {
  let admin: Agent;
  let adminId = '';
  let victimId = '';
  beforeAll(async () => {
    admin = await signUpVerified(t, 'admin13@sec.test');
    await setRole(t, 'admin13@sec.test', 'admin');
    await signUpVerified(t, 'victim13@sec.test');
    [adminId, victimId] = await Promise.all(['admin13@sec.test', 'victim13@sec.test'].map(async (e) => (await t.database.db.select().from(user).where(eq(user.email, e)))[0].id));
  });

  const blocked: [string, string, object][] = [
    ['post', '/api/auth/admin/set-role', { userId: 'ADMIN', role: 'user' }],
    ['post', '/api/auth/admin/impersonate-user', { userId: 'VICTIM' }],
    ['post', '/api/auth/admin/ban-user', { userId: 'VICTIM' }],
    ['post', '/api/auth/admin/unban-user', { userId: 'VICTIM' }],
    ['post', '/api/auth/admin/create-user', { email: 'made13@sec.test', password: TEST_PASSWORD, name: 'Made', role: 'admin' }],
    ['post', '/api/auth/admin/remove-user', { userId: 'VICTIM' }],
    ['post', '/api/auth/admin/set-user-password', { userId: 'VICTIM', newPassword: 'taken-over-password-1' }],
    ['post', '/api/auth/admin/revoke-user-sessions', { userId: 'VICTIM' }],
    ['get', '/api/auth/admin/list-users', {}],
    ['post', '/api/auth/api-key/create', { name: 'unaudited' }],
    ['get', '/api/auth/api-key/list', {}],
    ['post', '/api/auth/api-key/update', { keyId: 'x', enabled: true }],
    ['post', '/api/auth/api-key/delete', { keyId: 'x' }],
    ['post', '/api/auth/api-key/verify', { key: 'plx_x' }],
    ['post', '/api/auth/organization/delete', { organizationId: 'x' }],
    ['post', '/api/auth/update-user', { name: 'Renamed' }],
    ['post', '/api/auth/delete-user', {}],
  ];
  it.each(blocked)('%s %s gets 404 naming the product route, and changes nothing', async (method, path, body) => {
    const b = JSON.parse(JSON.stringify(body).replace('"ADMIN"', JSON.stringify(adminId)).replace('"VICTIM"', JSON.stringify(victimId)));
    const before = await t.database.db.select().from(user).orderBy(user.id);
    const r = method === 'get' ? await admin.get(path) : await admin.post(path, b);
    expect(r.status, r.text).toBe(404);
    expect(r.body.error.message).toContain('is not open on Parallax');
    if (path.includes('/admin/')) expect(r.body.error.message).toContain('/api/admin/users/:userId/');
    if (path.includes('/api-key/')) expect(r.body.error.message).toContain('/api/teams/:teamId/api-keys');
    expect(await t.database.db.select().from(user).orderBy(user.id)).toEqual(before);
  });

  it('the admin is still an admin (set-role on oneself went around the "not your own admin role" guard before)', async () => {
    const [me] = await t.database.db.select().from(user).where(eq(user.id, adminId));
    expect(me.role).toBe('admin');
    expect((await admin.post(`/api/admin/users/${adminId}/role`, { role: 'user' })).status).toBe(400);
  });

  it('every open path is one the product uses, and the server still calls the plugins itself', async () => {
    for (const p of OPEN_AUTH_PATHS) expect(p).not.toMatch(/^\/(admin|api-key)\//);
    const lead = await signUpVerified(t, 'lead13@sec.test');
    const teamId = (await makeTeam(lead, 'Key Route Team', 'key-route-team')).body.id;
    expect((await lead.post(`/api/teams/${teamId}/api-keys`, { name: 'audited' })).status).toBe(201);
    expect((await agent(t).get('/api/auth/get-session')).status).toBe(200);
  });
});

describe('item 15: entry links are http(s) only', () => {
  it.each([
    ['code', 'javascript:alert(document.cookie)'],
    ['preprint', 'data:text/html,<script>alert(1)</script>'],
    ['code', 'vbscript:msgbox(1)'],
    ['preprint', 'file:///etc/passwd'],
  ])('links.%s = %j is refused, naming the field', (field, url) => {
    const { problems } = schemaProblems({ ...FULL_ENTRY, links: { [field]: url } });
    // before the fix: [] (format "uri" accepts any scheme)
    expect(problems).toEqual([{ path: `/links/${field}`, message: expect.stringMatching(/^must be an http:\/\/ or https:\/\/ address/) }]);
  });

  it('http and https links pass', () => {
    expect(schemaProblems({ ...FULL_ENTRY, links: { code: 'https://example.org/team/code', preprint: 'HTTP://example.org/paper' } }).problems).toEqual([]);
  });
});
