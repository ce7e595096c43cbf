/** `npm run db:migrate`: applies drizzle/ migrations to the configured database (the server does this at start too). */
import { applyMigrations, migrationLevel } from '../server/db/migrate';
import { openConfigured } from './db-common';

const { database, close } = await openConfigured().catch((e) => { console.error(e.message); process.exit(3); });
await applyMigrations(database);
console.log(`Migrations applied: ${await migrationLevel(database)} (${database.kind} ${database.location})`);
await close();
