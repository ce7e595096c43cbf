/**
 * The tie between the planner's rate constants (shared/physics/planner/rates.ts) and what the
 * benchmarks measure: a benchmark prints its measured rate next to the constant, and the check
 * fails when they differ by more than RATE_TOLERANCE either way. The benchmark then exits 1, so
 * `npm run bench` (bench/run.ts) fails: a change of engine speed must come with a new constant.
 */
import { RATE_TOLERANCE } from '../shared/physics/planner/rates';

/** Print the comparison; true when the constant is within RATE_TOLERANCE of the measured rate. */
export function checkRate(name: string, constant: number, measured: number, unit: string): boolean {
  const ratio = measured / constant;
  const ok = Number.isFinite(ratio) && ratio <= RATE_TOLERANCE && ratio >= 1 / RATE_TOLERANCE;
  console.log(
    `planner constant ${name} = ${constant.toExponential(2)} ${unit}; measured ${measured.toExponential(2)}: ` +
      `measured / constant ${ratio.toFixed(2)} [target: within ${RATE_TOLERANCE}x either way] ${ok ? 'PASS' : 'FAIL (update shared/physics/planner/rates.ts)'}`,
  );
  return ok;
}
