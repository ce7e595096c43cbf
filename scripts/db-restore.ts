/**
 * `npm run db:restore -- backup.sql`: restores a SQL dump into the configured data directory,
 * which must be empty (or pass --force to replace what is there). Stop the server first.
 */
import { existsSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import path from 'node:path';
import { loadConfig } from '../server/config';
import { openDatabase } from '../server/db/client';
import { lockDataDir } from '../server/db/lock';

const file = process.argv.find((a, i) => i > 1 && !a.startsWith('--'));
const force = process.argv.includes('--force');
if (!file || !existsSync(file)) {
  console.error('Usage: npm run db:restore -- path/to/backup.sql [--force]');
  process.exit(2);
}
const config = loadConfig();
if (config.databaseUrl) {
  console.error('DATABASE_URL is set: restore into PostgreSQL with psql instead.');
  process.exit(2);
}
const lock = await lockDataDir(config.dataDir).catch((e) => { console.error(e.message); process.exit(3); });
const dir = path.join(config.dataDir, 'pglite');
if (existsSync(dir) && readdirSync(dir).length) {
  if (!force) {
    console.error(`${dir} already holds a database. Pass --force to replace it.`);
    process.exit(2);
  }
  rmSync(dir, { recursive: true, force: true });
}
const database = await openDatabase({ dataDir: dir });
await database.pglite!.exec(readFileSync(file, 'utf8'));
console.log(`Restored ${file} into ${dir}`);
await database.close();
await lock.release();
