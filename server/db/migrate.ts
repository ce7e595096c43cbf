/** Applies the drizzle-kit migrations in drizzle/ from the app itself (never from a second process). */
import { fileURLToPath } from 'node:url';
import { readFileSync } from 'node:fs';
import { sql } from 'drizzle-orm';
import { migrate as migratePglite } from 'drizzle-orm/pglite/migrator';
import { migrate as migratePg } from 'drizzle-orm/node-postgres/migrator';
import type { Database } from './client';

export const MIGRATIONS_DIR = fileURLToPath(new URL('../../drizzle', import.meta.url));

export function migrationCount(): number {
  const journal = JSON.parse(readFileSync(`${MIGRATIONS_DIR}/meta/_journal.json`, 'utf8')) as { entries: unknown[] };
  return journal.entries.length;
}

export async function applyMigrations(database: Database): Promise<void> {
  const cfg = { migrationsFolder: MIGRATIONS_DIR };
  // the casts: both migrators take their own driver's database type; ours is the common base
  if (database.kind === 'pglite') await migratePglite(database.db as never, cfg);
  else await migratePg(database.db as never, cfg);
}

/** The number of migrations applied, from drizzle's own bookkeeping table. */
export async function migrationLevel(database: Database): Promise<number> {
  try {
    const r = (await database.db.execute(sql`select count(*)::int as n from drizzle.__drizzle_migrations`)) as unknown as { rows: { n: number }[] };
    return Number(r.rows[0].n);
  } catch {
    return 0;
  }
}
