/** Starts a compute thread (TypeScript through tsx's loader) and streams its messages. */
import { Worker } from 'node:worker_threads';
import type { ComputeMessage, ComputeRequest } from './compute-thread';

export function runCompute(req: ComputeRequest, onMessage: (m: ComputeMessage) => Promise<void> | void): Promise<void> {
  return new Promise((resolve, reject) => {
    const w = new Worker(new URL('./compute-thread-boot.mjs', import.meta.url), {
      workerData: req,
      resourceLimits: { maxOldGenerationSizeMb: 4096 },
    });
    let chain = Promise.resolve();
    let failed: Error | null = null;
    w.on('message', (m: ComputeMessage) => {
      chain = chain.then(() => onMessage(m)).catch((e) => { failed ??= e; });
      if (m.type === 'error') failed ??= new Error(m.message);
    });
    w.once('error', (e) => { failed ??= e; });
    w.once('exit', (code) => {
      chain.then(() => {
        if (failed) reject(failed);
        else if (code !== 0) reject(new Error(`compute thread exited with code ${code}`));
        else resolve();
      });
    });
  });
}
