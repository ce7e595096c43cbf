/**
 * `npm run db:backup [-- out.sql]`: a portable SQL dump of the PGlite database (pg_dump compiled to
 * WebAssembly, @electric-sql/pglite-tools). Takes the data-directory lock, so stop the server first.
 * For DATABASE_URL deployments use PostgreSQL's own pg_dump.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { pgDump } from '@electric-sql/pglite-tools/pg_dump';
import { openConfigured } from './db-common';

const { config, database, close } = await openConfigured().catch((e) => { console.error(e.message); process.exit(3); });
if (database.kind !== 'pglite') {
  console.error('DATABASE_URL is set: back up the PostgreSQL server with pg_dump instead.');
  process.exit(2);
}
const out = process.argv[2] ?? path.join(config.dataDir, '..', 'backups', `parallax-${new Date().toISOString().replace(/[:.]/g, '-')}.sql`);
const file = await pgDump({ pg: database.pglite!, args: ['--no-owner', '--no-privileges'] });
mkdirSync(path.dirname(out), { recursive: true });
writeFileSync(out, Buffer.from(await file.arrayBuffer()));
console.log(`Backup written: ${out}`);
await close();
