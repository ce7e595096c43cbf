/**
 * `npm start`: builds the client when dist/ is missing or older than its sources, then starts the
 * server (migrations, demo seed on an empty database, client and API on one port).
 */
import { existsSync, readdirSync, statSync } from 'node:fs';
import { execFileSync } from 'node:child_process';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('..', import.meta.url));
const built = path.join(root, 'dist', 'index.html');

function newest(p: string): number {
  const s = statSync(p);
  if (!s.isDirectory()) return s.mtimeMs;
  return Math.max(s.mtimeMs, ...readdirSync(p).map((f) => newest(path.join(p, f))));
}

const sources = ['src', 'shared', 'index.html', 'public', 'vite.config.ts', 'tailwind.config.ts'].map((p) => path.join(root, p)).filter(existsSync);
if (!existsSync(built) || Math.max(...sources.map(newest)) > statSync(built).mtimeMs) {
  console.log('Building the client (vite build)...');
  execFileSync(process.execPath, [path.join(root, 'node_modules/vite/bin/vite.js'), 'build', '--logLevel', 'warn'], { cwd: root, stdio: 'inherit' });
}
await import('../server/index');
