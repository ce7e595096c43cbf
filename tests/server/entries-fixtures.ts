/**
 * Shared set-up for the entry tests: a published chain-12 challenge with its exact references,
 * team A (lead + member, an API key), team B (one member), a moderator, and a full-sweep entry
 * document built from the published targets.
 */
import { readFileSync } from 'node:fs';
import { expect } from 'vitest';
import { lastMailTo, linkIn, makeTestApp, setRole, signUpVerified, type Agent, type TestApp } from './helpers';
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

export async function makeEntryWorld(prefix: string): Promise<EntryWorld> {
  const t = await makeTestApp();
  const mod = await signUpVerified(t, `mod@${prefix}.test`, 'Moe Moderator');
  await setRole(t, `mod@${prefix}.test`, 'moderator');
  const worker = await startWorker(t.database.db, t.ctx.log, { pollMs: 50 });
  t.ctx.jobs.kick = () => worker.kick();
  expect((await mod.post('/api/challenges', CHAIN_SPEC)).status).toBe(201);
  const pub = await mod.post('/api/challenges/chain-12/publish', {});
  expect(pub.status).toBe(200);
  await settle(t, worker);
  const leadA = await signUpVerified(t, `lead-a@${prefix}.test`, 'Lea Lead');
  const a = await teamWithMember(t, leadA, `Team A ${prefix}`, `member-a@${prefix}.test`);
  const leadB = await signUpVerified(t, `lead-b@${prefix}.test`);
  const b = await teamWithMember(t, leadB, `Team B ${prefix}`, `member-b@${prefix}.test`);
  const keyA = (await leadA.post(`/api/teams/${a.teamId}/api-keys`, { name: 'sweep script' })).body.key as string;
  const tg = await mod.get('/api/challenges/chain-12/targets');
  return { t, worker, mod, leadA, memberA: a.member, memberB: b.member, teamA: a.teamId, teamB: b.teamId, keyA, checksum: pub.body.checksum, targets: tg.body.targets };
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
