/**
 * Runs in a slice thread (server/jobs/slice-threads.ts): takes blocks of slices of one
 * tensor-network plan from a shared counter, contracts each block (contractSliceRange) and writes
 * its partial sum into the block's own slot of a shared array. Which thread computes which block
 * does not change the value: the caller adds the slots in block order.
 */
import { parentPort, workerData, type MessagePort } from 'node:worker_threads';
import { contractSliceRange, type TnTermPlan } from '@shared/physics/tensor-network/index';
import { CTL, type SliceTask } from './slice-threads';

const port = parentPort!;
const errors = (workerData as { errors: MessagePort }).errors;

port.on('message', (task: SliceTask) => {
  const { plan, blocks, ctl, out } = task;
  const c = new Int32Array(ctl);
  const o = new Float64Array(out);
  const stop = () => {
    if (Atomics.load(c, CTL.abort)) throw new Error('aborted');
  };
  try {
    for (;;) {
      if (Atomics.load(c, CTL.abort)) break;
      const b = Atomics.add(c, CTL.next, 1);
      if (b >= blocks.length) break;
      const [re, im] = contractSliceRange(plan as TnTermPlan, blocks[b][0], blocks[b][1], { onStep: stop });
      o[2 * b] = re;
      o[2 * b + 1] = im;
      Atomics.add(c, CTL.done, 1);
      Atomics.notify(c, CTL.done);
    }
  } catch (e) {
    if (!Atomics.load(c, CTL.abort)) {
      errors.postMessage(e instanceof Error ? e.message : String(e));
      Atomics.store(c, CTL.error, 1);
      Atomics.add(c, CTL.done, 1);
      Atomics.notify(c, CTL.done);
    }
  }
});
