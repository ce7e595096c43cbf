/**
 * The browser tests' demo data directory, prepared in a process of its own (started in the
 * background by tests/e2e/global-setup.ts so that it runs while the other projects' tests run):
 * boots the server in this process on a fresh directory with the demo seed (accounts, challenges,
 * references, demo entries, standings), waits until every job has finished, stops it cleanly and
 * exits 0. Run: node --import tsx tests/e2e/prepare-demo.ts <empty data directory>
 */
import { boot } from '../../server/boot';
import { loadConfig } from '../../server/config';

const dataDir = process.argv[2];
if (!dataDir) throw new Error('usage: prepare-demo.ts <data directory>');
const t0 = performance.now();
// the browser specs need the demo's pages, not its slowest references: 3 s per target (the demo
// itself allows up to two minutes, server/db/demo-challenges.ts)
const running = await boot(loadConfig({ DATA_DIR: dataDir, PORT: '0', HOST: '127.0.0.1', FAKE_SMTP_PORT: '0', LOG_LEVEL: 'warn', REFERENCE_SECONDS_BUDGET: '3' }), { quiet: true });
try {
  // a safety net, not a target: about 3 min alone on CI's 2 cores, but it shares them with the
  // other projects' tests, and a crowded machine takes far longer (10 min was not enough at a load
  // average of 16)
  const deadline = Date.now() + 1_500_000;
  let quiet = 0;
  // settled: jobs exist and none is queued or running, twice in a row (a finished job may queue another)
  while (quiet < 2) {
    if (Date.now() > deadline) throw new Error('the demo jobs did not finish in 25 minutes');
    await new Promise((r) => setTimeout(r, 250));
    const jobs = await running.database.db.query.jobs.findMany({ columns: { state: true } });
    quiet = jobs.length > 0 && jobs.every((j) => j.state === 'done' || j.state === 'failed') ? quiet + 1 : 0;
  }
} finally {
  await running.stop();
}
console.log(`[e2e] demo data directory prepared in ${Math.round((performance.now() - t0) / 1000)} s (in the background, beside the other tests)`);
process.exit(0);
