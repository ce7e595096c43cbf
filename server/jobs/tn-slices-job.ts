/**
 * Slice jobs (issue 15): one large tensor-network reference spread over several worker processes.
 *
 * The reference job hands a target whose plan has a term of many slices (WorkerContext.slices
 * .jobsAbove) to distributeTarget: in one transaction it writes a run (tn_slice_runs: the terms with
 * their plans, what the reference will record) and enqueues 'tn-slices' jobs, each a range of whole
 * slice blocks of one term (sliceBlocks). Any worker process claims them (SKIP LOCKED, as every job);
 * a slice job contracts its range on the slice threads of a compute thread and stores its block
 * partials under the unique key (run, term, slice range), so a job claimed again after a crash never
 * counts twice. The job that finds every part in (or the parent job when it resumes) combines: under
 * a row lock on the run it adds each term's block partials in block order (the order contractPlan
 * uses, so the value is the one a single thread computes) and writes the reference once.
 */
import { and, asc, eq } from 'drizzle-orm';
import { ENGINE_VERSION, type ReferenceValue } from '@shared/physics/reference';
import { sliceBlocks, sumBlocks, type TnTermPlan } from '@shared/physics/tensor-network/index';
import type { Db } from '../db/client';
import { targets, tnSliceParts, tnSliceRuns } from '../db/schema';
import type { ComputeMessage } from './compute-thread';
import { enqueueJob } from './queue';
import { storeReference } from './store-reference';
import { runCompute } from './run-compute';
import type { JobHandler } from './types';

/** A plan as stored in jsonb: each leaf's complex data as base64 of its float64 bytes (exact). */
interface StoredPlan extends Omit<TnTermPlan, 'leaves'> { leaves: { legs: number[]; data: string }[] }
interface StoredTerm { coef: number; plan: StoredPlan | null }

export function encodePlan(p: TnTermPlan): StoredPlan {
  return { ...p, leaves: p.leaves.map((t) => ({ legs: t.legs, data: Buffer.from(t.data.buffer, t.data.byteOffset, t.data.byteLength).toString('base64') })) };
}

export function decodePlan(p: StoredPlan): TnTermPlan {
  return {
    ...p,
    leaves: p.leaves.map((t) => {
      const b = Buffer.from(t.data, 'base64');
      const data = new Float64Array(b.byteLength / 8);
      new Uint8Array(data.buffer).set(b);
      return { legs: t.legs, data };
    }),
  };
}

/** The slice ranges of one term: at most `jobsPerTerm` ranges, each a run of whole slice blocks. */
export function sliceRanges(slices: number, jobsPerTerm: number): [number, number][] {
  const blocks = sliceBlocks(slices);
  const per = Math.ceil(blocks.length / Math.max(1, jobsPerTerm));
  const out: [number, number][] = [];
  for (let b = 0; b < blocks.length; b += per) out.push([blocks[b][0], blocks[Math.min(blocks.length, b + per) - 1][1]]);
  return out;
}

type Distribute = Extract<ComputeMessage, { type: 'distribute' }>;

/**
 * Writes the run of one target and enqueues its slice jobs (one transaction); returns how many jobs
 * it enqueued (0 when this parent job had already handed the target out).
 */
export async function distributeTarget(db: Db, a: { parentJobId: string; versionId: string; message: Distribute; jobsPerTerm: number }): Promise<number> {
  const m = a.message;
  const ranges = m.terms.map((t) => (t.plan ? sliceRanges(t.plan.slices, a.jobsPerTerm) : []));
  const parts = ranges.reduce((n, r) => n + r.length, 0);
  const template = { method: 'tensor-network', unit: 'width', size: m.width, detail: `${m.detail}; computed as ${parts} slice jobs`, width: m.width, flops: m.flops, slices: m.slices, coneQubits: m.coneQubits, engineVersion: ENGINE_VERSION };
  return db.transaction(async (tx) => {
    const [run] = await tx.insert(tnSliceRuns).values({
      parentJobId: a.parentJobId, versionId: a.versionId, targetKey: m.targetId, parts, template,
      terms: m.terms.map((t): StoredTerm => ({ coef: t.coef, plan: t.plan ? encodePlan(t.plan) : null })),
    }).onConflictDoNothing().returning({ id: tnSliceRuns.id });
    if (!run) return 0;
    for (let term = 0; term < ranges.length; term++) {
      for (const [start, end] of ranges[term]) await enqueueJob(tx, 'tn-slices', { runId: run.id, versionId: a.versionId, targetKey: m.targetId, term, start, end });
    }
    return parts;
  });
}

/**
 * Combines a run whose parts are all in: writes the reference (once: the run row is locked and
 * marked combined in the same transaction) and queues the standings. Returns the value, or null
 * when parts are missing or the run was combined already.
 */
export async function combineRun(db: Db, runId: string, now: Date): Promise<number | null> {
  const value = await db.transaction(async (tx) => {
    const [run] = await tx.select().from(tnSliceRuns).where(eq(tnSliceRuns.id, runId)).for('update');
    if (!run || run.state !== 'pending') return null;
    const parts = await tx.select().from(tnSliceParts).where(eq(tnSliceParts.runId, runId)).orderBy(asc(tnSliceParts.term), asc(tnSliceParts.sliceStart));
    if (parts.length < run.parts) return null;
    const terms = run.terms as StoredTerm[];
    let v = 0;
    let cpuMs = 0;
    terms.forEach((t, k) => {
      if (!t.plan) { v += t.coef; return; }
      // the block partials of term k in block order, then summed as contractPlan sums them
      const blocks = parts.filter((p) => p.term === k).flatMap((p) => p.partials as number[]);
      v += t.coef * sumBlocks(blocks)[0];
    });
    for (const p of parts) cpuMs += p.wallMs;
    const tpl = run.template as Omit<ReferenceValue, 'value' | 'wallMs'> & { coneQubits: number };
    const [target] = await tx.select({ id: targets.id }).from(targets).where(and(eq(targets.versionId, run.versionId), eq(targets.key, run.targetKey)));
    if (target) {
      // wall time: from the hand-out to the combination (the parts ran in parallel; their sum is the CPU time in the detail)
      const wallMs = Math.max(0, now.getTime() - run.createdAt.getTime());
      await storeReference(tx, target.id, { ...tpl, detail: `${tpl.detail} (${(cpuMs / 1000).toFixed(1)} s of contraction in all)`, value: v, wallMs }, now);
    }
    await tx.update(tnSliceRuns).set({ state: 'combined', combinedAt: now }).where(eq(tnSliceRuns.id, runId));
    return v;
  });
  if (value !== null) {
    const [run] = await db.select({ versionId: tnSliceRuns.versionId }).from(tnSliceRuns).where(eq(tnSliceRuns.id, runId));
    if (run) await enqueueJob(db, 'standings', { versionId: run.versionId }, `standings:${run.versionId}`);
  }
  return value;
}

export const tnSlicesJob: JobHandler = async (job, w) => {
  const p = job.payload as { runId: string; term: number; start: number; end: number };
  const [run] = await w.db.select().from(tnSliceRuns).where(eq(tnSliceRuns.id, p.runId));
  if (!run) return { skipped: 'the run no longer exists' };
  if (run.state !== 'pending') return { skipped: 'the reference is already combined' };
  const key = and(eq(tnSliceParts.runId, run.id), eq(tnSliceParts.term, p.term), eq(tnSliceParts.sliceStart, p.start), eq(tnSliceParts.sliceEnd, p.end));
  const [have] = await w.db.select({ wallMs: tnSliceParts.wallMs }).from(tnSliceParts).where(key);
  let wallMs = have?.wallMs ?? 0;
  if (!have) {
    // a job claimed again after a crash finds its part stored and only combines
    const stored = (run.terms as StoredTerm[])[p.term]?.plan;
    if (!stored) throw new Error(`run ${run.id} has no plan for term ${p.term}`);
    const plan = decodePlan(stored);
    const blocks = sliceBlocks(plan.slices).filter(([s, e]) => s >= p.start && e <= p.end);
    let partials: number[] | null = null;
    await runCompute({ mode: 'slices', spec: null, targetIds: [], sliceThreads: w.slices?.threads ?? 1, slices: { plan, blocks } }, async (m) => {
      if (m.type === 'progress') await w.progress(m.done / m.total, `${run.targetKey}: term ${p.term + 1}, slices ${p.start}..${p.end - 1}: ${m.note}`);
      if (m.type === 'blocks') { partials = m.partials; wallMs = m.wallMs; }
    });
    if (!partials) throw new Error('the compute thread returned no partial sums');
    await w.db.insert(tnSliceParts).values({ runId: run.id, term: p.term, sliceStart: p.start, sliceEnd: p.end, partials, wallMs }).onConflictDoNothing();
  }
  const value = await combineRun(w.db, run.id, w.now());
  return { target: run.targetKey, worker: job.lockedBy, term: p.term, slices: [p.start, p.end], wallMs, ...(value !== null ? { combined: value } : {}) };
};
