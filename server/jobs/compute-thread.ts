/**
 * Runs in a worker thread: the exact-reference engine and the house baseline for a list of
 * targets of one challenge, posting each result as soon as it is known (so a long job is resumable
 * and shows progress). No database access here; the main thread stores results.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { loadChallenge } from '@shared/physics/challenge';
import { ReferenceRunner } from '@shared/physics/reference';
import { propagate } from '@shared/physics/pauli-propagation';
import { DEFAULT_REFERENCE_BUDGET, plannerOptions } from '../planner-options';

export interface ComputeRequest {
  mode: 'references' | 'baseline';
  spec: unknown;
  targetIds: string[];
  /** baseline thresholds (truncated Pauli propagation) */
  baseline?: { delta: number; maxTerms: number };
  planner?: { secondsBudget: number; coneQubitLimit: number };
}

export type ComputeMessage =
  | { type: 'reference'; targetId: string; result: import('@shared/physics/reference').ReferenceResult }
  | { type: 'baseline'; targetId: string; value: number; bound: number; terms: number; wallMs: number; exact: boolean }
  | { type: 'progress'; done: number; total: number; note: string }
  | { type: 'done' }
  | { type: 'error'; message: string };

const port = parentPort!;
const req = workerData as ComputeRequest;
const post = (m: ComputeMessage) => port.postMessage(m);

try {
  const challenge = loadChallenge(req.spec);
  const byId = new Map(challenge.targets.map((t) => [t.id, t]));
  // the same planner options as /plan and the preview (server/planner-options.ts)
  const runner = new ReferenceRunner(challenge, plannerOptions(req.planner ? { secondsPerTarget: req.planner.secondsBudget, coneQubitLimit: req.planner.coneQubitLimit } : DEFAULT_REFERENCE_BUDGET));
  let done = 0;
  for (const id of req.targetIds) {
    const target = byId.get(id);
    if (!target) continue;
    if (req.mode === 'references') {
      const plan = runner.plan(target);
      post({ type: 'progress', done, total: req.targetIds.length, note: `${id}: ${plan.method ?? 'no exact method'}` });
      post({ type: 'reference', targetId: id, result: runner.run(target, plan) });
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
  post({ type: 'done' });
} catch (e) {
  post({ type: 'error', message: e instanceof Error ? e.message : String(e) });
}
