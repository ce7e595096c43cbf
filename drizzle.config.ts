import { defineConfig } from 'drizzle-kit';

// Generation only needs the schema; migrations are applied by the app itself at start
// (never run drizzle-kit against a live PGlite directory: two processes corrupt it).
export default defineConfig({
  dialect: 'postgresql',
  schema: './server/db/schema.ts',
  out: './drizzle',
});
