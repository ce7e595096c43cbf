/**
 * The job queue in the jobs table. A worker claims the oldest queued job with
 * SELECT ... FOR UPDATE SKIP LOCKED, so several worker processes on one PostgreSQL server never take
 * the same job; on PGlite there is one process and the same statement is simply serial.
 */
import { randomUUID } from 'node:crypto';
import { and, eq, inArray, sql } from 'drizzle-orm';
import type { Db, DbOrTx } from '../db/client';
import { jobs } from '../db/schema';

export type JobKind = 'references' | 'baseline' | 'standings' | 'demo-entries' | 'reveal' | 'tn-slices';
export type JobRow = typeof jobs.$inferSelect;

export async function enqueueJob(db: DbOrTx, kind: JobKind, payload: Record<string, unknown>, dedupeKey?: string): Promise<string> {
  if (dedupeKey) {
    // one queued job per key is enough (e.g. one standings recomputation per version)
    const [q] = await db.select({ id: jobs.id }).from(jobs)
      .where(and(eq(jobs.kind, kind), eq(jobs.state, 'queued'), sql`${jobs.payload}->>'key' = ${dedupeKey}`)).limit(1);
    if (q) return q.id;
  }
  const [row] = await db.insert(jobs).values({ kind, payload: dedupeKey ? { ...payload, key: dedupeKey } : payload }).returning({ id: jobs.id });
  return row.id;
}

/** Cheap, visible work first: standings, then references (and their slice jobs), then the house baseline, then demo data. */
const PRIORITY = sql.raw(`case kind when 'standings' then 0 when 'references' then 1 when 'tn-slices' then 1 when 'baseline' then 2 when 'reveal' then 0 else 3 end`);

export async function claimJob(db: Db, workerId: string, kinds?: JobKind[]): Promise<JobRow | null> {
  const kindFilter = kinds?.length ? sql`and kind in (${sql.join(kinds.map((k) => sql`${k}`), sql`, `)})` : sql``;
  const r = (await db.execute(sql`
    update jobs set state = 'running', locked_by = ${workerId}, locked_at = now(),
      started_at = coalesce(started_at, now()), attempts = attempts + 1
    where id = (select id from jobs where state = 'queued' ${kindFilter}
      order by ${PRIORITY}, created_at, id for update skip locked limit 1)
    returning id`)) as unknown as { rows: { id: string }[] };
  if (!r.rows.length) return null;
  const [row] = await db.select().from(jobs).where(eq(jobs.id, r.rows[0].id));
  return row;
}

export async function reportProgress(db: Db, id: string, progress: number, note: string): Promise<void> {
  await db.update(jobs).set({ progress: Math.max(0, Math.min(1, progress)), progressNote: note.slice(0, 300) }).where(eq(jobs.id, id));
}

export async function finishJob(db: Db, id: string, result: Record<string, unknown>, now: Date): Promise<void> {
  await db.update(jobs).set({ state: 'done', progress: 1, result, finishedAt: now, lockedBy: null }).where(eq(jobs.id, id));
}

/** An error whose message is written for the public (no SQL, no parameters, no internals). */
export class PublicJobError extends Error {}

const JOB_WHAT: Record<string, string> = {
  references: 'The exact-reference computation', baseline: 'The house baseline', standings: 'The standings computation',
  'demo-entries': 'The demo data', reveal: 'The reveal of sealed references', 'tn-slices': 'A part of a tensor-network reference computation',
};

/**
 * The message anyone may read about a failed job (GET /api/jobs/:id, the challenge page): the text
 * of a PublicJobError, otherwise a fixed sentence. The raw error (a SQL statement with its
 * parameters, a stack) goes to jobs.error_detail and the log only.
 */
export function publicJobError(kind: string, id: string, err: unknown): string {
  if (err instanceof PublicJobError) return err.message.slice(0, 500);
  return `${JOB_WHAT[kind] ?? 'This job'} failed on the server; the operators have the details (job ${id}).`;
}

export async function failJob(db: Db, id: string, kind: string, err: unknown, now: Date): Promise<void> {
  const detail = String((err as Error)?.stack ?? (err as Error)?.message ?? err).slice(0, 4000);
  await db.update(jobs).set({ state: 'failed', error: publicJobError(kind, id, err), errorDetail: detail, finishedAt: now, lockedBy: null }).where(eq(jobs.id, id));
}

/**
 * Jobs left running by a process that died go back to the queue (their work is resumable: the
 * reference job skips targets that already have a reference). With PGlite only this process exists;
 * with PostgreSQL only jobs whose lock is older than `staleMs` are taken back.
 */
export async function requeueStale(db: Db, staleMs: number | null): Promise<number> {
  const cond = staleMs === null ? eq(jobs.state, 'running') : and(eq(jobs.state, 'running'), sql`${jobs.lockedAt} < now() - (${staleMs} * interval '1 millisecond')`);
  const r = await db.update(jobs).set({ state: 'queued', lockedBy: null }).where(cond).returning({ id: jobs.id });
  return r.length;
}

export const newWorkerId = () => `worker-${process.pid}-${randomUUID().slice(0, 8)}`;

export async function jobsFor(db: Db, key: string, kinds: JobKind[]): Promise<JobRow[]> {
  return db.select().from(jobs).where(and(inArray(jobs.kind, kinds), sql`${jobs.payload}->>'versionId' = ${key}`));
}
