/**
 * The stability policy (CHANGELOG.md, docs/decisions/0006-versioned-public-numbers.md): the public
 * numbers of the fixture challenges (references and standings, tests/golden/numbers.ts) must equal
 * the golden files in tests/fixtures/golden/ unless the version they depend on was bumped.
 * - numbers changed, same version: fails, naming the numbers and the version to bump;
 * - version bumped, golden file still of the old version: fails until `npm run golden` rewrites it
 *   (the diff of that commit then shows every public number the bump changes).
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { computeGolden, diffGolden, fixtureNames, GOLDEN, type Golden } from './numbers';

describe('golden public numbers of the fixture challenges', () => {
  const names = fixtureNames();
  it('there is a golden file per fixture challenge', () => {
    expect(names.length).toBeGreaterThanOrEqual(3);
  });
  for (const name of names) {
    it(`${name}: references and standings as recorded, or a version bump`, () => {
      const stored = JSON.parse(readFileSync(path.join(GOLDEN, `${name}.json`), 'utf8')) as Golden;
      const fresh = computeGolden(name);
      const d = diffGolden(stored, fresh);
      const lines = (xs: string[]) => xs.slice(0, 10).map((l) => `    ${l}`).join('\n') + (xs.length > 10 ? `\n    ... ${xs.length - 10} more` : '');
      const problems: string[] = [];
      if (d.references.length && stored.engineVersion === fresh.engineVersion) {
        problems.push(`${d.references.length} reference(s) changed while ENGINE_VERSION stayed "${fresh.engineVersion}":\n${lines(d.references)}\n` +
          `  Bump ENGINE_VERSION in shared/physics/reference.ts, add a line under "Public numbers" in CHANGELOG.md, and run \`npm run golden\`.`);
      }
      if (d.standings.length && !d.references.length && stored.rulesVersion === fresh.rulesVersion) {
        problems.push(`${d.standings.length} standings number(s) changed while the scoring rules stayed "${fresh.rulesVersion}":\n${lines(d.standings)}\n` +
          `  Bump SCORING_RULES_VERSION (shared/scoring), add a line under "Public numbers" in CHANGELOG.md, and run \`npm run golden\`.`);
      }
      if (stored.engineVersion !== fresh.engineVersion || stored.rulesVersion !== fresh.rulesVersion) {
        problems.push(`the golden file was made with ${stored.engineVersion} / rules ${stored.rulesVersion}, the code is ${fresh.engineVersion} / rules ${fresh.rulesVersion}: ` +
          `run \`npm run golden\` and commit tests/fixtures/golden/ (${d.references.length + d.standings.length} numbers differ).`);
      }
      expect(problems.join('\n'), `golden numbers of ${name}`).toBe('');
    });
  }
});
