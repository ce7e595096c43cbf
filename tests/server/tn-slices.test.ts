/**
 * Issue 15: sliced tensor-network contractions on several worker threads, and as slice jobs that
 * worker processes claim.
 *
 * Check values: the project's statevector (shared/physics/statevector.ts) and the npm package
 * quantum-circuit (tests/shared/physics/qc-reference.ts, an outside reference; it rounds amplitudes
 * to 14 decimals, hence 1e-10 against it) on a 12-qubit kicked-Ising circuit.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { and, eq, sql } from 'drizzle-orm';
import type { ObservableSpec, PauliFactor } from '../../shared/physics/circuit';
import { loadChallenge } from '../../shared/physics/challenge';
import { kickedIsing } from '../../shared/physics/kicked-ising';
import { buildLattice, edgeColouring } from '../../shared/physics/lattices';
import { ReferenceRunner, tnStats } from '../../shared/physics/reference';
import { statevectorExpectation } from '../../shared/physics/statevector';
import { contractPlan, contractSliceRange, planTerm, sliceBlocks } from '../../shared/physics/tensor-network/index';
import { jobs, references, targets, tnSliceParts, tnSliceRuns } from '../../server/db/schema';
import { openDatabase } from '../../server/db/client';
import { claimJob, finishJob } from '../../server/jobs/queue';
import { SliceThreads, threadsForMemory } from '../../server/jobs/slice-threads';
import { combineRun, decodePlan, distributeTarget, encodePlan, sliceRanges, tnSlicesJob } from '../../server/jobs/tn-slices-job';
import { startWorker, type WorkerContext } from '../../server/jobs/worker';
import { createLogger } from '../../server/log';
import { qcExpectation } from '../shared/physics/qc-reference';
import { makeTestApp, setRole, signUpVerified, type Agent, type TestApp } from './helpers';

// a 3 x 4 square lattice, 3 kicked-Ising steps at a generic point (no Clifford shortcut): the
// light cone of Y5 Z6 is the whole register, width 13 unsliced
const lat = buildLattice({ kind: 'square', rows: 3, cols: 4 });
const circuit = kickedIsing(lat.n, edgeColouring(lat.n, lat.edges), { steps: 3, thetaH: 0.77, thetaJ: 0.3 });
const factors: PauliFactor[] = [{ qubit: 5, op: 'Y' }, { qubit: 6, op: 'Z' }];
const obs: ObservableSpec = { id: 'yz', terms: [{ coef: 1, factors }] };

describe('slices on worker threads', () => {
  const full = planTerm(circuit, factors);
  // a tiny memory budget (width 8 of the unsliced 13) forces many slices
  const sliced = planTerm(circuit, factors, { memoryBytes: 96 * 2 ** (full.width - 5) });

  it('a plan forced to many slices gives the unsliced value, the statevector and quantum-circuit, on 1 and on 3 threads', async () => {
    expect(sliced.slices).toBeGreaterThanOrEqual(16);
    expect(sliced.width).toBeLessThanOrEqual(full.width - 5);
    const unsliced = contractPlan(full)[0];
    const sv = statevectorExpectation(circuit, obs).value;
    const qc = qcExpectation(lat.n, circuit.gates, obs);
    const one = new SliceThreads(1);
    const three = new SliceThreads(3);
    try {
      const seen: [number, number][] = [];
      const a = one.contract(sliced);
      const b = three.contract(sliced, { onBlock: (d, n) => seen.push([d, n]), pollMs: 20 });
      // the same blocks summed in the same order: the same number whatever the thread count
      expect(b[0]).toBe(a[0]);
      expect(b[0]).toBe(contractPlan(sliced)[0]);
      expect(Math.abs(a[0] - unsliced)).toBeLessThan(1e-12);
      expect(Math.abs(a[0] - sv)).toBeLessThan(1e-12);
      expect(Math.abs(a[0] - qc)).toBeLessThan(1e-10);
      expect(Math.abs(a[1])).toBeLessThan(1e-12);
      // progress per block: the last report is every block done
      expect(seen.at(-1)).toEqual([sliceBlocks(sliced.slices).length, sliceBlocks(sliced.slices).length]);
    } finally {
      await Promise.all([one.close(), three.close()]);
    }
  }, 60_000);

  it('a throw from onStep (the time cap) stops the threads and reaches the caller', async () => {
    const pool = new SliceThreads(2);
    try {
      let calls = 0;
      expect(() => pool.contract(sliced, { pollMs: 1, onStep: () => { if (++calls > 1) throw new Error('cap reached'); } })).toThrow('cap reached');
      // the pool is usable again afterwards
      expect(Math.abs(pool.contract(sliced)[0] - contractPlan(full)[0])).toBeLessThan(1e-12);
    } finally {
      await pool.close();
    }
  }, 60_000);

  it('off the event loop (slice jobs): the same partials; a slice thread that dies fails the run instead of hanging it', async () => {
    const pool = new SliceThreads(2);
    try {
      const blocks = sliceBlocks(sliced.slices);
      const sync = new SliceThreads(1).runBlocks(sliced, blocks);
      expect(Array.from(await pool.runBlocksAsync(sliced, blocks, { pollMs: 10 }))).toEqual(Array.from(sync));
      // the threads are killed (as the runtime does when one runs out of memory) just as the run
      // hands them its blocks: no block ever finishes, and the run fails instead of waiting forever
      const threads = (pool as unknown as { workers: { worker: import('node:worker_threads').Worker }[] }).workers;
      expect(threads).toHaveLength(2);
      const killed = threads.map((w) => w.worker.terminate());
      await expect(pool.runBlocksAsync(sliced, blocks, { pollMs: 10 })).rejects.toThrow(/slice thread stopped/);
      await Promise.all(killed);
      // dead threads are replaced at the next run
      expect(Array.from(await pool.runBlocksAsync(sliced, blocks, { pollMs: 10 }))).toEqual(Array.from(sync));
    } finally {
      await pool.close();
    }
  }, 60_000);

  it('the blocks depend on the slice count only; slice ranges of jobs are runs of whole blocks', () => {
    expect(sliceBlocks(8)).toEqual([[0, 1], [1, 2], [2, 3], [3, 4], [4, 5], [5, 6], [6, 7], [7, 8]]);
    expect(sliceBlocks(256)).toHaveLength(64);
    expect(sliceBlocks(256)[1]).toEqual([4, 8]);
    expect(sliceRanges(256, 8)).toEqual([[0, 32], [32, 64], [64, 96], [96, 128], [128, 160], [160, 192], [192, 224], [224, 256]]);
    expect(sliceRanges(4, 8)).toEqual([[0, 1], [1, 2], [2, 3], [3, 4]]);
    expect(sliceRanges(64, 3)).toEqual([[0, 22], [22, 44], [44, 64]]);
    // threads are capped by memory: slices of 2 GiB on a 16 GiB machine, 4 at a time
    expect(threadsForMemory(2 * 1024 ** 3, 16 * 1024 ** 3)).toBe(4);
    expect(threadsForMemory(40 * 1024 ** 3, 16 * 1024 ** 3)).toBe(1);
    // a stored plan decodes to the same numbers (base64 of the float64 bytes)
    const back = decodePlan(JSON.parse(JSON.stringify(encodePlan(sliced))));
    expect(contractPlan(back)[0]).toBe(contractPlan(sliced)[0]);
  });
});

// ---- slice jobs ----------------------------------------------------------------------------

const SPEC = {
  id: 'tn-slices', version: 1, title: 'Slice jobs', description: 'x', lattice: { kind: 'square', rows: 3, cols: 4 },
  circuit: { family: 'kicked-ising', steps: [3], thetaH: [0.77], thetaJ: 0.3 },
  observables: [{ id: 'sum', terms: [{ coef: 0.5, pauli: 'Y5 Z6' }, { coef: -1.25, pauli: 'X1' }] }],
};

let t: TestApp;
let mod: Agent;
const log = createLogger('silent');

async function prepare(slug: string) {
  const spec = { ...SPEC, id: slug };
  expect((await mod.post('/api/challenges', spec)).status).toBe(201);
  const pub = await mod.post(`/api/challenges/${slug}/publish`, {});
  expect(pub.status).toBeLessThan(300);
  const db = t.database.db;
  // the reference job stays queued (no worker here); the test hands its target out in its name
  const [parent] = await db.select().from(jobs).where(eq(jobs.id, pub.body.jobId));
  const versionId = (parent.payload as { versionId: string }).versionId;
  const [target] = await db.select().from(targets).where(eq(targets.versionId, versionId));
  const ch = loadChallenge(spec);
  // a tiny memory budget (width 7): the first term gets many slices
  const runner = new ReferenceRunner(ch, { tnMemoryBytes: 96 * 2 ** 7 });
  const tgt = ch.targets[0];
  expect(tgt.id).toBe(target.key);
  const terms = runner.tnTerms(tgt);
  expect(terms[0].plan!.slices).toBeGreaterThanOrEqual(8);
  const plan = runner.plan(tgt);
  const coneQubits = Math.max(...terms.map((x) => x.plan?.coneQubits ?? 0));
  const message = { type: 'distribute' as const, targetId: tgt.id, terms, detail: runner.tnDetail(tgt, plan, terms), ...tnStats(terms), coneQubits };
  // the value one thread computes, term by term (the combination must give exactly this)
  const want = terms.reduce((v, x) => v + x.coef * (x.plan ? contractPlan(x.plan)[0] : 1), 0);
  const inst = runner.planner.instance(tgt.instanceId);
  const sv = statevectorExpectation(runner.circuit(inst), runner.planner.observable(tgt.observableId)).value;
  return { parentJobId: pub.body.jobId as string, versionId, targetId: target.id, message, want, sv, terms };
}

const ctx = (db = t.database.db, threads = 1): WorkerContext => ({ db, log, now: () => t.clock.now, progress: async () => {}, slices: { threads, jobsAbove: 2, jobsPerTerm: 4 } });

beforeAll(async () => {
  t = await makeTestApp();
  mod = await signUpVerified(t, 'mod@slices.test');
  await setRole(t, 'mod@slices.test', 'moderator');
}, 60_000);
afterAll(async () => { await t?.close(); });

describe('slice jobs (PGlite: one worker claims them all)', () => {
  it('enqueue, run in any order, combine once: the reference equals one thread\'s value and the statevector', async () => {
    const db = t.database.db;
    const p = await prepare('tn-slices-a');
    const n = await distributeTarget(db, { parentJobId: p.parentJobId, versionId: p.versionId, message: p.message, jobsPerTerm: 4 });
    expect(n).toBeGreaterThan(2);
    // handing the same target out again from the same parent job changes nothing
    expect(await distributeTarget(db, { parentJobId: p.parentJobId, versionId: p.versionId, message: p.message, jobsPerTerm: 4 })).toBe(0);
    const sliceJobs = await db.select().from(jobs).where(and(eq(jobs.kind, 'tn-slices'), sql`${jobs.payload}->>'versionId' = ${p.versionId}`));
    expect(sliceJobs).toHaveLength(n);
    // reverse order of enqueueing (any order gives the same value)
    const order = [...sliceJobs].sort((a, b) => (b.payload as { start: number; term: number }).term - (a.payload as { term: number }).term || (b.payload as { start: number }).start - (a.payload as { start: number }).start);
    const results = [];
    for (const [i, j] of order.entries()) results.push(await tnSlicesJob(j, ctx(db, i === 0 ? 2 : 1)));
    // only the last one combined
    expect(results.slice(0, -1).every((r) => r.combined === undefined)).toBe(true);
    const value = results.at(-1)!.combined as number;
    expect(value).toBe(p.want);
    expect(Math.abs(value - p.sv)).toBeLessThan(1e-12);
    const [ref] = await db.select().from(references).where(eq(references.targetId, p.targetId));
    expect(ref.value).toBe(p.want);
    expect(ref.method).toBe('tensor-network');
    expect(ref.size).toMatchObject({ slices: p.message.slices, width: p.message.width });
    expect(String((ref.size as { detail: string }).detail)).toMatch(new RegExp(`computed as ${n} slice jobs`));
    const [run] = await db.select().from(tnSliceRuns).where(eq(tnSliceRuns.parentJobId, p.parentJobId));
    expect(run.state).toBe('combined');
    expect(await combineRun(db, run.id, t.clock.now)).toBeNull(); // combined once only
    // the standings are queued for the version
    const st = await db.select().from(jobs).where(and(eq(jobs.kind, 'standings'), sql`${jobs.payload}->>'versionId' = ${p.versionId}`));
    expect(st.length).toBeGreaterThan(0);
  }, 120_000);

  it('a slice job claimed again after a crash does not count twice; the worker combines once', async () => {
    const db = t.database.db;
    const p = await prepare('tn-slices-b');
    const n = await distributeTarget(db, { parentJobId: p.parentJobId, versionId: p.versionId, message: p.message, jobsPerTerm: 4 });
    // a worker claims one slice job, stores its part, then its process dies before finishing the job
    const first = (await claimJob(db, 'worker-doomed', ['tn-slices']))!;
    expect(first.kind).toBe('tn-slices');
    const fp = first.payload as { term: number; start: number; end: number };
    const plan = p.terms[fp.term].plan!;
    const blocks = sliceBlocks(plan.slices).filter(([s, e]) => s >= fp.start && e <= fp.end);
    const partials = blocks.flatMap(([s, e]) => contractSliceRange(plan, s, e));
    const [run] = await db.select().from(tnSliceRuns).where(eq(tnSliceRuns.parentJobId, p.parentJobId));
    await db.insert(tnSliceParts).values({ runId: run.id, term: fp.term, sliceStart: fp.start, sliceEnd: fp.end, partials, wallMs: 1 });
    // another claims a second one and runs it to the end, then dies before marking it done
    const second = (await claimJob(db, 'worker-doomed-2', ['tn-slices']))!;
    await tnSlicesJob(second, ctx(db));
    // both go back to the queue (the recovery at a worker's start) and a worker runs everything
    const w = await startWorker(db, log, { kinds: ['tn-slices'], pollMs: 20, recover: 'all', slices: { threads: 2, jobsAbove: 2, jobsPerTerm: 4 }, now: () => t.clock.now });
    for (let i = 0; i < 600; i++) {
      const left = await db.select({ id: jobs.id }).from(jobs).where(and(eq(jobs.kind, 'tn-slices'), sql`${jobs.payload}->>'versionId' = ${p.versionId}`, sql`${jobs.state} <> 'done'`));
      if (!left.length) break;
      await new Promise((r) => setTimeout(r, 50));
    }
    await w.stop();
    const done = await db.select().from(jobs).where(and(eq(jobs.kind, 'tn-slices'), sql`${jobs.payload}->>'versionId' = ${p.versionId}`));
    expect(done.map((j) => j.state)).toEqual(Array(n).fill('done'));
    const parts = await db.select().from(tnSliceParts).where(eq(tnSliceParts.runId, run.id));
    expect(parts).toHaveLength(n); // one part per range, however often its job ran
    const [ref] = await db.select().from(references).where(eq(references.targetId, p.targetId));
    expect(ref.value).toBe(p.want);
    const [after] = await db.select().from(tnSliceRuns).where(eq(tnSliceRuns.id, run.id));
    expect(after.state).toBe('combined');
    // the jobs that combined: exactly one says so
    expect(done.filter((j) => (j.result as { combined?: number } | null)?.combined !== undefined)).toHaveLength(1);
    await finishJob(db, p.parentJobId, {}, new Date()); // the parent (never run here) is not left queued
  }, 180_000);
});

describe('the reference job with sliced tensor-network terms', () => {
  // a cone limit of 8 qubits rules the statevectors out and a width-7 memory budget slices the network
  const planner = { secondsBudget: 120, coneQubitLimit: 8, tnMemoryBytes: 96 * 2 ** 7 };

  async function runReferences(slug: string, slices: WorkerContext['slices']) {
    const db = t.database.db;
    const p = await prepare(slug);
    const w = await startWorker(db, log, { kinds: ['references', 'tn-slices'], pollMs: 20, recover: 'all', planner, slices, now: () => t.clock.now });
    for (let i = 0; i < 1200; i++) {
      const left = await db.select({ id: jobs.id }).from(jobs).where(and(sql`${jobs.kind} in ('references', 'tn-slices')`, sql`${jobs.payload}->>'versionId' = ${p.versionId}`, sql`${jobs.state} not in ('done', 'failed')`));
      if (!left.length) break;
      await new Promise((r) => setTimeout(r, 50));
    }
    await w.stop();
    const [parent] = await db.select().from(jobs).where(eq(jobs.id, p.parentJobId));
    const [ref] = await db.select().from(references).where(eq(references.targetId, p.targetId));
    return { p, parent, ref };
  }

  it('on two threads: the value of one thread, the slices recorded, progress per slice block', async () => {
    const { p, parent, ref } = await runReferences('tn-slices-c', { threads: 2, jobsAbove: null, jobsPerTerm: 4 });
    expect(parent.state).toBe('done');
    expect(ref.method).toBe('tensor-network');
    expect(ref.value).toBe(p.want);
    expect(Math.abs(ref.value! - p.sv)).toBeLessThan(1e-12);
    expect((ref.size as { slices: number }).slices).toBe(p.message.slices);
    expect(parent.progressNote).toMatch(/tensor network, term 2 of 2, slice block \d+ of \d+/);
  }, 120_000);

  it('above the slice-job threshold: the target becomes slice jobs that the worker claims; the reference is written once', async () => {
    const { p, parent, ref } = await runReferences('tn-slices-d', { threads: 1, jobsAbove: 8, jobsPerTerm: 3 });
    expect(parent.state).toBe('done');
    const sliceJobs = await t.database.db.select().from(jobs).where(and(eq(jobs.kind, 'tn-slices'), sql`${jobs.payload}->>'versionId' = ${p.versionId}`));
    expect((parent.result as { sliceJobs?: number }).sliceJobs).toBe(sliceJobs.length);
    expect(sliceJobs.length).toBeGreaterThan(1);
    expect(sliceJobs.every((j) => j.state === 'done')).toBe(true);
    expect(sliceJobs.filter((j) => (j.result as { combined?: number }).combined !== undefined)).toHaveLength(1);
    expect(ref.value).toBe(p.want);
    expect(Math.abs(ref.value! - p.sv)).toBeLessThan(1e-12);
    expect(String((ref.size as { detail: string }).detail)).toMatch(/slice jobs/);
  }, 180_000);
});

// ---- PostgreSQL: two workers on two pools split the slice jobs (scripts/pg-test.sh) ---------

const url = inject('databaseUrl');
describe.skipIf(!url)(url ? 'slice jobs on PostgreSQL' : 'slice jobs on PostgreSQL (skipped: needs TEST_DATABASE_URL; run bash scripts/pg-test.sh)', () => {
  it('two workers on two pools split the slice jobs of one reference; it is written once', async () => {
    const db = t.database.db;
    const other = await openDatabase({ databaseUrl: t.databaseUrl! });
    try {
      const p = await prepare('tn-slices-pg');
      const n = await distributeTarget(db, { parentJobId: p.parentJobId, versionId: p.versionId, message: p.message, jobsPerTerm: 8 });
      const opts = { kinds: ['tn-slices' as const], pollMs: 20, recover: 10 * 60_000, slices: { threads: 1, jobsAbove: 2, jobsPerTerm: 8 }, now: () => t.clock.now };
      const a = await startWorker(db, log, opts);
      const b = await startWorker(other.db, log, opts);
      a.kick(); b.kick();
      for (let i = 0; i < 1200; i++) {
        const left = await db.select({ id: jobs.id }).from(jobs).where(and(eq(jobs.kind, 'tn-slices'), sql`${jobs.payload}->>'versionId' = ${p.versionId}`, sql`${jobs.state} <> 'done'`));
        if (!left.length) break;
        await new Promise((r) => setTimeout(r, 50));
      }
      await Promise.all([a.stop(), b.stop()]);
      const done = await db.select().from(jobs).where(and(eq(jobs.kind, 'tn-slices'), sql`${jobs.payload}->>'versionId' = ${p.versionId}`));
      expect(done).toHaveLength(n);
      expect(done.every((j) => j.state === 'done' && j.attempts === 1)).toBe(true);
      const byWorker = new Set(done.map((j) => (j.result as { worker?: string } | null)?.worker ?? ''));
      expect(byWorker.size, 'both workers took slice jobs').toBe(2);
      expect(done.filter((j) => (j.result as { combined?: number } | null)?.combined !== undefined)).toHaveLength(1);
      const [ref] = await db.select().from(references).where(eq(references.targetId, p.targetId));
      expect(ref.value).toBe(p.want);
      expect(Math.abs(ref.value! - p.sv)).toBeLessThan(1e-12);
    } finally {
      await other.close();
    }
  }, 180_000);
});
