/**
 * The public computations on a challenge version that grow with its size: the OpenQASM export of
 * an instance, the light cone of a target, the planner's report. A version never changes once
 * stored (a correction is a new version with a new checksum), so each result is computed once in
 * a document thread (server/jobs/thread-pool.ts) and kept in the app's VersionCache, keyed by the
 * checksum; a thread also keeps the last few validated specs, so the spec is sent to it once.
 *
 * challengeOps run inside the threads; computeForVersion is the main thread's side.
 */
import { compileInstance } from '@shared/physics/compile';
import { lightCone } from '@shared/physics/light-cone';
import { planChallenge, type PlannerOptions } from '@shared/physics/planner';
import { validateChallenge, type ValidatedChallenge } from '@shared/physics/challenge';
import { instanceQasm } from '@shared/physics/qasm';
import { invalid, notFound } from '../errors';
import type { ThreadPool } from '../jobs/thread-pool';

// ------------------------------------------------------------------ inside a thread
const specs = new Map<string, ValidatedChallenge>();
const NEED_SPEC = { needSpec: true } as const;

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

// ------------------------------------------------------------------ the main thread's side
type Ops = typeof challengeOps;
type Op = keyof Ops;
type Out<K extends Op> = Exclude<ReturnType<Ops[K]>, typeof NEED_SPEC>;

/**
 * Results per challenge version (by checksum) and computation, least recently used first out,
 * bounded by an estimate of their bytes. One per app (ctx.versionCache).
 */
export class VersionCache {
  private readonly map = new Map<string, { value: unknown; bytes: number }>();
  private bytes = 0;
  private readonly inflight = new Map<string, Promise<unknown>>();
  constructor(readonly maxBytes = 128 * 1024 * 1024) {}
  async get<T>(key: string, size: (v: T) => number, compute: () => Promise<T>): Promise<T> {
    const hit = this.map.get(key);
    if (hit) { this.map.delete(key); this.map.set(key, hit); return hit.value as T; }
    const running = this.inflight.get(key);
    if (running) return running as Promise<T>;
    const p = compute().then((value) => {
      const bytes = size(value);
      if (bytes <= this.maxBytes / 4) {
        this.map.set(key, { value, bytes });
        this.bytes += bytes;
        for (const [k, e] of this.map) {
          if (this.bytes <= this.maxBytes) break;
          this.map.delete(k);
          this.bytes -= e.bytes;
        }
      }
      return value;
    }).finally(() => this.inflight.delete(key));
    this.inflight.set(key, p);
    return p;
  }
  get state() { return { entries: this.map.size, bytes: this.bytes }; }
}

/** A computation on a stored version, in a thread, cached by checksum and key. */
export function computeForVersion<K extends Op>(
  pool: ThreadPool, cache: VersionCache, v: { checksum: string; spec: unknown }, op: K,
  args: Omit<Parameters<Ops[K]>[0], 'checksum' | 'spec'>, size: (r: Out<K>) => number,
): Promise<Out<K>> {
  return cache.get(`${v.checksum}|${op}|${JSON.stringify(args)}`, size, async () => {
    const s = await pool.session();
    try {
      let r = await s.call(op, { checksum: v.checksum, ...args } as never) as ReturnType<Ops[K]>;
      if ((r as { needSpec?: boolean }).needSpec) r = await s.call(op, { checksum: v.checksum, spec: v.spec, ...args } as never) as ReturnType<Ops[K]>;
      return r as Out<K>;
    } finally {
      s.release();
    }
  });
}
