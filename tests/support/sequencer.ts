/**
 * The order test files start in (vite.config.ts, sequence.sequencer): vitest's own order (files that
 * failed last time, then the longest by the durations it cached) with the known long files first.
 * CI runs on a clean clone, where vitest has no cached durations and falls back to file size: the
 * kill -9 loop (about 2 minutes at CI's 50 cycles) would then start whenever its turn came and end
 * the run alone on one worker while the other waits. Started first, it runs beside all the others.
 */
import { BaseSequencer, type TestSpecification } from 'vitest/node';

/** the longest files of the run, longest first (test-output/vitest.json of a CI run) */
const LONG_FIRST = ['tests/server/durability.test.ts', 'tests/server/backup.test.ts', 'tests/server/abuse.test.ts', 'tests/server/uploads.test.ts'];

const rank = (spec: TestSpecification) => {
  const file = spec.moduleId.replaceAll('\\', '/');
  const i = LONG_FIRST.findIndex((p) => file.endsWith(p));
  return i < 0 ? LONG_FIRST.length : i;
};

export default class LongFirstSequencer extends BaseSequencer {
  override async sort(files: TestSpecification[]): Promise<TestSpecification[]> {
    const sorted = await super.sort(files);
    return [...sorted].sort((a, b) => rank(a) - rank(b)); // stable: vitest's order otherwise
  }
}
