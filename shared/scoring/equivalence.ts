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
 * Numerics: when u(y) is the weighted-mean uncertainty of the included results (u^2(y) sum w = 1
 * with w_j = 1/(u_j^2 + tau^2), as for the weighted mean, LCS and random effects), the included
 * u^2(d_i) = (u_i^2 + tau^2) - u^2(y) is formed as (u_i^2 + tau^2) (sum_{j != i} w_j)/(sum w),
 * which has no cancellation when result i dominates the mean (u_i = 1e-12 beside u = 0.01);
 * squares are taken relative to the largest of u_i, u(y), tau so that tiny uncertainties do not
 * underflow; d_i of an included result is then sum_{j != i} w_j (x_i - x_j)/(sum w), which equals
 * x_i - y but resolves a dominant result's offset below the rounding of y.
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

type ConsensusLike = Pick<ConsensusResult, 'value' | 'uncertainty' | 'included'> & Partial<Pick<ConsensusResult, 'tau2' | 'doeUncertainties' | 'birgeScale'>>;

/**
 * Birge-scaled consensus (u(y) multiplied by R_B > 1): the scaling model multiplies every input
 * uncertainty by R_B as well, so u(d_i) = R_B u(d_i; unscaled). Subtracting the scaled u^2(y)
 * from the unscaled u_i^2 instead would give u(d_i) = 0 (U = 0) for a dominant result.
 */
export function degreesOfEquivalence(estimates: readonly Measurement[], c: ConsensusLike, k = 2): DegreeOfEquivalence[] {
  const scale = c.birgeScale;
  if (scale !== undefined && scale > 1 && Number.isFinite(scale)) {
    const base = unscaledDoe(estimates, { ...c, uncertainty: c.uncertainty / scale, birgeScale: undefined }, k);
    return base.map((x) => ({ ...x, u: x.u * scale, U: x.U * scale }));
  }
  return unscaledDoe(estimates, c, k);
}

function unscaledDoe(estimates: readonly Measurement[], c: ConsensusLike, k: number): DegreeOfEquivalence[] {
  const inc = new Set(c.included);
  const tau2 = c.tau2 ?? 0;
  const tau = Math.sqrt(tau2);
  const uy = c.uncertainty;
  // weights relative to the smallest sqrt(u_j^2 + tau^2) among the included results
  const incList = c.included.filter((i) => i >= 0 && i < estimates.length && estimates[i].uncertainty > 0);
  const sd = (i: number) => {
    const u = estimates[i].uncertainty;
    const m = Math.max(u, tau);
    return m === 0 ? 0 : m * Math.sqrt((u / m) * (u / m) + (tau / m) * (tau / m));
  };
  let s0 = Infinity;
  for (const i of incList) s0 = Math.min(s0, sd(i));
  // relative weight of each included result, and the sum of the others' weights (prefix + suffix,
  // not sum - w_i); typed arrays indexed by position in incList (slot[i] = position, or -1): this
  // runs for every target of every standings recomputation
  const nInc = incList.length;
  const slot = new Int32Array(estimates.length).fill(-1);
  const ws = new Float64Array(nInc);
  const xs = new Float64Array(nInc);
  const others = new Float64Array(nInc);
  let sw = 0;
  for (let a = 0; a < nInc; a++) {
    const i = incList[a];
    slot[i] = a;
    const r = s0 / sd(i);
    ws[a] = r * r;
    xs[a] = estimates[i].value;
    others[a] = sw;
    sw += ws[a];
  }
  let suffix = 0;
  for (let a = nInc - 1; a >= 0; a--) {
    others[a] += suffix;
    suffix += ws[a];
  }
  // is the consensus the weighted mean of the included results (u(y) = s0/sqrt(sum w))?
  const isWeightedMean = incList.length === c.included.length && incList.length > 0 && Math.abs((uy / s0) * (uy / s0) * sw - 1) <= 1e-9;
  return estimates.map((m, i) => {
    const included = inc.has(i);
    let d = m.value - c.value;
    const at = slot[i];
    if (included && isWeightedMean && at >= 0 && nInc <= 5000) {
      // d_i = sum_{j != i} w_j (x_i - x_j) / sum w: resolves a dominant result's d below the
      // rounding of y itself (y = x_i + 3e-21 rounds to x_i)
      let sd_ = 0;
      const xi = m.value;
      for (let b = 0; b < nInc; b++) if (b !== at) sd_ += ws[b] * (xi - xs[b]);
      d = sd_ / sw;
    }
    let u: number;
    const mc = c.doeUncertainties?.[i];
    if (mc !== undefined && !Number.isNaN(mc)) u = mc;
    else if (included && isWeightedMean && at >= 0) {
      // (u_i^2 + tau^2)(1 - w_i/sum w), with 1 - w_i/sum w = (sum of the other weights)/sum w
      u = sd(i) * Math.sqrt(others[at] / (others[at] + ws[at]));
    } else {
      const si = sd(i);
      const sc = Math.max(si, uy);
      if (!(sc > 0)) u = 0;
      else {
        const a = si / sc;
        const b = uy / sc;
        u = sc * Math.sqrt(Math.max(0, included ? a * a - b * b : a * a + b * b));
      }
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
