/**
 * Degrees of equivalence (SCORING.md; CIPM MRA usage).
 *
 * Against the consensus y: d_i = x_i - y, U(d_i) = k u(d_i), k = 2, with
 * - included results: u^2(d_i) = u_i^2 - u^2(y) (x_i is part of y, which is correlated with it);
 * - excluded results: u^2(d_i) = u_i^2 + u^2(y).
 * For random effects (x_i = mu + b_i + e_i, var(b_i) = tau^2, w_i = 1/(u_i^2 + tau^2)):
 * cov(x_i, mu) = w_i (u_i^2 + tau^2)/sum w = u^2(mu), so
 * - included: u^2(d_i) = u_i^2 + tau^2 - u^2(mu);  excluded: u_i^2 + tau^2 + u^2(mu).
 * For the median, u(d_i) is the Monte Carlo standard deviation of x_i - median (Cox procedure B),
 * which carries the correlation. u(y) is the unscaled consensus uncertainty.
 * Pairwise: d_ij = x_i - x_j, u^2 = u_i^2 + u_j^2, U = k u.
 */
import type { ConsensusResult } from './consensus';
import type { Measurement } from './types';

export interface DegreeOfEquivalence {
  index: number;
  d: number;
  u: number;
  U: number;
  included: boolean;
}

type ConsensusLike = Pick<ConsensusResult, 'value' | 'uncertainty' | 'included'> & Partial<Pick<ConsensusResult, 'tau2' | 'doeUncertainties'>>;

export function degreesOfEquivalence(estimates: readonly Measurement[], c: ConsensusLike, k = 2): DegreeOfEquivalence[] {
  const inc = new Set(c.included);
  const tau2 = c.tau2 ?? 0;
  const uy2 = c.uncertainty * c.uncertainty;
  return estimates.map((m, i) => {
    const included = inc.has(i);
    const d = m.value - c.value;
    let u: number;
    const mc = c.doeUncertainties?.[i];
    if (mc !== undefined && !Number.isNaN(mc)) u = mc;
    else {
      const ui2 = m.uncertainty * m.uncertainty + tau2;
      u = Math.sqrt(Math.max(0, included ? ui2 - uy2 : ui2 + uy2));
    }
    return { index: i, d, u, U: k * u, included };
  });
}

export interface PairwiseEquivalence {
  /** d[i][j] = x_i - x_j. */
  d: number[][];
  u: number[][];
  U: number[][];
}

export function pairwiseEquivalence(estimates: readonly Measurement[], k = 2): PairwiseEquivalence {
  const n = estimates.length;
  const d: number[][] = [];
  const u: number[][] = [];
  const U: number[][] = [];
  for (let i = 0; i < n; i++) {
    const di = new Array<number>(n);
    const ui = new Array<number>(n);
    const Ui = new Array<number>(n);
    for (let j = 0; j < n; j++) {
      di[j] = estimates[i].value - estimates[j].value;
      ui[j] = Math.hypot(estimates[i].uncertainty, estimates[j].uncertainty);
      Ui[j] = k * ui[j];
    }
    d.push(di);
    u.push(ui);
    U.push(Ui);
  }
  return { d, u, U };
}

/** |d|/U with U = 0: 0 if d = 0, else Infinity. */
export function equivalenceRatio(d: number, U: number): number {
  const a = Math.abs(d);
  if (U > 0) return a / U;
  return a === 0 ? 0 : Infinity;
}

export interface EntryAgreement {
  /** Targets (without exact reference) that had a degree of equivalence for this entry. */
  targets: number;
  /** Median over targets of |d|/U (NaN when none). */
  medianRatio: number;
  /** Targets where |d| > U. */
  exceedCount: number;
}

/** Per-entry agreement over targets without exact references. */
export function entryAgreement(does: readonly Pick<DegreeOfEquivalence, 'd' | 'U'>[]): EntryAgreement {
  const r = Float64Array.from(does, (x) => equivalenceRatio(x.d, x.U)).filter((v) => !Number.isNaN(v));
  r.sort();
  const n = r.length;
  let exceed = 0;
  for (const x of does) if (Math.abs(x.d) > x.U) exceed++;
  const h = n >> 1;
  return { targets: n, medianRatio: n === 0 ? NaN : n % 2 ? r[h] : 0.5 * (r[h - 1] + r[h]), exceedCount: exceed };
}
