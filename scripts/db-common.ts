/** Shared by the db:* scripts: open the configured database the way the server does (with the lock). */
import path from 'node:path';
import { loadConfig } from '../server/config';
import { openDatabase } from '../server/db/client';
import { lockDataDir } from '../server/db/lock';

export async function openConfigured() {
  const config = loadConfig();
  const lock = config.databaseUrl ? undefined : await lockDataDir(config.dataDir);
  const database = await openDatabase({ databaseUrl: config.databaseUrl, dataDir: config.databaseUrl ? undefined : path.join(config.dataDir, 'pglite') });
  return { config, database, close: async () => { await database.close(); await lock?.release(); } };
}
