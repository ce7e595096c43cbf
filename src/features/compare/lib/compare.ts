/**
 * Two sets of estimates target by target: the difference d = a − b with its uncertainty
 * u(d) = sqrt(u_a² + u_b²) and U = 2u (shared/scoring/equivalence.ts, pairwiseEquivalence: the
 * estimates of two independent methods), and a summary over the targets both answered:
 * chi-squared of the differences Σ (d/u)² with one degree of freedom per target (the two agree
 * within their stated uncertainties when it is near the number of targets), its p-value, how many
 * differences exceed U, and the mean and root-mean-square difference.
 */
import { pairwiseEquivalence } from '@shared/scoring/equivalence';
import { chiSquaredSurvival } from '@shared/scoring/special';
import { naturalCompare } from '@/lib/format';

export interface Valued { value: number; uncertainty: number }
export interface CompareRow { target: string; a: Valued | null; b: Valued | null; d: number | null; u: number | null; U: number | null }
export interface CompareSummary { common: number; onlyA: number; onlyB: number; chi2: number | null; nu: number; p: number | null; outside: number; meanD: number | null; rmsD: number | null }

export function compareRows(a: ReadonlyMap<string, Valued>, b: ReadonlyMap<string, Valued>): CompareRow[] {
  const keys = [...new Set([...a.keys(), ...b.keys()])].sort(naturalCompare);
  return keys.map((target) => {
    const x = a.get(target) ?? null, y = b.get(target) ?? null;
    if (!x || !y) return { target, a: x, b: y, d: null, u: null, U: null };
    const pw = pairwiseEquivalence([x, y]);
    return { target, a: x, b: y, d: pw.d[0][1], u: pw.u[0][1], U: pw.U[0][1] };
  });
}

/** rows whose difference comes with its own (d, U), e.g. degrees of equivalence against a consensus */
export function summarise(rows: readonly Pick<CompareRow, 'a' | 'b' | 'd' | 'u' | 'U'>[]): CompareSummary {
  const both = rows.filter((r) => r.d !== null);
  let chi2 = 0, nu = 0, outside = 0, sum = 0, sum2 = 0;
  for (const r of both) {
    const d = r.d!;
    sum += d; sum2 += d * d;
    if (r.u !== null && r.u > 0) { chi2 += (d / r.u) ** 2; nu++; }
    if (r.U !== null && Math.abs(d) > r.U) outside++;
  }
  const n = both.length;
  return {
    common: n,
    onlyA: rows.filter((r) => r.a && !r.b).length,
    onlyB: rows.filter((r) => !r.a && r.b).length,
    chi2: nu ? chi2 : null, nu, p: nu ? chiSquaredSurvival(chi2, nu) : null,
    outside,
    meanD: n ? sum / n : null,
    rmsD: n ? Math.sqrt(sum2 / n) : null,
  };
}
