/**
 * Scale-out on PostgreSQL: two workers, each on its own connection pool, drain one queue of 200
 * small jobs; every job is done exactly once (claims use SELECT ... FOR UPDATE SKIP LOCKED).
 * Runs only with TEST_DATABASE_URL (scripts/pg-test.sh); PGlite has one connection per process.
 */
import { inject, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import { openDatabase } from '../../server/db/client';
import { enqueueJob, type JobKind } from '../../server/jobs/queue';
import { startWorker, type JobHandler } from '../../server/jobs/worker';
import { createLogger } from '../../server/log';
import { makeTestApp } from './helpers';

const url = inject('databaseUrl');
const KIND = 'test-record' as JobKind;
const JOBS = 200;

describe.skipIf(!url)(url ? 'two workers on one PostgreSQL queue' : 'two workers on one PostgreSQL queue (skipped: needs TEST_DATABASE_URL; run bash scripts/pg-test.sh)', () => {
  it(`${JOBS} jobs, two workers on two pools: every job done exactly once`, async () => {
    const t = await makeTestApp();
    const other = await openDatabase({ databaseUrl: t.databaseUrl! });
    const log = createLogger('warn');
    try {
      const db = t.database.db;
      await db.execute(sql`create table worker_test_done (job_id uuid not null, worker text not null, at timestamptz not null default now())`);
      // the handler records which worker ran which job, then takes a little time like real work
      const record: JobHandler = async (job, w) => {
        await w.db.execute(sql`insert into worker_test_done (job_id, worker) values (${job.id}::uuid, ${job.lockedBy ?? '?'})`);
        await new Promise((r) => setTimeout(r, 2));
        return { ok: true };
      };
      const ids: string[] = [];
      for (let i = 0; i < JOBS; i++) ids.push(await enqueueJob(db, KIND, { i }));
      const t0 = performance.now();
      const opts = { kinds: [KIND], pollMs: 20, recover: 10 * 60_000, extraHandlers: { [KIND]: record } };
      const a = await startWorker(db, log, opts);
      const b = await startWorker(other.db, log, opts);
      a.kick(); b.kick();
      for (let i = 0; i < 1500; i++) {
        const r = (await db.execute(sql`select count(*)::int as n from jobs where kind = ${KIND} and state <> 'done'`)) as unknown as { rows: { n: number }[] };
        if (r.rows[0].n === 0) break;
        await new Promise((res) => setTimeout(res, 20));
      }
      const ms = Math.round(performance.now() - t0);
      await Promise.all([a.stop(), b.stop()]);
      const done = (await db.execute(sql`select job_id::text as id, count(*)::int as n, min(worker) as worker from worker_test_done group by job_id`)) as unknown as { rows: { id: string; n: number; worker: string }[] };
      expect(done.rows.length).toBe(JOBS);
      expect(done.rows.filter((r) => r.n !== 1), 'jobs run more than once').toEqual([]);
      expect(new Set(done.rows.map((r) => r.id))).toEqual(new Set(ids));
      const states = (await db.execute(sql`select state, count(*)::int as n from jobs where kind = ${KIND} group by state`)) as unknown as { rows: { state: string; n: number }[] };
      expect(states.rows).toEqual([{ state: 'done', n: JOBS }]);
      const byWorker = new Map<string, number>();
      for (const r of done.rows) byWorker.set(r.worker, (byWorker.get(r.worker) ?? 0) + 1);
      expect(byWorker.size, 'both workers took jobs').toBe(2);
      console.log(`[workers] ${JOBS} jobs on PostgreSQL, two workers on two pools: each done exactly once (split ${[...byWorker.values()].join(' / ')}), drained in ${ms} ms`);
    } finally {
      await other.close();
      await t.close();
    }
  }, 120_000);
});
