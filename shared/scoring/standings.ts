/**
 * The standings of one challenge version: every published entry scored against the exact
 * references where they exist, against the consensus of the entries where they do not, ranked,
 * with the accuracy-against-cost front and the agreement matrix. Pure and deterministic: the
 * server stores its result and serves it from the cache.
 *
 * Cost: the declared compute of an entry in hours, cpuCoreHours + gpuHours + qpuSeconds / 3600
 * (a plain sum: Parallax states the parts beside it and does not weigh them).
 */
import { consensus, type ConsensusEstimator } from './consensus';
import { degreesOfEquivalence, entryAgreement, equivalenceRatio } from './equivalence';
import { scoreAgainstReference, scoreSweep, type SweepItem } from './exact';
import { accuracyCostFront, rankEntries, type RankingKey } from './ranking';
import type { Measurement, UncertaintyKind } from './types';

export type PrimaryMetric = 'rmse-verifiable' | 'agreement' | 'crps-verifiable' | 'max-error-verifiable' | 'calibration';
export const PRIMARY_METRICS: readonly PrimaryMetric[] = ['rmse-verifiable', 'agreement', 'crps-verifiable', 'max-error-verifiable', 'calibration'];

export const RANKING_KEYS: Record<PrimaryMetric, RankingKey[]> = {
  'rmse-verifiable': [{ metric: 'rmseVerifiable' }, { metric: 'agreementMedianRatio' }],
  agreement: [{ metric: 'agreementMedianRatio' }, { metric: 'rmseVerifiable' }],
  'crps-verifiable': [{ metric: 'meanCrpsVerifiable' }, { metric: 'agreementMedianRatio' }],
  'max-error-verifiable': [{ metric: 'maxErrorVerifiable' }, { metric: 'agreementMedianRatio' }],
  // |log(mean z^2)|: 0 when the error bars are honest on average
  calibration: [{ metric: 'calibrationDistance' }, { metric: 'rmseVerifiable' }],
};

export interface StandingsEstimate { value: number; uncertainty: number; kind: UncertaintyKind }

export interface StandingsEntryInput {
  id: string;
  label: string;
  teamId: string;
  teamName: string;
  track: 'hardware' | 'classical';
  methodFamily: string;
  submittedAt: string;
  isBaseline: boolean;
  featured?: boolean;
  cost: { cpuCoreHours?: number; gpuHours?: number; qpuSeconds?: number; wallTimeSeconds?: number };
  estimates: ReadonlyMap<string, StandingsEstimate>;
}

export interface StandingsTargetInput {
  key: string;
  /** the exact value when it is known and may be used; null makes the target unverifiable */
  reference: { value: number; uncertainty: number } | null;
  /** marked disputed by a moderator */
  disputedNote?: string | null;
}

export interface StandingsInput {
  estimator: ConsensusEstimator;
  targets: readonly StandingsTargetInput[];
  entries: readonly StandingsEntryInput[];
}

export interface EntryMetrics {
  rmseVerifiable: number | null;
  maxErrorVerifiable: number | null;
  meanZ2Verifiable: number | null;
  calibrationDistance: number | null;
  coveredVerifiable: number | null;
  meanCrpsVerifiable: number | null;
  verifiableScored: number;
  agreementMedianRatio: number | null;
  outsideInterval: number;
  unverifiableScored: number;
  answered: number;
  gridCoverage: number;
  costHours: number | null;
}

export interface StandingsRow {
  id: string;
  rank: number;
  tiedWithPrevious: boolean;
  label: string;
  teamId: string;
  teamName: string;
  track: 'hardware' | 'classical';
  methodFamily: string;
  submittedAt: string;
  isBaseline: boolean;
  featured: boolean;
  cost: StandingsEntryInput['cost'];
  metrics: EntryMetrics;
  onFront: boolean;
}

export interface TargetConsensus {
  key: string;
  verifiable: boolean;
  entries: number;
  estimator: ConsensusEstimator;
  value: number | null;
  uncertainty: number | null;
  chi2: number | null;
  nu: number | null;
  p: number | null;
  birgeRatio: number | null;
  tau2: number | null;
  I2: number | null;
  disputed: boolean;
  disputedNote: string | null;
  /** how many estimates entered the consensus value */
  includedCount: number;
  /** entry ids that gave an estimate but did not enter the value (e.g. dropped by the LCS) */
  excluded: string[];
}

export interface StandingsResult {
  estimator: ConsensusEstimator;
  entries: StandingsRow[];
  targets: TargetConsensus[];
  /**
   * meanRatio: |d|/U averaged over the targets without exact reference that both answered, with a
   * finite ratio; targets: how many; incompatible: on how many more the two differ while both claim
   * zero uncertainty (U = 0, |d| > 0: an infinite ratio, counted here instead of hidden)
   */
  agreement: { entryIds: string[]; meanRatio: (number | null)[][]; targets: number[][]; incompatible: number[][] };
  counts: { targets: number; verifiable: number; unverifiable: number; disputed: number; entries: number };
}

const fin = (x: number): number | null => (Number.isFinite(x) ? x : null);

export function costHours(c: StandingsEntryInput['cost']): number | null {
  const parts = [c.cpuCoreHours, c.gpuHours, c.qpuSeconds === undefined ? undefined : c.qpuSeconds / 3600].filter((x): x is number => typeof x === 'number');
  return parts.length ? parts.reduce((a, b) => a + b, 0) : null;
}

export function rankRows<R extends { id: string; submittedAt: string; metrics: EntryMetrics }>(rows: readonly R[], metric: PrimaryMetric): { row: R; rank: number; tiedWithPrevious: boolean }[] {
  const ranked = rankEntries(rows.map((r) => ({ id: r.id, submittedAt: r.submittedAt, metrics: r.metrics as unknown as Record<string, number | null>, row: r })), RANKING_KEYS[metric]);
  return ranked.map((x) => ({ row: x.entry.row, rank: x.rank, tiedWithPrevious: x.tiedWithPrevious }));
}

export function computeStandings(input: StandingsInput, metric: PrimaryMetric = 'rmse-verifiable'): StandingsResult {
  const E = input.entries;
  const nE = E.length;
  const targets: TargetConsensus[] = [];
  // per entry accumulators
  const sweep: SweepItem[][] = E.map(() => []);
  const does: { d: number; U: number }[][] = E.map(() => []);
  const pairSum = Array.from({ length: nE }, () => new Float64Array(nE));
  const pairN = Array.from({ length: nE }, () => new Int32Array(nE));
  const pairInf = Array.from({ length: nE }, () => new Int32Array(nE));

  for (const t of input.targets) {
    const idx: number[] = [];
    const ms: Measurement[] = [];
    for (let i = 0; i < nE; i++) {
      const e = E[i].estimates.get(t.key);
      if (e && Number.isFinite(e.value)) { idx.push(i); ms.push({ value: e.value, uncertainty: e.uncertainty }); }
    }
    const c = ms.length ? consensus(ms, input.estimator) : null;
    const ok = c && Number.isFinite(c.value);
    const doe = ok ? degreesOfEquivalence(ms, c) : [];
    targets.push({
      key: t.key, verifiable: t.reference !== null, entries: ms.length, estimator: input.estimator,
      value: ok ? c.value : null, uncertainty: ok ? fin(c.uncertainty) : null,
      chi2: ok ? fin(c.inputTest.chi2) : null, nu: ok ? c.inputTest.nu : null, p: ok ? fin(c.inputTest.p) : null,
      birgeRatio: ok ? fin(c.inputTest.birgeRatio) : null, tau2: ok ? fin(c.tau2) : null, I2: ok && c.I2 !== undefined ? fin(c.I2) : null,
      disputed: Boolean(t.disputedNote) || (t.reference === null && Boolean(c?.disputed)),
      disputedNote: t.disputedNote ?? null,
      includedCount: ok ? c.included.length : 0,
      excluded: ok ? c.excluded.map((k) => E[idx[k]].id) : [],
    });
    for (let i = 0; i < nE; i++) {
      const e = E[i].estimates.get(t.key);
      sweep[i].push({ targetId: t.key, estimate: e ? { value: e.value, uncertainty: e.uncertainty } : undefined, reference: t.reference ?? undefined });
    }
    if (t.reference === null) {
      doe.forEach((x, k) => does[idx[k]].push({ d: x.d, U: x.U }));
      for (let a = 0; a < idx.length; a++) {
        for (let b = a + 1; b < idx.length; b++) {
          const ua = ms[a].uncertainty;
          const ub = ms[b].uncertainty;
          // sqrt(ua^2 + ub^2) relative to the larger (tiny u must not underflow to U = 0); not
          // Math.hypot: several times slower in V8
          const um = ua > ub ? ua : ub;
          const U = um > 0 ? 2 * um * Math.sqrt((ua / um) * (ua / um) + (ub / um) * (ub / um)) : 0;
          const r = equivalenceRatio(ms[a].value - ms[b].value, U);
          const i = idx[a];
          const j = idx[b];
          if (!Number.isFinite(r)) {
            if (r === Infinity) { pairInf[i][j]++; pairInf[j][i]++; }
            continue;
          }
          pairSum[i][j] += r; pairSum[j][i] += r; pairN[i][j]++; pairN[j][i]++;
        }
      }
    }
  }

  const rows = E.map((e, i) => {
    const s = scoreSweep(sweep[i]);
    const ag = entryAgreement(does[i]);
    const v = s.verifiable;
    const metrics: EntryMetrics = {
      rmseVerifiable: fin(v.rmse), maxErrorVerifiable: fin(v.maxAbsError), meanZ2Verifiable: fin(v.meanZ2),
      calibrationDistance: Number.isFinite(v.meanZ2) && v.meanZ2 > 0 ? Math.abs(Math.log(v.meanZ2)) : null,
      coveredVerifiable: fin(v.fractionCovered), meanCrpsVerifiable: fin(v.meanCrps), verifiableScored: v.scored,
      agreementMedianRatio: fin(ag.medianRatio), outsideInterval: ag.exceedCount, unverifiableScored: ag.targets,
      answered: v.answered + s.unverifiable.answered, gridCoverage: fin(s.gridCoverage) ?? 0, costHours: costHours(e.cost),
    };
    return { e, metrics };
  });
  const front = accuracyCostFront(rows.map((r) => ({ id: r.e.id, error: r.metrics.rmseVerifiable ?? r.metrics.agreementMedianRatio, cost: r.metrics.costHours })));
  const onFront = new Set(front.front.map((p) => p.id));
  const ranked = rankRows(rows.map((r) => ({ id: r.e.id, submittedAt: r.e.submittedAt, metrics: r.metrics, e: r.e })), metric);
  const entries: StandingsRow[] = ranked.map(({ row, rank, tiedWithPrevious }) => ({
    id: row.e.id, rank, tiedWithPrevious, label: row.e.label, teamId: row.e.teamId, teamName: row.e.teamName, track: row.e.track,
    methodFamily: row.e.methodFamily, submittedAt: row.e.submittedAt, isBaseline: row.e.isBaseline, featured: Boolean(row.e.featured),
    cost: row.e.cost, metrics: row.metrics, onFront: onFront.has(row.e.id),
  }));
  const pos = new Map(E.map((e, i) => [e.id, i]));
  const order = entries.map((r) => pos.get(r.id)!);
  return {
    estimator: input.estimator,
    entries,
    targets,
    agreement: {
      entryIds: entries.map((r) => r.id),
      meanRatio: order.map((i) => order.map((j) => (i === j ? 0 : pairN[i][j] ? pairSum[i][j] / pairN[i][j] : null))),
      targets: order.map((i) => order.map((j) => pairN[i][j])),
      incompatible: order.map((i) => order.map((j) => pairInf[i][j])),
    },
    counts: {
      targets: input.targets.length,
      verifiable: input.targets.filter((t) => t.reference !== null).length,
      unverifiable: input.targets.filter((t) => t.reference === null).length,
      disputed: targets.filter((t) => t.disputed).length,
      entries: nE,
    },
  };
}

/** One estimate's scores against a reference, for entry pages and dry runs. */
export { scoreAgainstReference };
