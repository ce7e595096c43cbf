/**
 * Shared set-up for the entry tests: a published chain-12 challenge with its exact references,
 * team A (lead + member, an API key), team B (one member), a moderator, and a full-sweep entry
 * document built from the published targets. The world is built once per test run and copied for
 * each file that asks (about 1 s instead of a reference computation and five sign-ups each).
 */
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { expect, inject } from 'vitest';
import { lastMailTo, linkIn, makeTestApp, setRole, signIn, signUpVerified, type Agent, type TestApp } from './helpers';
import { buildOnce } from '../support/run-once';
import { startWorker, type Worker } from '../../server/jobs/worker';

export const CHAIN_SPEC = JSON.parse(readFileSync(new URL('../fixtures/challenges/chain-small.json', import.meta.url), 'utf8'));
export const FULL_ENTRY = JSON.parse(readFileSync(new URL('../fixtures/entries/chain-12-full.json', import.meta.url), 'utf8'));

export interface EntryWorld {
  t: TestApp;
  worker: Worker;
  mod: Agent;
  leadA: Agent;
  memberA: Agent;
  memberB: Agent;
  teamA: string;
  teamB: string;
  keyA: string;
  checksum: string;
  targets: { key: string; observable: string; reference: { status: string; value?: number } }[];
}

export async function settle(t: TestApp, worker: Worker) {
  for (let i = 0; i < 600; i++) {
    await worker.idle();
    const r = await t.database.db.query.jobs.findMany();
    if (r.every((j) => j.state === 'done' || j.state === 'failed')) return r;
    await new Promise((res) => setTimeout(res, 50));
  }
  throw new Error('jobs did not settle');
}

export async function teamWithMember(t: TestApp, lead: Agent, name: string, memberEmail: string) {
  const teamId = (await lead.post('/api/auth/organization/create', { name, slug: name.toLowerCase().replace(/\W+/g, '-') })).body.id as string;
  await lead.post('/api/auth/organization/invite-member', { email: memberEmail, role: 'member', organizationId: teamId });
  const invitationId = new URL(linkIn((await lastMailTo(t, memberEmail)).text)).pathname.split('/').pop();
  const m = await signUpVerified(t, memberEmail);
  expect((await m.post('/api/auth/organization/accept-invitation', { invitationId })).status).toBe(200);
  return { teamId, member: m };
}

/** The accounts of the prepared entry world (one world per test run: the addresses are the same in every file). */
export const WORLD_EMAILS = {
  mod: 'mod@world.test', leadA: 'lead-a@world.test', memberA: 'member-a@world.test', leadB: 'lead-b@world.test', memberB: 'member-b@world.test',
} as const;

interface PreparedWorld {
  pgliteDump?: string;
  pgTemplate?: string;
  teamA: string;
  teamB: string;
  keyA: string;
  checksum: string;
  targets: EntryWorld['targets'];
}

/** Builds the world of the header on a fresh test database and leaves it as a dump (PGlite) or a template database (PostgreSQL). */
async function prepareEntryWorld(dir: string): Promise<PreparedWorld> {
  const e = WORLD_EMAILS;
  const t = await makeTestApp();
  try {
    const mod = await signUpVerified(t, e.mod, 'Moe Moderator');
    await setRole(t, e.mod, 'moderator');
    const worker = await startWorker(t.database.db, t.ctx.log, { now: t.ctx.now, pollMs: 50 });
    t.ctx.jobs.kick = () => worker.kick();
    expect((await mod.post('/api/challenges', CHAIN_SPEC)).status).toBe(201);
    const pub = await mod.post('/api/challenges/chain-12/publish', {});
    expect(pub.status).toBe(200);
    await settle(t, worker);
    await worker.stop();
    const leadA = await signUpVerified(t, e.leadA, 'Lea Lead');
    const a = await teamWithMember(t, leadA, 'Team A', e.memberA);
    const leadB = await signUpVerified(t, e.leadB);
    const b = await teamWithMember(t, leadB, 'Team B', e.memberB);
    const keyA = (await leadA.post(`/api/teams/${a.teamId}/api-keys`, { name: 'sweep script' })).body.key as string;
    const tg = await mod.get('/api/challenges/chain-12/targets');
    const world = { teamA: a.teamId, teamB: b.teamId, keyA, checksum: pub.body.checksum as string, targets: tg.body.targets };
    if (t.database.pglite) {
      const pgliteDump = path.join(dir, 'world.tar.gz');
      writeFileSync(pgliteDump, Buffer.from(await (await t.database.pglite.dumpDataDir('gzip')).arrayBuffer()));
      return { ...world, pgliteDump };
    }
    return { ...world, pgTemplate: (t.database as { pgName?: string }).pgName };
  } finally {
    await t.close();
  }
}

/**
 * The world of the header, on a database of its own: copied from the world prepared once per test
 * run (tests/support/run-once.ts), the five accounts signed in again, a worker started.
 */
export async function makeEntryWorld(): Promise<EntryWorld> {
  const { value: w } = await buildOnce(inject('runCache'), 'entry-world', prepareEntryWorld);
  const t = await makeTestApp({}, { pgliteDump: w.pgliteDump, pgTemplate: w.pgTemplate });
  const worker = await startWorker(t.database.db, t.ctx.log, { now: t.ctx.now, pollMs: 50 });
  t.ctx.jobs.kick = () => worker.kick();
  const [mod, leadA, memberA, memberB] = await Promise.all([WORLD_EMAILS.mod, WORLD_EMAILS.leadA, WORLD_EMAILS.memberA, WORLD_EMAILS.memberB].map((x) => signIn(t, x)));
  return { t, worker, mod, leadA, memberA, memberB, teamA: w.teamA, teamB: w.teamB, keyA: w.keyA, checksum: w.checksum, targets: w.targets };
}

/** A full-sweep entry: every target, at its exact value (so the dry run scores it perfectly). */
export function fullSweep(w: EntryWorld, over: Record<string, unknown> = {}) {
  return {
    ...FULL_ENTRY,
    challenge: { id: 'chain-12', version: 1, checksum: `sha256:${w.checksum}` },
    estimates: w.targets.map((x) => ({ target: x.key, value: x.reference.value ?? 0, uncertainty: 0.01, uncertaintyKind: 'statistical' })),
    ...over,
  };
}
