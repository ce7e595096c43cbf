/**
 * Browser tests, once per run: Debian's chromium present; the client built into dist/; the server
 * prebuilt (tests/support/build-server.ts); and the demo data directory seeded and computed once
 * (accounts, challenges, references, demo entries, standings: about a minute of CPU) and left
 * closed, so that each spec's server starts on a copy of it (tests/e2e/harness.ts) instead of
 * recomputing the demo.
 */
import { execFileSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { TestProject } from 'vitest/node';
import { boot } from '../../server/boot';
import { loadConfig } from '../../server/config';
import { buildServer, ROOT } from '../support/build-server';

declare module 'vitest' {
  export interface ProvidedContext { serverBundle: string; demoDataDir: string }
}

/** Boots the server in this process on a fresh directory with the demo seed, waits for every job, stops it. */
async function prepareDemo(dataDir: string): Promise<void> {
  const running = await boot(loadConfig({ DATA_DIR: dataDir, PORT: '0', HOST: '127.0.0.1', FAKE_SMTP_PORT: '0', LOG_LEVEL: 'warn' }), { quiet: true });
  try {
    const deadline = Date.now() + 600_000;
    let quiet = 0;
    // settled: jobs exist and none is queued or running, twice in a row (a finished job may queue another)
    while (quiet < 2) {
      if (Date.now() > deadline) throw new Error('the demo jobs did not finish in 10 minutes');
      await new Promise((r) => setTimeout(r, 500));
      const jobs = await running.database.db.query.jobs.findMany({ columns: { state: true } });
      quiet = jobs.length > 0 && jobs.every((j) => j.state === 'done' || j.state === 'failed') ? quiet + 1 : 0;
    }
  } finally {
    await running.stop();
  }
}

export default async function setup(project: TestProject) {
  execFileSync('bash', ['scripts/ensure-browser.sh'], { cwd: ROOT, stdio: 'inherit' });
  execFileSync(process.execPath, ['node_modules/vite/bin/vite.js', 'build', '--logLevel', 'warn'], { cwd: ROOT, stdio: 'inherit' });
  mkdirSync(path.join(ROOT, 'test-output'), { recursive: true });
  const buildDir = mkdtempSync(path.join(ROOT, 'test-output', 'server-build-'));
  project.provide('serverBundle', await buildServer(buildDir));
  const demo = mkdtempSync(path.join(os.tmpdir(), 'parallax-e2e-demo-'));
  const t0 = performance.now();
  await prepareDemo(demo);
  console.log(`[e2e] demo data directory prepared once in ${Math.round((performance.now() - t0) / 1000)} s`);
  project.provide('demoDataDir', demo);
  return () => {
    rmSync(buildDir, { recursive: true, force: true });
    rmSync(demo, { recursive: true, force: true });
  };
}
