/**
 * Runs in a document thread (server/jobs/thread-pool.ts): the operations the pool can call. Each
 * thread serves one session at a time, so the entry document of the current session is kept here
 * between its calls. No database access here.
 */
import { setPriority } from 'node:os';
import { parentPort } from 'node:worker_threads';
import { AppError } from '../errors';
import { EntryDocumentSession } from '../services/entry-validation/session';
import { challengeOps } from '../services/challenge-computations';

// a lower scheduling priority for this thread only (Linux applies setpriority(0) to the calling
// thread): on a busy machine the event loop thread gets the CPU first, so the health check and
// other requests are not starved while a large document is checked here
try { setPriority(0, 10); } catch { /* not permitted here: run at the normal priority */ }

const entry = new EntryDocumentSession();

export const threadOps = {
  'entry.parse': (bytes: Uint8Array) => entry.parse(bytes),
  'entry.check': (vt: Parameters<EntryDocumentSession['check']>[0]) => entry.check(vt),
  'entry.document': (_: null) => entry.document(),
  'entry.preview': (a: Parameters<EntryDocumentSession['preview']>[0]) => entry.preview(a),
  'entry.end': (_: null) => entry.end(),
  ...challengeOps,
};
export type ThreadOps = typeof threadOps;

const port = parentPort;
if (port) {
  port.on('message', (m: { id: number; op: keyof ThreadOps; args: unknown }) => {
    try {
      const value = (threadOps[m.op] as (a: unknown) => unknown)(m.args);
      // pieces of a large download are moved to the main thread, not copied
      const pieces = (value as { pieces?: Uint8Array[] } | undefined)?.pieces;
      port.postMessage({ id: m.id, ok: true, value }, pieces ? pieces.map((x) => x.buffer as ArrayBuffer) : []);
    } catch (e) {
      if (e instanceof AppError) port.postMessage({ id: m.id, ok: false, error: { code: e.code, message: e.message, problems: e.problems } });
      else port.postMessage({ id: m.id, ok: false, error: { message: e instanceof Error ? e.message : String(e) } });
    }
  });
}
