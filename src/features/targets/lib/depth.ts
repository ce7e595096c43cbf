/**
 * Where a method breaks: at each (steps, thetaH) of one observable, how the estimate's error
 * against the exact reference compares with the uncertainty the team stated for it.
 *   within     |error| <= u
 *   beyond-u   u < |error| <= 2u  (outside the standard uncertainty, inside the k = 2 interval)
 *   beyond-2u  |error| > 2u       (outside the interval the scoring counts as covered)
 *   no-reference  answered, but no exact value is public for this target
 *   missing    not answered
 */
export type BreakCell = 'within' | 'beyond-u' | 'beyond-2u' | 'no-reference' | 'missing';

export function breakCell(est: { value: number; uncertainty: number } | undefined, exact: number | null): BreakCell {
  if (!est) return 'missing';
  if (exact === null) return 'no-reference';
  const e = Math.abs(est.value - exact);
  // an error within the rounding of a double (the reference's last digits) is no error
  if (e <= Math.max(est.uncertainty, 1e-12)) return 'within';
  if (e <= 2 * est.uncertainty) return 'beyond-u';
  return 'beyond-2u';
}

/** the grid axes of a set of targets: sorted distinct steps and thetaH */
export function gridAxes(ts: readonly { params: { steps?: number; thetaH?: number } }[]): { steps: number[]; thetas: number[] } {
  return {
    steps: [...new Set(ts.map((t) => t.params.steps ?? 0))].sort((a, b) => a - b),
    thetas: [...new Set(ts.map((t) => t.params.thetaH ?? 0))].sort((a, b) => a - b),
  };
}
