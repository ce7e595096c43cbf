/**
 * Builds one migrated PGlite database per test run and dumps it; every test database starts from
 * that dump (about 0.8 s) instead of migrating again (about 3 s).
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { TestProject } from 'vitest/node';
import { openDatabase } from '../../server/db/client';
import { applyMigrations } from '../../server/db/migrate';

declare module 'vitest' {
  export interface ProvidedContext { pgliteTemplate: string; databaseUrl: string }
}

export default async function setup(project: TestProject) {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'parallax-template-'));
  const file = path.join(dir, 'template.tar.gz');
  const database = await openDatabase({});
  await applyMigrations(database);
  const dump = await database.pglite!.dumpDataDir('gzip');
  writeFileSync(file, Buffer.from(await dump.arrayBuffer()));
  await database.close();
  project.provide('pgliteTemplate', file);
  project.provide('databaseUrl', process.env.TEST_DATABASE_URL ?? '');
  return () => rmSync(dir, { recursive: true, force: true });
}
