/**
 * Once per test run, before any server test file:
 * - one migrated PGlite database, dumped: every PGlite test database starts from that dump (about
 *   0.8 s) instead of migrating again (about 3 s);
 * - on PostgreSQL (TEST_DATABASE_URL), a run id for the template databases that tests/server/helpers.ts
 *   migrates once and copies with CREATE DATABASE ... TEMPLATE;
 * - the prebuilt server (tests/support/build-server.ts) for the tests that start server processes;
 * - a cache directory for the prepared worlds (tests/support/run-once.ts), built on first use.
 * The same for both server projects (server and server-timed, vite.config.ts).
 */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { TestProject } from 'vitest/node';
import { openDatabase } from '../../server/db/client';
import { applyMigrations } from '../../server/db/migrate';
import { buildServer, ROOT } from '../support/build-server';

declare module 'vitest' {
  export interface ProvidedContext { pgliteTemplate: string; databaseUrl: string; runId: string; runCache: string; serverBundle: string }
}

interface Prepared { dir: string; file: string; runCache: string; buildDir: string; serverBundle: string; runId: string; users: number }

/** Once per run for both server projects (server, server-timed), kept on globalThis: vitest may load this file once per project. */
async function prepare(): Promise<Prepared> {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'parallax-template-'));
  const file = path.join(dir, 'template.tar.gz');
  const database = await openDatabase({});
  await applyMigrations(database);
  const dump = await database.pglite!.dumpDataDir('gzip');
  writeFileSync(file, Buffer.from(await dump.arrayBuffer()));
  await database.close();
  const runCache = path.join(dir, 'cache');
  mkdirSync(runCache);
  // inside the repository, so that the bundle's package imports resolve from node_modules
  mkdirSync(path.join(ROOT, 'test-output'), { recursive: true });
  const buildDir = mkdtempSync(path.join(ROOT, 'test-output', 'server-build-'));
  const serverBundle = await buildServer(buildDir);
  return { dir, file, runCache, buildDir, serverBundle, runId: `${process.pid}_${Date.now().toString(36)}`, users: 0 };
}

const shared = globalThis as { parallaxServerSetup?: Promise<Prepared> };

export default async function setup(project: TestProject) {
  shared.parallaxServerSetup ??= prepare();
  const p = await shared.parallaxServerSetup;
  p.users++;
  project.provide('pgliteTemplate', p.file);
  project.provide('databaseUrl', process.env.TEST_DATABASE_URL ?? '');
  project.provide('runId', p.runId);
  project.provide('runCache', p.runCache);
  project.provide('serverBundle', p.serverBundle);
  return () => {
    if (--p.users > 0) return;
    rmSync(p.dir, { recursive: true, force: true });
    rmSync(p.buildDir, { recursive: true, force: true });
  };
}
