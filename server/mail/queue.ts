/**
 * Mail that a request asks for is queued here and sent after the response (issue 12 item 12): a
 * password-reset request for an existing account took 120 ms (the SMTP exchange was awaited) and
 * 10 ms for an unknown address, which told the two apart. The queue lives in this process and keeps
 * no copy of the message: a reset link holds a token that is stored only hashed, so it is never
 * written to a table. A failed send is logged; at most `maxPending` messages wait (beyond that a
 * message is dropped and logged: a flood cannot grow memory without bound).
 */
import type { Logger } from '../log';

export interface MailQueue {
  /** queue one send; returns at once */
  push(what: string, send: () => Promise<void>): void;
  /** resolves when every queued send has finished (tests, shutdown) */
  idle(): Promise<void>;
  readonly pending: number;
}

export function createMailQueue(log: Logger, opts: { concurrency?: number; maxPending?: number } = {}): MailQueue {
  const concurrency = opts.concurrency ?? 2;
  const maxPending = opts.maxPending ?? 1000;
  const waiting: { what: string; send: () => Promise<void> }[] = [];
  let running = 0;
  let idleWaiters: (() => void)[] = [];
  const pump = () => {
    while (running < concurrency && waiting.length) {
      const job = waiting.shift()!;
      running++;
      // setImmediate: the send starts after the current response has been written
      setImmediate(() => {
        job.send()
          .catch((e) => log.error('mail.send_failed', { what: job.what, error: String((e as Error)?.message ?? e).slice(0, 300) }))
          .finally(() => {
            running--;
            pump();
            if (!running && !waiting.length) {
              const w = idleWaiters;
              idleWaiters = [];
              for (const f of w) f();
            }
          });
      });
    }
  };
  return {
    push(what, send) {
      if (waiting.length >= maxPending) {
        log.error('mail.queue_full', { what, pending: waiting.length });
        return;
      }
      waiting.push({ what, send });
      pump();
    },
    idle: () => (running || waiting.length ? new Promise<void>((r) => idleWaiters.push(r)) : Promise.resolve()),
    get pending() { return running + waiting.length; },
  };
}
