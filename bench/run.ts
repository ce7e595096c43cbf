/**
 * `npm run bench`: runs every bench/*.bench.ts as its own process (so one benchmark's heap and JIT
 * state do not colour the next) and prints their figures. Targets are stated by each benchmark.
 */
import { readdirSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

const dir = fileURLToPath(new URL('.', import.meta.url));
const only = process.argv.slice(2);
const files = readdirSync(dir)
  .filter((f) => f.endsWith('.bench.ts'))
  .filter((f) => only.length === 0 || only.some((o) => f.includes(o)))
  .sort();
let failed = 0;
for (const f of files) {
  console.log(`\n=== ${f} ===`);
  const r = spawnSync(process.execPath, ['--import', 'tsx', '--expose-gc', `${dir}${f}`], { stdio: 'inherit' });
  if (r.status !== 0) failed++;
}
if (failed) {
  console.error(`\n${failed} benchmark(s) failed`);
  process.exit(1);
}
