/**
 * A small pool of worker threads for document-sized work that must not hold the event loop:
 * strict JSON parsing and validation of entry documents, the dry run's score preview, and the
 * public computations on a challenge (QASM, light cones, the planner's report, spec checks).
 * The operations live in server/jobs/document-thread.ts (TypeScript behind a tsx-registering .mjs
 * boot, as the compute threads).
 *
 * A session holds one thread for several calls (parse, then the database look-ups on the main
 * thread, then the checks against the challenge on the document the thread still holds). Threads
 * start on first use and are replaced when one dies; a call that takes longer than `timeoutMs`
 * terminates its thread (the request gets a 503) and a thread that runs out of its heap answers
 * 413. AppErrors thrown in a thread come back as AppErrors.
 */
import { Worker } from 'node:worker_threads';
import { AppError, type ErrorCode, type FieldProblem } from '../errors';
import type { ThreadOps } from './document-thread';

export type OpName = keyof ThreadOps;
type Args<K extends OpName> = Parameters<ThreadOps[K]>[0];
type Result<K extends OpName> = Awaited<ReturnType<ThreadOps[K]>>;

interface Reply { id: number; ok: boolean; value?: unknown; error?: { code?: ErrorCode; message: string; problems?: FieldProblem[] } }

export interface ThreadSession {
  call<K extends OpName>(op: K, args: Args<K>, transfer?: ArrayBuffer[]): Promise<Result<K>>;
  release(): void;
}

class Thread {
  readonly worker: Worker;
  private readonly pending = new Map<number, { resolve: (v: unknown) => void; reject: (e: unknown) => void; timer: NodeJS.Timeout }>();
  private next = 1;
  dead = false;
  constructor(private readonly timeoutMs: number, heapMb: number) {
    this.worker = new Worker(new URL('./document-thread-boot.mjs', import.meta.url), { resourceLimits: { maxOldGenerationSizeMb: heapMb } });
    this.worker.unref();
    this.worker.on('message', (r: Reply) => {
      const p = this.pending.get(r.id);
      if (!p) return;
      this.pending.delete(r.id);
      clearTimeout(p.timer);
      if (r.ok) p.resolve(r.value);
      else p.reject(r.error?.code ? new AppError(r.error.code, r.error.message, r.error.problems ?? []) : new Error(r.error?.message ?? 'thread failed'));
    });
    const fail = (e: unknown) => {
      this.dead = true;
      const oom = (e as { code?: string })?.code === 'ERR_WORKER_OUT_OF_MEMORY';
      for (const p of this.pending.values()) {
        clearTimeout(p.timer);
        p.reject(oom ? new AppError('payload_too_large', 'The document is too large or too complex to process (it exhausted the memory set aside for one document): send a smaller one.') : e);
      }
      this.pending.clear();
    };
    this.worker.on('error', fail);
    this.worker.on('exit', (code) => fail(new Error(`document thread exited with code ${code}`)));
  }
  call(op: string, args: unknown, transfer: ArrayBuffer[] = []): Promise<unknown> {
    if (this.dead) return Promise.reject(new AppError('unavailable', 'The document service restarted; try again.'));
    return new Promise((resolve, reject) => {
      const id = this.next++;
      const timer = setTimeout(() => {
        this.pending.delete(id);
        this.dead = true;
        void this.worker.terminate();
        reject(new AppError('unavailable', `Processing took longer than ${Math.round(this.timeoutMs / 1000)} s and was stopped; try again later or send a smaller document.`, [], { 'Retry-After': '10' }));
      }, this.timeoutMs);
      this.pending.set(id, { resolve, reject, timer });
      this.worker.postMessage({ id, op, args }, transfer);
    });
  }
}

export interface ThreadPoolOptions {
  /** threads at most (each holds one session at a time) */
  size: number;
  /** longest call before its thread is stopped */
  timeoutMs?: number;
  /** old-generation heap of one thread */
  heapMb?: number;
}

export class ThreadPool {
  private readonly idle: Thread[] = [];
  private live = 0;
  private readonly waiting: ((t: Thread) => void)[] = [];
  private closed = false;
  private readonly timeoutMs: number;
  private readonly heapMb: number;
  constructor(readonly options: ThreadPoolOptions) {
    this.timeoutMs = options.timeoutMs ?? 30_000;
    this.heapMb = options.heapMb ?? 1024;
  }

  private take(): Promise<Thread> {
    while (this.idle.length) {
      const t = this.idle.pop()!;
      if (!t.dead) return Promise.resolve(t);
      this.live--;
    }
    if (this.live < this.options.size) {
      this.live++;
      return Promise.resolve(new Thread(this.timeoutMs, this.heapMb));
    }
    return new Promise((resolve) => this.waiting.push(resolve));
  }

  private give(t: Thread) {
    if (t.dead || this.closed) {
      this.live--;
      if (!this.closed) void t.worker.terminate();
      const w = this.waiting.shift();
      if (w) { this.live++; w(new Thread(this.timeoutMs, this.heapMb)); }
      return;
    }
    const w = this.waiting.shift();
    if (w) w(t); else this.idle.push(t);
  }

  /** One thread for several calls; release it in a finally. */
  async session(): Promise<ThreadSession> {
    if (this.closed) throw new AppError('unavailable', 'The server is shutting down.');
    const t = await this.take();
    let released = false;
    return {
      call: (op, args, transfer) => t.call(op, args, transfer) as never,
      release: () => { if (!released) { released = true; this.give(t); } },
    };
  }

  /** One call on any thread. */
  async run<K extends OpName>(op: K, args: Args<K>, transfer?: ArrayBuffer[]): Promise<Result<K>> {
    const s = await this.session();
    try { return await s.call(op, args, transfer); } finally { s.release(); }
  }

  async close(): Promise<void> {
    this.closed = true;
    const ts = this.idle.splice(0);
    await Promise.all(ts.map((t) => t.worker.terminate()));
  }
}
