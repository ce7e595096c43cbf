/**
 * The public computations on a challenge version that grow with its size: the OpenQASM export of
 * an instance, the light cone of a target, the planner's report. A version never changes once
 * stored (a correction is a new version with a new checksum), so each result is computed once in
 * a document thread (server/jobs/thread-pool.ts) and kept in the app's VersionCache, keyed by the
 * checksum; a thread also keeps the last few validated specs, so the spec is sent to it once.
 *
 * challengeOps run inside the threads; the main thread's side (computeForVersion, VersionCache) is
 * server/services/version-cache.ts.
 */
import { compileInstance } from '@shared/physics/compile';
import { lightCone } from '@shared/physics/light-cone';
import { planChallenge, type PlannerOptions } from '@shared/physics/planner';
import { validateChallenge, type ValidatedChallenge } from '@shared/physics/challenge';
import { instanceQasm } from '@shared/physics/qasm';
import { invalid, notFound } from '../errors';

// ------------------------------------------------------------------ inside a thread
const specs = new Map<string, ValidatedChallenge>();
export const NEED_SPEC = { needSpec: true } as const;

function challengeOf(a: { checksum: string; spec?: unknown }): ValidatedChallenge | null {
  const hit = specs.get(a.checksum);
  if (hit) return hit;
  if (a.spec === undefined) return null;
  const r = validateChallenge(a.spec);
  if (!r.ok) throw invalid(r.errors.slice(0, 50), `The stored challenge spec is not valid: ${r.errors[0].path || '(document)'}: ${r.errors[0].message}`);
  if (specs.size >= 4) specs.delete(specs.keys().next().value as string);
  specs.set(a.checksum, r.challenge);
  return r.challenge;
}

/** QASM is sent back in pieces of this many bytes (moved, not copied) and streamed from them. */
const PIECE = 1 << 20;

export const challengeOps = {
  'challenge.qasm': (a: { checksum: string; spec?: unknown; instanceId: string }) => {
    const ch = challengeOf(a);
    if (!ch) return NEED_SPEC;
    const inst = ch.instances.find((i) => i.id === a.instanceId);
    if (!inst) throw notFound(`The instance "${a.instanceId}"`);
    const text = Buffer.from(instanceQasm(ch, inst), 'utf8');
    const pieces: Uint8Array[] = [];
    for (let i = 0; i < text.length; i += PIECE) pieces.push(new Uint8Array(text.subarray(i, i + PIECE)));
    return { pieces, bytes: text.length };
  },
  'challenge.lightCone': (a: { checksum: string; spec?: unknown; targetKey: string }) => {
    const ch = challengeOf(a);
    if (!ch) return NEED_SPEC;
    const target = ch.targets.find((t) => t.id === a.targetKey);
    if (!target) throw notFound(`The target "${a.targetKey}"`);
    const inst = ch.instances.find((i) => i.id === target.instanceId)!;
    const obs = ch.observables[ch.spec.observables.findIndex((o) => o.id === target.observableId)];
    const lc = lightCone(compileInstance(ch.spec, inst), obs);
    return { target: a.targetKey, qubits: lc.qubits, total: ch.nQubits, nonCliffordRotations: lc.nonCliffordRotations, gatesInCone: lc.keptGates.length };
  },
  // options: plannerOptions(config.referenceBudget), the one budget the reference job uses too
  'challenge.plan': (a: { checksum: string; spec?: unknown; options?: PlannerOptions }) => {
    const ch = challengeOf(a);
    if (!ch) return NEED_SPEC;
    return planChallenge(ch, a.options).map((p) => ({ target: p.targetId, method: p.method, size: p.size, unit: p.unit, estimatedSeconds: p.estimatedSeconds, reason: p.reason, cone: p.cone, clifford: p.clifford }));
  },
};

