/**
 * The demo scenario, seeded on first start into an empty database. EVERYTHING HERE IS INVENTED:
 * the teams, people, challenges and (later) their numbers are made up for the demo and describe
 * no real group, device or experiment.
 */
import { randomUUID } from 'node:crypto';
import { count, eq, inArray } from 'drizzle-orm';
import type { AppContext } from '../context';
import { member, organization, user } from './schema';
import { DEMO_REFERENCE_BUDGET, DEMO_SPECS } from './demo-challenges';
import { challenges } from './schema';
import { createChallengeVersion } from '../services/create-challenge-version';
import { publishChallengeVersion } from '../services/publish-challenge-version';
import { enqueueJob } from '../jobs/queue';
import { recordAudit } from '../services/record-audit';
import { kickJobs } from '../effects';
import { changeUserRole } from '../services/change-user-role';

export const DEMO_PASSWORD = 'parallax-demo-2026';
/** how many days before the seed the first demo challenge opened */
export const DEMO_OPENED_DAYS_AGO = 28;

export interface DemoAccount { email: string; name: string; role: 'admin' | 'moderator' | 'lead' | 'member'; team?: string }

export const DEMO_TEAMS = [
  { slug: 'cobalt-qubit-lab', name: 'Cobalt Qubit Lab', track: 'hardware', description: 'An invented hardware group running error-mitigated circuits on Marram, a fictional superconducting array.' },
  { slug: 'lattice-ledger', name: 'Lattice Ledger', track: 'classical', description: 'An invented tensor-network group (matrix product states in a snake ordering, TEBD).' },
  { slug: 'heisenberg-sprint', name: 'Heisenberg Sprint', track: 'classical', description: 'An invented group simulating the circuits with neural quantum states (convolutional networks, variational time steps).' },
] as const;

export const DEMO_ACCOUNTS: DemoAccount[] = [
  { email: 'admin@parallax.test', name: 'Ada Quist', role: 'admin' },
  { email: 'moderator@parallax.test', name: 'Mara Okonjo', role: 'moderator' },
  { email: 'ines@cobalt.test', name: 'Ines Marlow', role: 'lead', team: 'Cobalt Qubit Lab' },
  { email: 'tomas@cobalt.test', name: 'Tomas Reyes', role: 'member', team: 'Cobalt Qubit Lab' },
  { email: 'priya@ledger.test', name: 'Priya Anand', role: 'lead', team: 'Lattice Ledger' },
  { email: 'jonas@sprint.test', name: 'Jonas Wirth', role: 'lead', team: 'Heisenberg Sprint' },
];


export async function seedDemo(ctx: AppContext): Promise<boolean> {
  const { db } = ctx;
  const [{ n }] = await db.select({ n: count() }).from(user);
  if (Number(n) > 0) return false;

  for (const a of DEMO_ACCOUNTS) {
    await ctx.auth.api.signUpEmail({ body: { email: a.email, password: DEMO_PASSWORD, name: a.name } });
  }
  await db.transaction(async (tx) => {
    const emails = DEMO_ACCOUNTS.map((a) => a.email);
    await tx.update(user).set({ emailVerified: true }).where(inArray(user.email, emails));
    const users = await tx.select({ id: user.id, email: user.email }).from(user).where(inArray(user.email, emails));
    const idOf = new Map(users.map((u) => [u.email, u.id]));
    for (const t of DEMO_TEAMS) {
      const id = randomUUID();
      await tx.insert(organization).values({ id, name: t.name, slug: t.slug, metadata: JSON.stringify({ track: t.track, description: t.description }) });
      for (const a of DEMO_ACCOUNTS.filter((x) => x.team === t.name)) {
        await tx.insert(member).values({ id: randomUUID(), organizationId: id, userId: idOf.get(a.email)!, role: a.role === 'lead' ? 'owner' : 'member' });
      }
    }
    await recordAudit(tx, { actor: { kind: 'system', label: 'seed' }, action: 'demo.seed', subjectType: 'site', subjectId: 'demo', at: ctx.now(), details: { teams: DEMO_TEAMS.length, accounts: DEMO_ACCOUNTS.length } });
  });
  const seedActor = { kind: 'system' as const, label: 'seed' };
  // site roles through the service that owns them (its audit line 'user.role' included)
  const staff = await db.select({ id: user.id, email: user.email }).from(user).where(inArray(user.email, DEMO_ACCOUNTS.filter((a) => a.role === 'admin' || a.role === 'moderator').map((a) => a.email)));
  for (const s of staff) {
    const role = DEMO_ACCOUNTS.find((a) => a.email === s.email)!.role as 'admin' | 'moderator';
    await changeUserRole(db, { userId: s.id, role, actor: seedActor, now: ctx.now() });
  }
  // the demo challenges opened four weeks ago (a week apart); their invented entries follow
  // (demo-entries.ts), so every date of the scenario lies between the opening and today
  const opened = (i: number) => new Date(ctx.now().getTime() - (DEMO_OPENED_DAYS_AGO - 7 * i) * 86400_000);
  for (const [i, spec] of DEMO_SPECS.entries()) {
    await createChallengeVersion(db, spec, seedActor, opened(i));
    const budget = DEMO_REFERENCE_BUDGET[spec.id];
    if (budget) {
      const [c] = await db.select({ settings: challenges.settings }).from(challenges).where(eq(challenges.slug, spec.id));
      await db.update(challenges).set({ settings: { ...(c.settings as object), referenceSecondsBudget: budget } }).where(eq(challenges.slug, spec.id));
    }
    const { result: pub } = await publishChallengeVersion(db, { slug: spec.id, actor: seedActor, now: opened(i) });
    // queued after the reference job, so the invented entries are made from computed references
    await enqueueJob(db, 'demo-entries', { versionId: pub.versionId }, `demo-entries:${pub.versionId}`);
  }
  await ctx.applyEffects([kickJobs()]);
  return true;
}
