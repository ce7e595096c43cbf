/**
 * Slices of a tensor-network plan on several worker threads (issue 15).
 *
 * A term whose plan has more than one slice is contracted block by block (the fixed blocks of
 * sliceBlocks in shared/physics/tensor-network/index.ts): the slice threads take blocks from a
 * shared counter (so a slow block does not hold the others up), each writes its block's partial sum
 * into that block's slot of a SharedArrayBuffer, and the caller adds the slots in block order. The
 * value is therefore the same number whatever the thread count (and the same as contractPlan).
 *
 * The caller blocks (Atomics.wait) while the threads work: it is meant for the compute thread,
 * whose reference engine is synchronous, never for a server's main thread. It wakes every `pollMs`
 * to call `onStep` (the engine's time cap: a throw there stops the threads at their next pairwise
 * step) and reports finished blocks through `onBlock` (the job's progress).
 *
 * Each thread holds one slice's intermediates (plan.memoryBytes, within the plan's memory budget),
 * so a plan runs on at most as many threads as half the machine's memory holds such slices.
 *
 * Threads start on first use and live as long as this pool (close() ends them; they are unref'd, so
 * a compute thread that ends takes them with it).
 */
import { MessageChannel, receiveMessageOnPort, Worker, type MessagePort } from 'node:worker_threads';
import { totalmem } from 'node:os';
import { contractSliceRange, sliceBlocks, sumBlocks, type TnTermPlan } from '@shared/physics/tensor-network/index';

/** Slots of the shared control array: next block to take, blocks done, abort flag, error flag. */
export const CTL = { next: 0, done: 1, abort: 2, error: 3 } as const;

/** What a slice thread receives for one plan. */
export interface SliceTask {
  plan: TnTermPlan;
  blocks: [number, number][];
  ctl: SharedArrayBuffer;
  out: SharedArrayBuffer;
}

export interface BlockRunOptions {
  /** called between waits (throw to stop every thread, e.g. the engine's time cap) */
  onStep?: () => void;
  /** blocks finished so far, of the total */
  onBlock?: (done: number, total: number) => void;
  /** longest wait between onStep calls, ms (default 200) */
  pollMs?: number;
}

/** How many slices of `bytes` each fit in half the machine's memory (at least 1). */
export function threadsForMemory(bytes: number, total = totalmem()): number {
  return Math.max(1, Math.floor((0.5 * total) / Math.max(1, bytes)));
}

interface SliceWorker { worker: Worker; errors: MessagePort; dead: boolean }
interface Run { ctl: Int32Array; ws: SliceWorker[]; nb: number; seen: number }

export class SliceThreads {
  private readonly workers: SliceWorker[] = [];
  constructor(readonly size: number) {}

  private ensure(n: number): SliceWorker[] {
    for (let i = this.workers.length - 1; i >= 0; i--) if (this.workers[i].dead) this.workers.splice(i, 1);
    while (this.workers.length < n) {
      const ch = new MessageChannel();
      const worker = new Worker(new URL('./slice-thread-boot.mjs', import.meta.url), {
        workerData: { errors: ch.port2 }, transferList: [ch.port2],
        resourceLimits: { maxOldGenerationSizeMb: 4096 },
      });
      worker.unref();
      const sw: SliceWorker = { worker, errors: ch.port1, dead: false };
      worker.once('exit', () => { sw.dead = true; });
      this.workers.push(sw);
    }
    return this.workers.slice(0, n);
  }

  /** Starts the threads on a plan's blocks; null when they run in this thread (one thread, one block). */
  private launch(plan: TnTermPlan, blocks: [number, number][], out: Float64Array): Run | null {
    const threads = Math.min(this.size, blocks.length, threadsForMemory(plan.memoryBytes));
    if (threads <= 1) return null;
    const ctl = new Int32Array(new SharedArrayBuffer(4 * 4));
    const ws = this.ensure(threads);
    // errors a thread posted after an earlier run was given up are not this run's
    for (const w of ws) while (receiveMessageOnPort(w.errors));
    const task: SliceTask = { plan, blocks, ctl: ctl.buffer as SharedArrayBuffer, out: out.buffer as SharedArrayBuffer };
    for (const w of ws) w.worker.postMessage(task);
    return { ctl, ws, nb: blocks.length, seen: 0 };
  }

  /** One look at a run: progress reported, a failed or stopped thread thrown; true when every block is done. */
  private poll(r: Run, opts: BlockRunOptions): boolean {
    const done = Atomics.load(r.ctl, CTL.done);
    if (Atomics.load(r.ctl, CTL.error)) {
      const msgs = r.ws.map((w) => receiveMessageOnPort(w.errors)?.message).filter(Boolean);
      throw new Error(`a slice thread failed: ${msgs.join('; ') || 'no message'}`);
    }
    if (done !== r.seen) { r.seen = done; opts.onBlock?.(done, r.nb); }
    if (done >= r.nb) return true;
    // seen only where the caller's event loop runs (runBlocksAsync): a thread that died (out of memory)
    if (r.ws.some((w) => w.dead)) throw new Error('a slice thread stopped before its blocks were done');
    opts.onStep?.();
    return false;
  }

  private inline(plan: TnTermPlan, blocks: [number, number][], out: Float64Array, opts: BlockRunOptions): Float64Array {
    blocks.forEach(([s, e], b) => {
      const [re, im] = contractSliceRange(plan, s, e, { onStep: opts.onStep });
      out[2 * b] = re;
      out[2 * b + 1] = im;
      opts.onBlock?.(b + 1, blocks.length);
    });
    return out;
  }

  /**
   * The partial sums of the given blocks of a plan ([re0, im0, re1, im1, ...] in the order of
   * `blocks`), computed on min(size, blocks) threads, or in this thread when that is one. Blocks
   * the calling thread until they are done (for the synchronous reference engine).
   */
  runBlocks(plan: TnTermPlan, blocks: [number, number][], opts: BlockRunOptions = {}): Float64Array {
    const out = new Float64Array(new SharedArrayBuffer(16 * Math.max(1, blocks.length)));
    const r = this.launch(plan, blocks, out);
    if (!r) return this.inline(plan, blocks, out, opts);
    try {
      while (!this.poll(r, opts)) Atomics.wait(r.ctl, CTL.done, r.seen, opts.pollMs ?? 200);
    } catch (e) {
      Atomics.store(r.ctl, CTL.abort, 1);
      throw e;
    }
    return out;
  }

  /** As runBlocks, without blocking this thread's event loop (so a thread that dies is noticed). */
  async runBlocksAsync(plan: TnTermPlan, blocks: [number, number][], opts: BlockRunOptions = {}): Promise<Float64Array> {
    const out = new Float64Array(new SharedArrayBuffer(16 * Math.max(1, blocks.length)));
    const r = this.launch(plan, blocks, out);
    if (!r) return this.inline(plan, blocks, out, opts);
    try {
      while (!this.poll(r, opts)) await new Promise((res) => setTimeout(res, opts.pollMs ?? 200));
    } catch (e) {
      Atomics.store(r.ctl, CTL.abort, 1);
      throw e;
    }
    return out;
  }

  /** The value of a whole plan: every slice block, summed in block order (as contractPlan). */
  contract(plan: TnTermPlan, opts: BlockRunOptions = {}): [number, number] {
    if (plan.leaves.length === 0) return [plan.scalar[0], plan.scalar[1]];
    return sumBlocks(this.runBlocks(plan, sliceBlocks(plan.slices), opts));
  }

  async close(): Promise<void> {
    const ws = this.workers.splice(0);
    await Promise.all(ws.map((w) => { w.errors.close(); return w.worker.terminate(); }));
  }
}
