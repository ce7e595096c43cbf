/**
 * Opens the database: PGlite (embedded PostgreSQL) on a data directory or in memory, or a
 * PostgreSQL server when DATABASE_URL is set. Both are reached through the same Drizzle API.
 */
import { mkdirSync } from 'node:fs';
import { PGlite } from '@electric-sql/pglite';
import { drizzle as drizzlePglite } from 'drizzle-orm/pglite';
import { drizzle as drizzlePg } from 'drizzle-orm/node-postgres';
import type { PgDatabase, PgQueryResultHKT } from 'drizzle-orm/pg-core';
import pg from 'pg';
import * as schema from './schema';

export type Schema = typeof schema;
export type Db = PgDatabase<PgQueryResultHKT, Schema>;
/** The handle inside `db.transaction(async (tx) => ...)`. Use only it inside a transaction. */
export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];
export type DbOrTx = Db | Tx;

export interface Database {
  db: Db;
  kind: 'pglite' | 'postgres';
  /** where the data lives: a directory, 'memory', or the server URL without password */
  location: string;
  close(): Promise<void>;
  /** PGlite only: the raw client (for dumpDataDir in backups and test templates) */
  pglite?: PGlite;
}

export interface OpenOptions {
  /** postgres://... switches to a PostgreSQL server */
  databaseUrl?: string;
  /** PGlite data directory; undefined means in memory */
  dataDir?: string;
  /** PGlite: start from a dumped data directory (a migrated template) */
  loadDataDir?: Blob | File;
}

export async function openDatabase(opts: OpenOptions): Promise<Database> {
  if (opts.databaseUrl) {
    const pool = new pg.Pool({ connectionString: opts.databaseUrl, max: 10 });
    const db = drizzlePg(pool, { schema }) as unknown as Db;
    const u = new URL(opts.databaseUrl);
    u.password = '';
    return { db, kind: 'postgres', location: u.toString(), close: () => pool.end() };
  }
  if (opts.dataDir) mkdirSync(opts.dataDir, { recursive: true });
  const client = new PGlite({
    dataDir: opts.dataDir,
    loadDataDir: opts.loadDataDir,
  });
  await client.waitReady;
  const db = drizzlePglite(client, { schema }) as unknown as Db;
  let closed = false;
  return {
    db,
    kind: 'pglite',
    location: opts.dataDir ?? 'memory',
    pglite: client,
    close: async () => {
      if (closed) return;
      closed = true;
      await client.close();
    },
  };
}
