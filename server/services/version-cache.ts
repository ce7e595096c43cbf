/**
 * The main thread's side of the per-version computations (server/services/challenge-computations.ts
 * holds the operations that run inside the document threads): a byte-bounded cache of results per
 * version checksum, and computeForVersion, which asks a thread once per version and key.
 */
import type { ThreadPool } from '../jobs/thread-pool';
import type { challengeOps, NEED_SPEC } from './challenge-computations';

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
