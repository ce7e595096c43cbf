/** The server process: `npm start` (via scripts/start.ts) and `npm run dev` (with --dev). */
import { loadConfig } from './config';
import { boot } from './boot';
import { DataDirLockedError } from './db/lock';

const dev = process.argv.includes('--dev');
const config = loadConfig();
if (dev && !config.trustedOrigins.length) config.trustedOrigins.push('http://localhost:5173');

try {
  const running = await boot(config, { dev });
  let signalled = false;
  const shutdown = (sig: string) => {
    if (signalled) return;
    signalled = true;
    console.log(`\n${sig}: finishing requests in flight and closing the database...`);
    running.stop().then(() => process.exit(0), (e) => { console.error(e); process.exit(1); });
  };
  process.on('SIGTERM', () => shutdown('SIGTERM'));
  process.on('SIGINT', () => shutdown('SIGINT'));
} catch (e) {
  if (e instanceof DataDirLockedError) {
    console.error(`Parallax cannot start: ${e.message}`);
    process.exit(3);
  }
  console.error('Parallax could not start:', e);
  process.exit(1);
}
