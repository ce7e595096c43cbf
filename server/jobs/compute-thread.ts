/**
 * Runs in a worker thread: the exact-reference engine and the house baseline for a list of
 * targets of one challenge, posting each result as soon as it is known (so a long job is resumable
 * and shows progress). No database access here; the main thread stores results.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { loadChallenge } from '@shared/physics/challenge';
import { ReferenceRunner, tnStats, type TnTerm } from '@shared/physics/reference';
import { propagate } from '@shared/physics/pauli-propagation';
import type { TnTermPlan } from '@shared/physics/tensor-network/index';
import { DEFAULT_REFERENCE_BUDGET, plannerOptions } from '../planner-options';
import { SliceThreads } from './slice-threads';

export interface ComputeRequest {
  /** references of targets, the house baseline of targets, or blocks of one sliced plan (a tn-slices job) */
  mode: 'references' | 'baseline' | 'slices';
  spec: unknown;
  targetIds: string[];
  /** baseline thresholds (truncated Pauli propagation) */
  baseline?: { delta: number; maxTerms: number };
  planner?: { secondsBudget: number; coneQubitLimit: number; tnMemoryBytes?: number };
  /** threads that share the slice blocks of a sliced tensor-network plan (1: this thread alone) */
  sliceThreads?: number;
  /**
   * references: a target the tensor network computes with a term of at least this many slices is
   * not run here but handed back ('distribute') to be computed as slice jobs
   */
  distributeAbove?: number;
  /** slices mode: the plan and its blocks to compute */
  slices?: { plan: TnTermPlan; blocks: [number, number][] };
}

export type ComputeMessage =
  | { type: 'reference'; targetId: string; result: import('@shared/physics/reference').ReferenceResult }
  | { type: 'distribute'; targetId: string; terms: TnTerm[]; detail: string; width: number; flops: number; slices: number; coneQubits: number }
  | { type: 'blocks'; partials: number[]; wallMs: number }
  | { type: 'baseline'; targetId: string; value: number; bound: number; terms: number; wallMs: number; exact: boolean }
  | { type: 'progress'; done: number; total: number; note: string }
  | { type: 'done' }
  | { type: 'error'; message: string };

const port = parentPort!;
const req = workerData as ComputeRequest;
const post = (m: ComputeMessage) => port.postMessage(m);

const pool = new SliceThreads(Math.max(1, req.sliceThreads ?? 1));
/** at most one progress message per PROGRESS_MS while slice blocks finish (the last always) */
const PROGRESS_MS = 500;
let lastProgress = 0;
const blockProgress = (base: number, span: number, total: number, note: string) => (d: number, n: number) => {
  const t = performance.now();
  if (d < n && t - lastProgress < PROGRESS_MS) return;
  lastProgress = t;
  post({ type: 'progress', done: base + (span * d) / n, total, note: `${note}, slice block ${d} of ${n}` });
};

try {
  if (req.mode === 'slices') {
    const { plan, blocks } = req.slices!;
    const t0 = performance.now();
    const partials = await pool.runBlocksAsync(plan, blocks, { onBlock: blockProgress(0, 1, 1, 'tensor network') });
    post({ type: 'blocks', partials: Array.from(partials.subarray(0, 2 * blocks.length)), wallMs: performance.now() - t0 });
  } else {
    computeTargets();
  }
  post({ type: 'done' });
  void pool.close();
} catch (e) {
  post({ type: 'error', message: e instanceof Error ? e.message : String(e) });
}

function computeTargets() {
  const challenge = loadChallenge(req.spec);
  const byId = new Map(challenge.targets.map((t) => [t.id, t]));
  let done = 0;
  let current = '';
  // the same planner options as /plan and the preview (server/planner-options.ts); a sliced
  // tensor-network term spreads its slice blocks over the slice threads
  const runner = new ReferenceRunner(challenge, {
    ...plannerOptions({ ...(req.planner ? { secondsPerTarget: req.planner.secondsBudget, coneQubitLimit: req.planner.coneQubitLimit, tnMemoryBytes: req.planner.tnMemoryBytes } : DEFAULT_REFERENCE_BUDGET), tnThreads: req.sliceThreads ?? 1 }),
    contractTerm: (plan, at) => pool.contract(plan, {
      onStep: at.onStep,
      onBlock: blockProgress(done + at.term / at.terms, 1 / at.terms, req.targetIds.length, `${current}: tensor network, term ${at.term + 1} of ${at.terms}`),
    }),
  });
  for (const id of req.targetIds) {
    const target = byId.get(id);
    if (!target) continue;
    current = id;
    if (req.mode === 'references') {
      const plan = runner.plan(target);
      post({ type: 'progress', done, total: req.targetIds.length, note: `${id}: ${plan.method ?? 'no exact method'}` });
      const terms = req.distributeAbove && plan.method === 'tensor-network' ? runner.tnTerms(target) : [];
      if (terms.some((t) => t.plan && t.plan.slices >= req.distributeAbove!)) {
        const coneQubits = terms.reduce((m, t) => Math.max(m, t.plan?.coneQubits ?? 0), 0);
        post({ type: 'distribute', targetId: id, terms, detail: runner.tnDetail(target, plan, terms), ...tnStats(terms), coneQubits });
      } else {
        post({ type: 'reference', targetId: id, result: runner.run(target, plan) });
      }
    } else {
      const inst = runner.planner.instance(target.instanceId);
      const obs = runner.planner.observable(target.observableId);
      const sub = runner.planner.restrict(inst, obs);
      const b = req.baseline ?? { delta: 1e-3, maxTerms: 200_000 };
      const r = propagate(sub.circuit, sub.observable, { delta: b.delta, maxTerms: b.maxTerms });
      post({ type: 'baseline', targetId: id, value: r.value, bound: r.droppedWeight, terms: r.peakTerms, wallMs: r.wallMs, exact: r.exact });
      post({ type: 'progress', done: done + 1, total: req.targetIds.length, note: `baseline ${id}` });
    }
    done++;
  }
}
