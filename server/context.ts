/**
 * The app context every route, job and service helper receives: the database, auth, mail, config,
 * log, the injected clock, the worker's kick and the shared document slots. It lives apart from the
 * app factory (server/app.ts) so that nothing which app.ts imports needs to import app.ts back.
 */
import type { StandingsCache } from './services/standings-cache';
import type { Slots } from './util/document-body';
import type { Config } from './config';
import type { Database } from './db/client';
import type { Mailer } from './mail/mailer';
import type { MailQueue } from './mail/queue';
import type { Logger } from './log';
import type { Auth } from './auth';
import type { ThreadPool } from './jobs/thread-pool';
import type { VersionCache } from './services/version-cache';
import type { EffectApplier } from './effects';

export interface AppContext {
  database: Database;
  db: Database['db'];
  auth: Auth;
  mailer: Mailer;
  /** mail sent after the response (better-auth's account and invitation mails): server/mail/queue.ts */
  mailQueue: MailQueue;
  config: Config;
  log: Logger;
  now: () => Date;
  /** wakes the background worker after a job is queued (set by boot when a worker runs here) */
  jobs: { kick(): void };
  /** processing slots shared by every route that reads a large document (server/util/document-body.ts) */
  documentSlots: Slots;
  /** threads for document-sized work: entry checks, public computations on a challenge (server/jobs/thread-pool.ts) */
  threads: ThreadPool;
  /** results of public computations per challenge version (a stored version never changes) */
  versionCache: VersionCache;
  /** serialised standings responses of this app (dropped by the 'invalidate' effect) */
  standingsCache: StandingsCache;
  /** applies the after-commit effects services and jobs return (server/effects.ts): the one place that kicks, invalidates and mails */
  applyEffects: EffectApplier;
}
