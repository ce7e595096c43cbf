/**
 * The standings of one challenge version under the scoring rules of rules.ts (version
 * SCORING_RULES_VERSION): every published entry scored with proper scores against the exact
 * references where they exist and against the consensus of independent teams where they do not,
 * ranked on a common set of targets (a missing answer scores the worst case), with a bootstrap
 * rank interval, the accuracy-against-cost front and the agreement matrix. The house baseline is
 * a reference row: scored for display, never ranked, never in the consensus. Pure and
 * deterministic (independent of the order of entries): the server stores its result.
 *
 * Displayed, not ranked: RMSE, max |error|, mean z^2, coverage of x +/- 2u, median |d|/U.
 * Cost: the declared compute of an entry in hours, cpuCoreHours + gpuHours + qpuSeconds / 3600
 * (a plain sum: Parallax states the parts beside it and does not weigh them).
 */
import { consensus, type ConsensusEstimator } from './consensus';
import { degreesOfEquivalence, entryAgreement, equivalenceRatio } from './equivalence';
import { scoreAgainstReference, scoreSweep, type SweepItem } from './exact';
import { crpsCensoredNormal, expectedCrpsNormal } from './proper';
import { accuracyCostFront } from './ranking';
import {
  MIN_INDEPENDENT_TEAMS, SCORING_RULES_VERSION, EXACT_TOLERANCE, boundOf, bootstrapRankIntervals, exactTolerance, findNearCopies, onePerTeam,
  type NearCopy,
} from './rules';
import type { Measurement, UncertaintyKind } from './types';
import { TRACKS, TRACK_VIEWS, type Track, type TrackView } from '../vocabulary';

/** Ranking keys: 'overall' (every ranked target), 'crps-verifiable' (targets with an exact
 * reference), 'agreement' (targets scored against the consensus). All are proper scores. */
export type PrimaryMetric = 'overall' | 'crps-verifiable' | 'agreement';
export const PRIMARY_METRICS: readonly PrimaryMetric[] = ['overall', 'crps-verifiable', 'agreement'];
export const DEFAULT_PRIMARY_METRIC: PrimaryMetric = 'overall';
/** Names of the previous rules (non-proper keys): they now rank by the proper score of the same scope. */
export const LEGACY_METRICS: Readonly<Record<string, PrimaryMetric>> = { 'rmse-verifiable': 'overall', 'max-error-verifiable': 'crps-verifiable', calibration: 'crps-verifiable' };
export const resolveMetric = (m: string | undefined | null): PrimaryMetric | null =>
  !m ? DEFAULT_PRIMARY_METRIC : (PRIMARY_METRICS as readonly string[]).includes(m) ? (m as PrimaryMetric) : LEGACY_METRICS[m] ?? null;

type ScoreKey = 'scoreOverall' | 'scoreVerifiable' | 'scoreAgreement';
export const RANKING_KEYS: Record<PrimaryMetric, [ScoreKey, ScoreKey]> = {
  overall: ['scoreOverall', 'scoreVerifiable'],
  'crps-verifiable': ['scoreVerifiable', 'scoreAgreement'],
  agreement: ['scoreAgreement', 'scoreVerifiable'],
};
const SCOPE: Record<PrimaryMetric, 'overall' | 'verifiable' | 'agreement'> = { overall: 'overall', 'crps-verifiable': 'verifiable', agreement: 'agreement' };
export { TRACK_VIEWS, type TrackView };

export interface StandingsEstimate { value: number; uncertainty: number; kind: UncertaintyKind }

export interface StandingsEntryInput {
  id: string;
  label: string;
  teamId: string;
  teamName: string;
  track: Track;
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
  /** the observable's bound B (sum of |coefficients|); 1 when absent */
  bound?: number | null;
}

export interface StandingsInput {
  estimator: ConsensusEstimator;
  targets: readonly StandingsTargetInput[];
  entries: readonly StandingsEntryInput[];
}

export interface EntryMetrics {
  /** proper scores (lower is better): mean over the ranked targets of the scope, a missing answer
   * counting 2B; null when the scope has no ranked target */
  scoreOverall: number | null;
  scoreVerifiable: number | null;
  scoreAgreement: number | null;
  /** standard error of scoreOverall over targets (sd / sqrt(n)) */
  scoreOverallSe: number | null;
  // displayed diagnostics (not ranking keys)
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

export interface Coverage { answered: number; ranked: number }

export interface StandingsRow {
  id: string;
  /** null for the house baseline (a reference row) */
  rank: number | null;
  tiedWithPrevious: boolean;
  /** 95% bootstrap interval of the rank under the row's metric and track (null for the baseline) */
  rankInterval: [number, number] | null;
  /** every interval: key `${metric}|${track}` */
  rankIntervals: Record<string, [number, number]>;
  label: string;
  teamId: string;
  teamName: string;
  track: Track;
  methodFamily: string;
  submittedAt: string;
  isBaseline: boolean;
  /** the house baseline: shown for reference, never ranked */
  isReference: boolean;
  featured: boolean;
  cost: StandingsEntryInput['cost'];
  metrics: EntryMetrics;
  coverage: { overall: Coverage; verifiable: Coverage; agreement: Coverage };
  /** baseline only: its truncation bounds, each capped at the observable's bound B */
  bound: { max: number; median: number } | null;
  onFront: boolean;
  rulesVersion: string;
}

export interface TargetConsensus {
  key: string;
  verifiable: boolean;
  entries: number;
  /** distinct teams (house baseline excluded) that answered */
  teams: number;
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
  /** why there is no consensus value, when there is none */
  noConsensus: string | null;
  /** ranked: scored for every entry (answer or worst case) */
  ranked: boolean;
  bound: number;
  /** how many estimates entered the consensus value */
  includedCount: number;
  /** entry ids that gave an estimate but did not enter the value (other entries of a team, the
   * baseline, results dropped by the procedure) */
  excluded: string[];
}

export interface StandingsResult {
  rulesVersion: string;
  estimator: ConsensusEstimator;
  exactTolerance: number;
  bootstrapReplicates: number;
  entries: StandingsRow[];
  targets: TargetConsensus[];
  /** pairs of entries of different teams with near-identical values (for review) */
  nearCopies: NearCopy[];
  agreement: { entryIds: string[]; meanRatio: (number | null)[][]; targets: number[][]; incompatible: number[][] };
  counts: { targets: number; verifiable: number; unverifiable: number; disputed: number; entries: number; ranked: number };
}

const fin = (x: number): number | null => (Number.isFinite(x) ? x : null);

export function costHours(c: StandingsEntryInput['cost']): number | null {
  const parts = [c.cpuCoreHours, c.gpuHours, c.qpuSeconds === undefined ? undefined : c.qpuSeconds / 3600].filter((x): x is number => typeof x === 'number');
  return parts.length ? parts.reduce((a, b) => a + b, 0) : null;
}

/** The cost of an entry in its track's own resource: QPU hours on hardware, CPU core-hours + GPU hours in classical simulation. */
export function trackCostHours(track: Track, c: StandingsEntryInput['cost']): number | null {
  const parts = track === 'hardware' ? [c.qpuSeconds === undefined ? undefined : c.qpuSeconds / 3600] : [c.cpuCoreHours, c.gpuHours];
  const xs = parts.filter((x): x is number => typeof x === 'number');
  return xs.length ? xs.reduce((a, b) => a + b, 0) : null;
}

/** The uncertainty the rules use for coverage, z and the consensus: u, raised to half the exact
 * tolerance (so that an exact answer within the tolerance is covered, and two exact answers within
 * it agree). */
export const effectiveUncertainty = (u: number, bound: number | null | undefined): number => Math.max(u, exactTolerance(bound) / 2);

type RankableRow = { id: string; submittedAt: string; isBaseline: boolean; metrics: EntryMetrics; coverage: StandingsRow['coverage'] };

const cmpNum = (a: number | null, b: number | null) => (a === b ? 0 : a === null ? 1 : b === null ? -1 : a < b ? -1 : a > b ? 1 : 0);

/** The order of the standings under a metric: primary score, secondary score, more answered
 * ranked targets, earlier submission, id. Used for the ranks and inside the bootstrap. */
function compareRows(metric: PrimaryMetric, withPrimary: boolean) {
  const [k1, k2] = RANKING_KEYS[metric];
  const scope = SCOPE[metric];
  return (a: RankableRow, b: RankableRow): number =>
    (withPrimary ? cmpNum(a.metrics[k1], b.metrics[k1]) : 0) || cmpNum(a.metrics[k2], b.metrics[k2])
    || b.coverage[scope].answered - a.coverage[scope].answered
    || (a.submittedAt < b.submittedAt ? -1 : a.submittedAt > b.submittedAt ? 1 : 0)
    || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0);
}

/** Ranks of the rows under a metric and a track view; the baseline rows come last, unranked. */
export function rankRows<R extends RankableRow & { rankIntervals?: Record<string, [number, number]> }>(rows: readonly R[], metric: PrimaryMetric, track: TrackView = 'all'): { row: R; rank: number | null; tiedWithPrevious: boolean; rankInterval: [number, number] | null }[] {
  const cmp = compareRows(metric, true);
  const [k1, k2] = RANKING_KEYS[metric];
  const ranked = rows.filter((r) => !r.isBaseline).sort(cmp);
  const out = ranked.map((row, i) => ({
    row, rank: i + 1,
    tiedWithPrevious: i > 0 && ranked[i - 1].metrics[k1] === row.metrics[k1] && ranked[i - 1].metrics[k2] === row.metrics[k2],
    rankInterval: row.rankIntervals?.[`${metric}|${track}`] ?? null,
  }));
  const refs = rows.filter((r) => r.isBaseline).sort((a, b) => (a.id < b.id ? -1 : 1)).map((row) => ({ row, rank: null, tiedWithPrevious: false, rankInterval: null }));
  return [...out, ...refs];
}

export function computeStandings(input: StandingsInput, metric: PrimaryMetric = DEFAULT_PRIMARY_METRIC): StandingsResult {
  const E = input.entries;
  const nE = E.length;
  const nT = input.targets.length;
  const targets: TargetConsensus[] = [];
  const sweep: SweepItem[][] = E.map(() => []);
  const does: { d: number; U: number }[][] = E.map(() => []);
  const pairSum = Array.from({ length: nE }, () => new Float64Array(nE));
  const pairN = Array.from({ length: nE }, () => new Int32Array(nE));
  const pairInf = Array.from({ length: nE }, () => new Int32Array(nE));
  // per entry, per target: proper score (NaN = not ranked here), and whether answered
  const score = E.map(() => new Float64Array(nT).fill(NaN));
  const answeredAt = E.map(() => new Uint8Array(nT));
  const rankedKind = new Uint8Array(nT); // 0 not ranked, 1 exact reference, 2 consensus
  const worst = new Float64Array(nT);
  const baselineBounds: number[][] = E.map(() => []);

  // each entry's estimate of the current target, looked up once per target
  const at: (StandingsEstimate | undefined)[] = new Array(nE);
  input.targets.forEach((t, ti) => {
    for (let i = 0; i < nE; i++) at[i] = E[i].estimates.get(t.key);
    const B = boundOf(t.bound);
    worst[ti] = 2 * B;
    const cands: { i: number; entryId: string; teamId: string; submittedAt: string; value: number; uncertainty: number }[] = [];
    let answeredBy = 0;
    for (let i = 0; i < nE; i++) {
      const e = at[i];
      if (!e || !Number.isFinite(e.value)) continue;
      answeredBy++;
      answeredAt[i][ti] = 1;
      if (E[i].isBaseline) { baselineBounds[i].push(Math.min(Math.abs(e.uncertainty), B)); continue; }
      cands.push({ i, entryId: E[i].id, teamId: E[i].teamId, submittedAt: E[i].submittedAt, value: e.value, uncertainty: effectiveUncertainty(e.uncertainty, B) });
    }
    const chosen = onePerTeam(cands);
    const teams = chosen.length;
    const ms: Measurement[] = chosen.map((c) => ({ value: c.value, uncertainty: c.uncertainty }));
    const c = teams >= MIN_INDEPENDENT_TEAMS ? consensus(ms, input.estimator, { exactTolerance: exactTolerance(B) }) : null;
    const ok = c !== null && Number.isFinite(c.value) && Number.isFinite(c.uncertainty);
    const moderatorDisputed = Boolean(t.disputedNote);
    const ranked = !moderatorDisputed && (t.reference !== null || ok);
    rankedKind[ti] = !ranked ? 0 : t.reference !== null ? 1 : 2;
    const inIdx = new Set(ok ? c.included.map((k) => chosen[k].i) : []);
    targets.push({
      key: t.key, verifiable: t.reference !== null, entries: answeredBy, teams, estimator: input.estimator,
      value: ok ? c.value : null, uncertainty: ok ? fin(c.uncertainty) : null,
      chi2: ok ? fin(c.inputTest.chi2) : null, nu: ok ? c.inputTest.nu : null, p: ok ? fin(c.inputTest.p) : null,
      birgeRatio: ok ? fin(c.inputTest.birgeRatio) : null, tau2: ok ? fin(c.tau2) : null, I2: ok && c.I2 !== undefined ? fin(c.I2) : null,
      disputed: moderatorDisputed || (t.reference === null && ok && c.disputed),
      disputedNote: t.disputedNote ?? null,
      noConsensus: ok ? null : teams < MIN_INDEPENDENT_TEAMS ? `fewer than ${MIN_INDEPENDENT_TEAMS} independent teams answered` : 'no usable estimates',
      ranked, bound: B,
      includedCount: ok ? c.included.length : 0,
      excluded: ok ? E.filter((_, i) => answeredAt[i][ti] && !inIdx.has(i)).map((x) => x.id).sort() : [],
    });
    // degrees of equivalence: the consensus inputs first (indices as in c.included), then every
    // other entry's estimate as an excluded result
    const chosenSet = new Set(chosen.map((x) => x.i));
    const others: number[] = [];
    for (let i = 0; i < nE; i++) if (answeredAt[i][ti] && !chosenSet.has(i)) others.push(i);
    const doeList: Measurement[] = ok ? [...ms, ...others.map((i) => { const e = at[i]!; return { value: e.value, uncertainty: E[i].isBaseline ? 0 : effectiveUncertainty(e.uncertainty, B) }; })] : [];
    const doe = ok ? degreesOfEquivalence(doeList, c) : [];
    const doeOwner = [...chosen.map((x) => x.i), ...others];

    for (let i = 0; i < nE; i++) {
      const e = at[i];
      const has = answeredAt[i][ti] === 1;
      // the baseline's uncertainty is a truncation bound, not a standard uncertainty: scored as u = 0
      const u = has ? (E[i].isBaseline ? 0 : e!.uncertainty) : 0;
      sweep[i].push({ targetId: t.key, estimate: has ? { value: e!.value, uncertainty: E[i].isBaseline ? 0 : effectiveUncertainty(u, B) } : undefined, reference: t.reference ?? undefined });
      if (!ranked) continue;
      if (!has) { score[i][ti] = worst[ti]; continue; }
      if (t.reference !== null) score[i][ti] = crpsCensoredNormal(e!.value, u, t.reference.value, -B, B);
      else {
        const s = expectedCrpsNormal(e!.value, u, c!.value, c!.uncertainty);
        score[i][ti] = Number.isFinite(s) ? Math.min(s, worst[ti]) : worst[ti];
      }
    }
    if (t.reference === null && ok) doe.forEach((x, k) => does[doeOwner[k]].push({ d: x.d, U: x.U }));
    if (t.reference === null) {
      const idx: number[] = [];
      for (let i = 0; i < nE; i++) if (answeredAt[i][ti]) idx.push(i);
      const xv = new Float64Array(idx.length);
      const uv = new Float64Array(idx.length);
      for (let k = 0; k < idx.length; k++) {
        xv[k] = at[idx[k]]!.value;
        uv[k] = effectiveUncertainty(at[idx[k]]!.uncertainty, B);
      }
      for (let a = 0; a < idx.length; a++) {
        for (let b = a + 1; b < idx.length; b++) {
          const ua = uv[a];
          const ub = uv[b];
          // sqrt(ua^2 + ub^2) relative to the larger (no underflow to U = 0)
          const um = ua > ub ? ua : ub;
          const U = 2 * um * Math.sqrt((ua / um) * (ua / um) + (ub / um) * (ub / um));
          const r = equivalenceRatio(xv[a] - xv[b], U);
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
  });

  const scopeOf = (ti: number, scope: 'overall' | 'verifiable' | 'agreement') => rankedKind[ti] !== 0 && (scope === 'overall' || (scope === 'verifiable' ? rankedKind[ti] === 1 : rankedKind[ti] === 2));
  const meanScore = (i: number, scope: 'overall' | 'verifiable' | 'agreement') => {
    let s = 0;
    let n = 0;
    for (let ti = 0; ti < nT; ti++) if (scopeOf(ti, scope)) { s += score[i][ti]; n++; }
    return n ? s / n : null;
  };
  const coverageOf = (i: number, scope: 'overall' | 'verifiable' | 'agreement'): Coverage => {
    let a = 0;
    let n = 0;
    for (let ti = 0; ti < nT; ti++) if (scopeOf(ti, scope)) { n++; if (answeredAt[i][ti]) a++; }
    return { answered: a, ranked: n };
  };

  const rows = E.map((e, i) => {
    const s = scoreSweep(sweep[i]);
    const ag = entryAgreement(does[i]);
    const v = s.verifiable;
    const mean = meanScore(i, 'overall');
    let se: number | null = null;
    const cov = coverageOf(i, 'overall');
    if (mean !== null && cov.ranked > 1) {
      let ss = 0;
      for (let ti = 0; ti < nT; ti++) if (scopeOf(ti, 'overall')) ss += (score[i][ti] - mean) ** 2;
      se = Math.sqrt(ss / (cov.ranked - 1) / cov.ranked);
    }
    const metrics: EntryMetrics = {
      scoreOverall: mean, scoreVerifiable: meanScore(i, 'verifiable'), scoreAgreement: meanScore(i, 'agreement'), scoreOverallSe: se,
      rmseVerifiable: fin(v.rmse), maxErrorVerifiable: fin(v.maxAbsError), meanZ2Verifiable: fin(v.meanZ2),
      calibrationDistance: Number.isFinite(v.meanZ2) && v.meanZ2 > 0 ? Math.abs(Math.log(v.meanZ2)) : null,
      coveredVerifiable: fin(v.fractionCovered), meanCrpsVerifiable: fin(v.meanCrps), verifiableScored: v.scored,
      agreementMedianRatio: fin(ag.medianRatio), outsideInterval: ag.exceedCount, unverifiableScored: ag.targets,
      answered: v.answered + s.unverifiable.answered, gridCoverage: fin(s.gridCoverage) ?? 0, costHours: costHours(e.cost),
    };
    const bb = baselineBounds[i].slice().sort((a, b) => a - b);
    const bound = e.isBaseline && bb.length ? { max: bb[bb.length - 1], median: bb.length % 2 ? bb[bb.length >> 1] : 0.5 * (bb[(bb.length >> 1) - 1] + bb[bb.length >> 1]) } : null;
    return { e, i, id: e.id, submittedAt: e.submittedAt, isBaseline: e.isBaseline, metrics, coverage: { overall: cov, verifiable: coverageOf(i, 'verifiable'), agreement: coverageOf(i, 'agreement') }, bound };
  });

  // rank intervals: a bootstrap over the ranked targets of each metric's scope, per track view
  const rankIntervals: Record<string, [number, number]>[] = E.map(() => ({}));
  let replicates = 0;
  for (const m of PRIMARY_METRICS) {
    const tis: number[] = [];
    for (let ti = 0; ti < nT; ti++) if (scopeOf(ti, SCOPE[m])) tis.push(ti);
    const tie = compareRows(m, false);
    for (const tv of TRACK_VIEWS) {
      const members = rows.filter((r) => !r.isBaseline && (tv === 'all' || r.e.track === tv));
      if (!members.length) continue;
      const mat = members.map((r) => {
        const row = new Float64Array(tis.length);
        const s = score[r.i];
        for (let k = 0; k < tis.length; k++) row[k] = s[tis[k]];
        return row;
      });
      const b = bootstrapRankIntervals(mat, (a, c) => tie(members[a], members[c]));
      replicates = Math.max(replicates, b.replicates);
      members.forEach((r, k) => (rankIntervals[r.i][`${m}|${tv}`] = b.intervals[k]));
    }
  }

  // one front per track, each in its own resource: QPU time is not added to classical compute
  const onFront = new Set<string>();
  for (const track of TRACKS) {
    const front = accuracyCostFront(rows.filter((r) => !r.isBaseline && r.e.track === track).map((r) => ({ id: r.e.id, error: r.metrics.scoreOverall, cost: trackCostHours(track, r.e.cost) })));
    for (const p of front.front) onFront.add(p.id);
  }
  const ranked = rankRows(rows.map((r) => ({ ...r, rankIntervals: rankIntervals[r.i] })), metric);
  const entries: StandingsRow[] = ranked.map(({ row, rank, tiedWithPrevious, rankInterval }) => ({
    id: row.e.id, rank, tiedWithPrevious, rankInterval, rankIntervals: rankIntervals[row.i], label: row.e.label, teamId: row.e.teamId, teamName: row.e.teamName, track: row.e.track,
    methodFamily: row.e.methodFamily, submittedAt: row.e.submittedAt, isBaseline: row.e.isBaseline, isReference: row.e.isBaseline, featured: Boolean(row.e.featured),
    cost: row.e.cost, metrics: row.metrics, coverage: row.coverage, bound: row.bound, onFront: onFront.has(row.e.id), rulesVersion: SCORING_RULES_VERSION,
  }));
  const pos = new Map(E.map((e, i) => [e.id, i]));
  const order = entries.map((r) => pos.get(r.id)!);
  return {
    rulesVersion: SCORING_RULES_VERSION,
    estimator: input.estimator,
    exactTolerance: EXACT_TOLERANCE,
    bootstrapReplicates: replicates,
    entries,
    targets,
    nearCopies: findNearCopies(E.filter((e) => !e.isBaseline)),
    agreement: {
      entryIds: entries.map((r) => r.id),
      meanRatio: order.map((i) => order.map((j) => (i === j ? 0 : pairN[i][j] ? pairSum[i][j] / pairN[i][j] : null))),
      targets: order.map((i) => order.map((j) => pairN[i][j])),
      incompatible: order.map((i) => order.map((j) => pairInf[i][j])),
    },
    counts: {
      targets: nT,
      verifiable: input.targets.filter((t) => t.reference !== null).length,
      unverifiable: input.targets.filter((t) => t.reference === null).length,
      disputed: targets.filter((t) => t.disputed).length,
      entries: nE,
      ranked: targets.filter((t) => t.ranked).length,
    },
  };
}

/** One estimate's scores against a reference, for entry pages and dry runs. */
export { scoreAgainstReference };
