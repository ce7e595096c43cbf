/**
 * Boots a complete server process: lock, database, migrations, fake SMTP, mailer, seed, app, HTTP
 * listener and clean shutdown. Used by server/index.ts (npm start / npm run dev) and by tests that
 * start real child processes.
 */
import http from 'node:http';
import path from 'node:path';
import type { Config } from './config';
import { openDatabase, type Database } from './db/client';
import { applyMigrations } from './db/migrate';
import { lockDataDir, type DirLock } from './db/lock';
import { startFakeSmtp, type FakeSmtp } from './mail/fake-smtp';
import { createMailer, type Mailer } from './mail/mailer';
import { createApp } from './app';
import { createLogger, type Logger } from './log';
import { kickJobs } from './effects';
import { seedDemo, DEMO_ACCOUNTS, DEMO_PASSWORD } from './db/seed';
import { startWorker, type Worker } from './jobs/worker';
import { rescoreOutdatedStandings } from './services/recompute-standings';
import { upgradeEngine } from './jobs/engine-upgrade';

export interface Running {
  worker?: Worker;
  url: string;
  config: Config;
  database: Database;
  log: Logger;
  server: http.Server;
  smtp?: FakeSmtp;
  stop(): Promise<void>;
}

export async function boot(config: Config, opts: { dev?: boolean; quiet?: boolean } = {}): Promise<Running> {
  const log = createLogger(config.logLevel);
  // reopen time (lock, open with crash recovery, migrations), printed in the ready line below:
  // tests/server/durability.test.ts reads it to check RELIABILITY.md's 5 s reopen bound
  const openStarted = performance.now();
  let lock: DirLock | undefined;
  if (!config.databaseUrl) lock = await lockDataDir(config.dataDir);
  const database = await openDatabase({ databaseUrl: config.databaseUrl, dataDir: config.databaseUrl ? undefined : path.join(config.dataDir, 'pglite') });
  await applyMigrations(database);
  const openMs = Math.round(performance.now() - openStarted);

  let smtp: FakeSmtp | undefined;
  let mailer: Mailer;
  if (config.smtpUrl) {
    mailer = createMailer({ url: config.smtpUrl, from: config.mailFrom });
  } else {
    smtp = await startFakeSmtp(database.db, config.fakeSmtpPort).catch(() => startFakeSmtp(database.db, 0));
    mailer = createMailer({ port: smtp.port, from: config.mailFrom });
  }

  const server = http.createServer();
  const { app, ctx } = await createApp({
    database, mailer, config, log,
    beforeClient: opts.dev
      ? async (a) => {
          const { createServer } = await import('vite');
          const vite = await createServer({ server: { middlewareMode: true, ws: { server } }, appType: 'spa' });
          a.use(vite.middlewares);
        }
      : undefined,
  });
  // Shutdown in three steps (stop below): requests already accepted finish; then, for
  // config.shutdownDrainMs, new requests (the kernel's accept queue and keep-alive reuse) are
  // answered 503 with Retry-After and Connection: close, a retryable refusal instead of a reset;
  // then the listener closes.
  let draining = false;
  let inFlight = 0;
  let idle: (() => void) | null = null;
  server.on('request', (req: http.IncomingMessage, res: http.ServerResponse) => {
    if (draining) {
      const body = JSON.stringify({ error: { code: 'unavailable', message: 'Parallax is restarting: send the request again in a few seconds.', problems: [] } });
      res.writeHead(503, { 'content-type': 'application/json; charset=utf-8', 'retry-after': '5', connection: 'close', 'content-length': Buffer.byteLength(body) });
      res.end(body);
      return;
    }
    inFlight++;
    res.once('close', () => { if (--inFlight === 0 && idle) idle(); });
    app(req, res);
  });

  let worker: Worker | undefined;
  if (config.runWorker) {
    worker = await startWorker(database.db, log, {
      recover: config.databaseUrl ? 10 * 60_000 : 'all',
      planner: { secondsBudget: config.referenceBudget.secondsPerTarget, coneQubitLimit: config.referenceBudget.coneQubitLimit },
      slices: { threads: config.referenceThreads, jobsAbove: config.tnSliceJobs.above, jobsPerTerm: config.tnSliceJobs.perTerm },
      now: ctx.now,
    });
    ctx.jobs.kick = () => worker!.kick();
    // a change of the scoring rules recomputes every standings (a rescoring in each history)
    const rescored = await rescoreOutdatedStandings(database.db);
    if (rescored.length) { log.info('scoring rules changed: standings queued for recomputation', { versions: rescored.length }); await ctx.applyEffects([kickJobs()]); }
    // references of an older engine are recomputed and their standings rescored (one history event each)
    const upgraded = await upgradeEngine(database.db, ctx.now());
    if (upgraded.versions) {
      log.info('engine.upgrade', { ...upgraded });
      await ctx.applyEffects([kickJobs()]);
    }
  }
  let seeded = false;
  if (config.seedDemo) seeded = await seedDemo(ctx);

  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(config.port, config.host, () => resolve());
  });
  const addr = server.address();
  const port = typeof addr === 'object' && addr ? addr.port : config.port;
  const url = config.baseUrl.includes(`:${config.port}`) && config.port === 0 ? `http://localhost:${port}` : config.baseUrl;
  if (!opts.quiet) {
    console.log(`\nParallax is running at ${url}  (database: ${database.kind} ${database.location}, opened in ${openMs} ms${smtp ? `, fake mail on port ${smtp.port}` : ''})`);
    if (config.seedDemo) {
      console.log(seeded ? 'Demo scenario seeded. Demo accounts:' : 'Demo accounts:');
      for (const a of DEMO_ACCOUNTS) console.log(`  ${a.role.padEnd(10)} ${a.email.padEnd(30)} ${DEMO_PASSWORD}   (${a.name}${a.team ? `, ${a.team}` : ''})`);
    }
  }

  let stopping: Promise<void> | undefined;
  const stop = () =>
    (stopping ??= (async () => {
      draining = true;
      // the requests accepted before the signal finish (at most 10 s)
      if (inFlight > 0) await new Promise<void>((resolve) => { idle = resolve; setTimeout(resolve, 10_000).unref(); });
      // connections still queued are accepted now that the loop is free, and refused with a 503
      if (config.shutdownDrainMs > 0) await new Promise((r) => setTimeout(r, config.shutdownDrainMs));
      await new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeIdleConnections?.();
        setTimeout(() => server.closeAllConnections?.(), 10_000).unref();
      });
      await worker?.stop();
      // queued account mail (reset, verification, invitations) goes out before the mailer closes (at most 5 s)
      await Promise.race([ctx.mailQueue.idle(), new Promise((r) => setTimeout(r, 5000).unref())]);
      await ctx.threads.close();
      mailer.close();
      await smtp?.close();
      await database.close();
      await lock?.release();
    })());
  return { url, config, database, log, server, smtp, worker, stop };
}
