/**
 * Once per test run, before any server test file:
 * - one migrated PGlite database, dumped: every PGlite test database starts from that dump (about
 *   0.8 s) instead of migrating again (about 3 s);
 * - on PostgreSQL (TEST_DATABASE_URL), a run id for the template databases that tests/server/helpers.ts
 *   migrates once and copies with CREATE DATABASE ... TEMPLATE;
 * - the prebuilt server (tests/support/build-server.ts) for the tests that start server processes;
 * - a cache directory for the prepared worlds (tests/support/run-once.ts), built on first use.
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

export default async function setup(project: TestProject) {
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
  project.provide('pgliteTemplate', file);
  project.provide('databaseUrl', process.env.TEST_DATABASE_URL ?? '');
  project.provide('runId', `${process.pid}_${Date.now().toString(36)}`);
  project.provide('runCache', runCache);
  project.provide('serverBundle', serverBundle);
  return () => {
    rmSync(dir, { recursive: true, force: true });
    rmSync(buildDir, { recursive: true, force: true });
  };
}
