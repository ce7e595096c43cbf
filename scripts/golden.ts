/**
 * `npm run golden`: recomputes the public numbers of the fixture challenges (references and
 * standings, tests/golden/numbers.ts) and rewrites tests/fixtures/golden/<challenge>.json with the
 * current ENGINE_VERSION and scoring-rules version. Run it after bumping a version; the golden test
 * (tests/golden/golden.test.ts) fails when numbers change and the version did not.
 * `npm run golden -- --check` only reports what would change (exit 1 if anything).
 */
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { computeGolden, diffGolden, fixtureNames, GOLDEN, type Golden } from '../tests/golden/numbers';

const check = process.argv.includes('--check');
let changed = 0;
mkdirSync(GOLDEN, { recursive: true });
for (const name of fixtureNames()) {
  const file = path.join(GOLDEN, `${name}.json`);
  const fresh = computeGolden(name);
  const stored = existsSync(file) ? (JSON.parse(readFileSync(file, 'utf8')) as Golden) : null;
  const d = stored ? diffGolden(stored, fresh) : { references: ['(no golden file yet)'], standings: [] };
  const versions = stored ? `${stored.engineVersion} / ${stored.rulesVersion} -> ${fresh.engineVersion} / ${fresh.rulesVersion}` : `${fresh.engineVersion} / ${fresh.rulesVersion}`;
  const n = d.references.length + d.standings.length;
  console.log(`${name}: ${n ? `${n} changes` : 'unchanged'} (${versions})`);
  for (const l of [...d.references, ...d.standings].slice(0, 20)) console.log(`  ${l}`);
  if (n || !stored || stored.engineVersion !== fresh.engineVersion || stored.rulesVersion !== fresh.rulesVersion) {
    changed++;
    if (!check) writeFileSync(file, JSON.stringify(fresh, null, 2) + '\n');
  }
}
console.log(check ? `${changed} golden files would change` : `${changed} golden files written to ${path.relative(process.cwd(), GOLDEN)}`);
if (check && changed) process.exitCode = 1;
