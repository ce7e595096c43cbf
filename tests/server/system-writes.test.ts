/**
 * Issue 14, "admin role changes, the house baseline and the demo entries write outside the
 * services": role changes go through services/change-user-role.ts (one transaction, audit line on
 * the injected clock, no self-demotion), bans through services/ban-user.ts, and the entries the
 * server writes itself (house baseline, demo) through services/create-system-entry.ts (entry,
 * estimates, audit line and standings job in one transaction; the kick as an effect). A guard keeps
 * every insert into entries and every role change inside server/services.
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, count, eq, sql } from 'drizzle-orm';
import { makeTestApp, setRole, signUpVerified, type Agent, type TestApp } from './helpers';
import { auditLog, entries, estimates, jobs, session, user } from '../../server/db/schema';
import { createSystemEntry } from '../../server/services/create-system-entry';
import { HOUSE_TEAM } from '../../server/house-team';

const SPEC = { id: 'sys-chain', version: 1, title: 'System chain', description: 'system writes', lattice: { kind: 'chain', n: 4 }, circuit: { family: 'kicked-ising', steps: [1], thetaH: [0.3] }, observables: [{ id: 'z1', pauli: 'Z1' }, { id: 'x2', pauli: 'X2' }] };

let t: TestApp;
let admin: Agent;
let adminId = '';
let versionId = '';
beforeAll(async () => {
  t = await makeTestApp();
  admin = await signUpVerified(t, 'root@sys.test', 'Root Admin');
  await setRole(t, 'root@sys.test', 'admin');
  adminId = (await t.database.db.select({ id: user.id }).from(user).where(eq(user.email, 'root@sys.test')))[0].id;
  await signUpVerified(t, 'plain@sys.test', 'Plain User');
  expect((await admin.post('/api/challenges', SPEC)).status).toBe(201);
  const pub = await admin.post('/api/challenges/sys-chain/publish', {});
  expect(pub.status, pub.text).toBe(200);
  versionId = pub.body.versionId;
}, 120_000);
afterAll(async () => { await t.close(); });

describe('role changes through the service', () => {
  it('grants a role in one transaction with an audit line dated by the injected clock', async () => {
    t.clock.advance(3600_000); // the app's clock, an hour ahead of the database's
    const [u] = await t.database.db.select({ id: user.id }).from(user).where(eq(user.email, 'plain@sys.test'));
    const r = await admin.post(`/api/admin/users/${u.id}/role`, { role: 'moderator' });
    expect(r.status, r.text).toBe(200);
    expect(r.body).toEqual({ id: u.id, role: 'moderator' });
    const [row] = await t.database.db.select({ role: user.role, updatedAt: user.updatedAt }).from(user).where(eq(user.id, u.id));
    expect(row.role).toBe('moderator');
    expect(row.updatedAt.getTime()).toBe(t.clock.now.getTime());
    const lines = await t.database.db.select().from(auditLog).where(and(eq(auditLog.action, 'user.role'), eq(auditLog.subjectId, u.id)));
    expect(lines).toHaveLength(1);
    expect(lines[0].details).toEqual({ from: 'user', to: 'moderator' });
    expect(lines[0].at.getTime()).toBe(t.clock.now.getTime());
  });

  it('refuses an admin removing their own role, and an unknown user, writing nothing', async () => {
    const before = (await t.database.db.select({ n: count() }).from(auditLog).where(eq(auditLog.action, 'user.role')))[0].n;
    const self = await admin.post(`/api/admin/users/${adminId}/role`, { role: 'moderator' });
    expect(self.status).toBe(400);
    expect(self.body.error.message).toContain('own admin role');
    expect((await admin.post('/api/admin/users/no-such-user/role', { role: 'moderator' })).status).toBe(404);
    expect((await admin.post(`/api/admin/users/${adminId}/role`, { role: 'boss' })).status).toBe(400);
    expect((await t.database.db.select({ role: user.role }).from(user).where(eq(user.id, adminId)))[0].role).toBe('admin');
    expect((await t.database.db.select({ n: count() }).from(auditLog).where(eq(auditLog.action, 'user.role')))[0].n).toBe(before);
  });

  it('bans through the service: sessions end, the audit line carries the injected time', async () => {
    await signUpVerified(t, 'banned@sys.test', 'Banned User');
    const [u] = await t.database.db.select({ id: user.id }).from(user).where(eq(user.email, 'banned@sys.test'));
    const sessions = async () => (await t.database.db.select({ n: count() }).from(session).where(eq(session.userId, u.id)))[0].n;
    expect(await sessions()).toBeGreaterThan(0);
    const r = await admin.post(`/api/admin/users/${u.id}/ban`, { banned: true, reason: 'spam' });
    expect(r.status, r.text).toBe(200);
    expect(r.body).toMatchObject({ id: u.id, banned: true, keysRevoked: 0, teamsLeft: 0 });
    expect(await sessions()).toBe(0);
    const [line] = await t.database.db.select().from(auditLog).where(and(eq(auditLog.action, 'user.ban'), eq(auditLog.subjectId, u.id)));
    expect(line.at.getTime()).toBe(t.clock.now.getTime());
    expect((await admin.post(`/api/admin/users/${adminId}/ban`, { banned: true })).status).toBe(400);
  });
});

describe('entries the server writes itself', () => {
  const est = [{ targetKey: 'x', value: 0.25, uncertainty: 0.01, kind: 'bound', raw: { peakTerms: 3 } }];

  it('a published system entry: entry, estimates, audit line and one standings job in one transaction; the kick is an effect', async () => {
    const at = new Date(Date.UTC(2026, 0, 15, 12));
    const { result, effects } = await createSystemEntry(t.database.db, {
      slug: 'sys-chain', versionId, teamId: HOUSE_TEAM.id, state: 'published', track: 'classical', methodFamily: 'pauli-propagation', isBaseline: true,
      label: 'house baseline (test)', document: { method: { family: 'pauli-propagation' } }, estimates: est, actorLabel: 'house baseline', auditDetails: { baseline: true, versionId }, at,
    });
    expect(effects).toEqual([{ kind: 'kick-jobs' }]);
    const [e] = await t.database.db.select().from(entries).where(eq(entries.id, result.id));
    expect(e).toMatchObject({ state: 'published', isBaseline: true, lineageId: result.id, teamId: HOUSE_TEAM.id });
    // every date of the entry is the caller's, none the database's own clock
    for (const d of [e.createdAt, e.updatedAt, e.submittedAt, e.publishedAt]) expect(d!.getTime()).toBe(at.getTime());
    expect((await t.database.db.select({ n: count() }).from(estimates).where(eq(estimates.entryId, result.id)))[0].n).toBe(1);
    const [line] = await t.database.db.select().from(auditLog).where(eq(auditLog.subjectId, result.id));
    expect(line).toMatchObject({ action: 'entry.publish', actorLabel: 'house baseline' });
    expect(line.at.getTime()).toBe(at.getTime());
    const [job] = await t.database.db.select({ kind: jobs.kind, state: jobs.state }).from(jobs).where(eq(jobs.id, result.jobId!));
    expect(job).toEqual({ kind: 'standings', state: 'queued' });
  });

  it('an entry in review (the demo queue) queues no standings and asks no kick; a second published one shares the queued job', async () => {
    const base = { slug: 'sys-chain', versionId, teamId: HOUSE_TEAM.id, track: 'classical' as const, methodFamily: 'other', document: { demo: 'invented demo data' }, estimates: est, actorLabel: 'seed', auditDetails: { demo: true }, at: t.clock.now };
    const review = await createSystemEntry(t.database.db, { ...base, state: 'in-review', label: 'demo in review' });
    expect(review.effects).toEqual([]);
    expect(review.result.jobId).toBeNull();
    const [line] = await t.database.db.select().from(auditLog).where(eq(auditLog.subjectId, review.result.id));
    expect(line).toMatchObject({ action: 'entry.submit', actorLabel: 'seed' });
    const again = await createSystemEntry(t.database.db, { ...base, state: 'published', label: 'demo published' });
    const queued = await t.database.db.select({ id: jobs.id }).from(jobs).where(and(eq(jobs.kind, 'standings'), eq(jobs.state, 'queued'), sql`${jobs.payload}->>'versionId' = ${versionId}`));
    expect(queued.map((q) => q.id)).toEqual([again.result.jobId]);
  });
});

describe('one place for these writes', () => {
  it('every insert into entries and every change of a site role is in server/services', () => {
    const root = path.resolve(__dirname, '../../server');
    const files: string[] = [];
    const walk = (d: string) => { for (const f of readdirSync(d)) { const p = path.join(d, f); if (statSync(p).isDirectory()) walk(p); else if (/\.ts$/.test(f)) files.push(p); } };
    walk(root);
    const write = /insert\(entries\)|insert\(estimates\)|update\(user\)\.set\(\{[^}]*\brole\b/;
    const offenders = files.filter((f) => !f.startsWith(path.join(root, 'services') + path.sep))
      .flatMap((f) => readFileSync(f, 'utf8').split('\n').map((line, i) => ({ f, i, line })))
      .filter((x) => write.test(x.line)).map((x) => `${path.relative(root, x.f)}:${x.i + 1}`);
    expect(offenders).toEqual([]);
    // the guard sees the services' own writes (it would see one anywhere else)
    const inServices = files.filter((f) => f.startsWith(path.join(root, 'services') + path.sep) && write.test(readFileSync(f, 'utf8')));
    expect(inServices.length).toBeGreaterThanOrEqual(3);
  });
});

