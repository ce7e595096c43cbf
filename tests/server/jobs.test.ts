/** Background jobs: resumable reference computation, recovery after a crash, failures shown. */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { agent, makeTestApp, setRole, signUpVerified, type TestApp, type Agent } from './helpers';
import { startWorker } from '../../server/jobs/worker';
import { enqueueJob, type JobKind } from '../../server/jobs/queue';
import { jobs, references, targets } from '../../server/db/schema';
import { ENGINE_VERSION } from '../../shared/physics/reference';

let t: TestApp;
let mod: Agent;
const SPEC = { id: 'jobs-chain', version: 1, title: 'Jobs chain', description: 'x', lattice: { kind: 'chain', n: 6 }, circuit: { family: 'kicked-ising', steps: [1, 2, 3], thetaH: [0.2, 0.9] }, observables: [{ id: 'z3', pauli: 'Z3' }] };

async function drain(w: Awaited<ReturnType<typeof startWorker>>) {
  for (let i = 0; i < 300; i++) {
    await w.idle();
    const js = await t.database.db.select().from(jobs);
    if (js.every((j) => j.state === 'done' || j.state === 'failed')) return js;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error('jobs did not settle');
}

beforeAll(async () => {
  t = await makeTestApp();
  mod = await signUpVerified(t, 'mod@j.test');
  await setRole(t, 'mod@j.test', 'moderator');
}, 60_000);
afterAll(async () => { await t.close(); });

describe('reference jobs', () => {
  it('resume: a job taken over after a crash skips targets that already have a reference', async () => {
    expect((await mod.post('/api/challenges', SPEC)).status).toBe(201);
    const pub = await mod.post('/api/challenges/jobs-chain/publish', {});
    const db = t.database.db;
    // a previous process of the same engine stored one result (0.5: recognisably not what this run
    // would compute), then died while holding the job
    const [first] = await db.select().from(targets).orderBy(targets.key).limit(1);
    await db.insert(references).values({ targetId: first.id, value: 0.5, method: 'statevector', size: { qubits: 6 }, engineVersion: ENGINE_VERSION });
    await db.update(jobs).set({ state: 'running', lockedBy: 'worker-dead', lockedAt: new Date(Date.now() - 3600_000) }).where(eq(jobs.id, pub.body.jobId));

    const w = await startWorker(db, t.ctx.log, { pollMs: 50, recover: 'all' });
    await drain(w);
    await w.stop();
    const [job] = await db.select().from(jobs).where(eq(jobs.id, pub.body.jobId));
    expect(job.state).toBe('done');
    expect(job.attempts).toBe(1);
    const refs = await db.select().from(references);
    expect(refs).toHaveLength(6);
    expect(refs.find((r) => r.targetId === first.id)).toMatchObject({ value: 0.5, engineVersion: ENGINE_VERSION }); // not recomputed
    expect(refs.filter((r) => r.engineVersion === ENGINE_VERSION && r.value !== 0.5)).toHaveLength(5);
    // (a reference of another engine version is recomputed instead: tests/server/engine-upgrade.test.ts)
    const progress = await agent(t).get(`/api/jobs/${pub.body.jobId}`);
    expect(progress.body).toMatchObject({ state: 'done', progress: 1 });
  });

  it('a failed job keeps its raw error for the log and admins; the API shows a clean public message (issue 12 item 7)', async () => {
    // the raw error of a failed insert names the statement and its parameters
    const raw = 'Failed query: insert into "entries" ("id", "team_id") values ($1, $2) params: 3f1c,parallax-house';
    const id = await enqueueJob(t.database.db, 'explode-test' as JobKind, { versionId: 'none' });
    const w = await startWorker(t.database.db, t.ctx.log, { now: t.ctx.now, pollMs: 50, extraHandlers: { 'explode-test': async () => { throw new Error(raw); } } });
    await drain(w);
    await w.stop();
    const r = await agent(t).get(`/api/jobs/${id}`);
    expect(r.body).toMatchObject({ state: 'failed', error: `This job failed on the server; the operators have the details (job ${id}).` });
    expect(JSON.stringify(r.body)).not.toMatch(/insert into|params|parallax-house/);
    const [row] = await t.database.db.select().from(jobs).where(eq(jobs.id, id));
    expect(row.errorDetail).toContain(raw);
    expect(t.logs.some((l) => l.includes('job.failed') && l.includes('insert into'))).toBe(true);
  });
});
