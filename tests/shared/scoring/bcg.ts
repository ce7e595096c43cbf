/** BCG vaccine trials (Colditz et al. 1994, JAMA 271:698; metafor dat.bcg), as in SCORING.md. */
import type { Measurement } from '../../../shared/scoring/types';

export const BCG: readonly (readonly [number, number, number, number])[] = [
  [4, 119, 11, 128],
  [6, 300, 29, 274],
  [3, 228, 11, 209],
  [62, 13536, 248, 12619],
  [33, 5036, 47, 5761],
  [180, 1361, 372, 1079],
  [8, 2537, 10, 619],
  [505, 87886, 499, 87892],
  [29, 7470, 45, 7232],
  [17, 1699, 65, 1600],
  [186, 50448, 141, 27197],
  [5, 2493, 3, 2338],
  [27, 16886, 29, 17825],
];

/** y_i = log risk ratio, u_i = sqrt(v_i). */
export const bcgLogRiskRatios: Measurement[] = BCG.map(([tpos, tneg, cpos, cneg]) => ({
  value: Math.log(tpos / (tpos + tneg) / (cpos / (cpos + cneg))),
  uncertainty: Math.sqrt(1 / tpos - 1 / (tpos + tneg) + 1 / cpos - 1 / (cpos + cneg)),
}));
