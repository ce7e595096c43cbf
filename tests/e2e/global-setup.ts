/** Browser tests: Debian's chromium present, and the client built once into dist/. */
import { execFileSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('../..', import.meta.url));

export default function setup(): void {
  execFileSync('bash', ['scripts/ensure-browser.sh'], { cwd: root, stdio: 'inherit' });
  execFileSync(process.execPath, ['node_modules/vite/bin/vite.js', 'build', '--logLevel', 'warn'], { cwd: root, stdio: 'inherit' });
}
