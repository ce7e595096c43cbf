/**
 * Browser tests, once per run: Debian's chromium present; the client built into dist/; the server
 * prebuilt (tests/support/build-server.ts); and the demo data directory seeded and computed once
 * (accounts, challenges, references, demo entries, standings: about a minute of CPU) and left
 * closed, so that each spec's server starts on a copy of it (tests/e2e/harness.ts) instead of
 * recomputing the demo.
 *
 * Vitest runs every project's global setup before the first test file, so the demo is not awaited
 * here: it is prepared by a child process (tests/e2e/prepare-demo.ts) that runs while the shared,
 * client and server projects run (the e2e project runs last, vite.config.ts sequence.groupOrder),
 * and the harness waits for it (waitForDemo) before it copies the directory. Its output and exit
 * status go to files beside the directory, so a failure is reported by the first spec that needs it.
 */
import { execFileSync, spawn } from 'node:child_process';
import { mkdirSync, mkdtempSync, openSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { TestProject } from 'vitest/node';
import { buildServer, ROOT } from '../support/build-server';

declare module 'vitest' {
  export interface ProvidedContext { serverBundle: string; demoDataDir: string }
}

export default async function setup(project: TestProject) {
  // the demo first: it is the longest, and needs nothing built below
  const work = mkdtempSync(path.join(os.tmpdir(), 'parallax-e2e-demo-'));
  const demo = path.join(work, 'data');
  mkdirSync(demo);
  const log = openSync(path.join(work, 'prepare.log'), 'w');
  const child = spawn(process.execPath, ['--import', 'tsx', 'tests/e2e/prepare-demo.ts', demo], { cwd: ROOT, stdio: ['ignore', log, log] });
  child.once('exit', (code, signal) => writeFileSync(path.join(work, 'exit.txt'), String(code ?? signal)));
  child.once('error', (e) => writeFileSync(path.join(work, 'exit.txt'), String(e)));

  execFileSync('bash', ['scripts/ensure-browser.sh'], { cwd: ROOT, stdio: 'inherit' });
  execFileSync(process.execPath, ['node_modules/vite/bin/vite.js', 'build', '--logLevel', 'warn'], { cwd: ROOT, stdio: 'inherit' });
  mkdirSync(path.join(ROOT, 'test-output'), { recursive: true });
  const buildDir = mkdtempSync(path.join(ROOT, 'test-output', 'server-build-'));
  project.provide('serverBundle', await buildServer(buildDir));
  project.provide('demoDataDir', demo);
  return async () => {
    if (child.exitCode === null && child.signalCode === null) {
      child.kill('SIGKILL');
      await new Promise((r) => child.once('exit', r));
    }
    rmSync(buildDir, { recursive: true, force: true });
    rmSync(work, { recursive: true, force: true });
  };
}
