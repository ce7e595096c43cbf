import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

export interface StandingsMetrics {
  /** proper scores (lower is better), the ranking keys: mean over the ranked targets, a missing answer counting 2B */
  scoreOverall: number | null; scoreVerifiable: number | null; scoreAgreement: number | null; scoreOverallSe: number | null;
  rmseVerifiable: number | null; maxErrorVerifiable: number | null; meanZ2Verifiable: number | null; calibrationDistance: number | null;
  coveredVerifiable: number | null; meanCrpsVerifiable: number | null; verifiableScored: number;
  agreementMedianRatio: number | null; outsideInterval: number; unverifiableScored: number; answered: number; gridCoverage: number; costHours: number | null;
}
export interface StandingsEntry {
  /** null: the house baseline, a reference row that is never ranked */
  id: string; rank: number | null; tiedWithPrevious: boolean; label: string; teamId: string; teamName: string;
  /** 95% bootstrap interval of the rank (over targets) */
  rankInterval: [number, number] | null;
  track: 'hardware' | 'classical'; methodFamily: string; submittedAt: string; isBaseline: boolean; isReference?: boolean; featured: boolean;
  cost: { cpuCoreHours?: number; gpuHours?: number; qpuSeconds?: number; wallTimeSeconds?: number };
  metrics: StandingsMetrics; onFront: boolean;
  coverage?: { overall: Coverage; verifiable: Coverage; agreement: Coverage };
  /** the baseline's truncation bounds, capped at the observable's bound */
  bound?: { max: number; median: number } | null;
  rulesVersion?: string;
}
export interface Coverage { answered: number; ranked: number }
export interface Standings {
  challenge: string; version: number; checksum: string; status: 'ready' | 'pending' | 'rescoring' | 'none';
  computedAt: string | null; engineVersion: string | null; estimator: string | null;
  scoringRulesVersion: string | null; currentScoringRulesVersion: string; exactTolerance: number; minIndependentTeams: number; bootstrapReplicates: number | null;
  metric: string; metrics: string[]; track: string; asOf: string | null;
  counts: { targets: number; verifiable: number; unverifiable: number; disputed: number; entries: number } | null;
  entries: StandingsEntry[];
}
export interface StandingsQuery { track?: string; metric?: string; asOf?: string }

export const getStandings = (slug: string, q: StandingsQuery, signal?: AbortSignal) =>
  api.get<Standings>(`/challenges/${encodeURIComponent(slug)}/standings`, { query: { ...q }, signal });

export const standingsQueryKey = (slug: string, q: StandingsQuery = {}) => ['challenges', slug, 'standings', q.track ?? 'all', q.metric ?? '', q.asOf ?? ''] as const;
export const getStandingsQueryOptions = (slug: string, q: StandingsQuery = {}) =>
  queryOptions({
    queryKey: standingsQueryKey(slug, q),
    queryFn: ({ signal }) => getStandings(slug, q, signal),
    placeholderData: keepPreviousData,
    // the first standings are computed by a background job: look again until they are ready
    refetchInterval: (query) => (query.state.data?.status === 'pending' || query.state.data?.status === 'rescoring' ? 4000 : false),
  });
export const useStandings = (slug: string, q: StandingsQuery = {}) => useQuery({ ...getStandingsQueryOptions(slug, q), enabled: Boolean(slug) });

export const METRIC_LABEL: Record<string, string> = {
  overall: 'Score on every ranked target',
  'crps-verifiable': 'Score on targets with an exact reference',
  agreement: 'Score against the consensus',
};
/** the score column and coverage scope of each ranking metric */
export const METRIC_SCOPE: Record<string, { key: 'scoreOverall' | 'scoreVerifiable' | 'scoreAgreement'; scope: 'overall' | 'verifiable' | 'agreement' }> = {
  overall: { key: 'scoreOverall', scope: 'overall' },
  'crps-verifiable': { key: 'scoreVerifiable', scope: 'verifiable' },
  agreement: { key: 'scoreAgreement', scope: 'agreement' },
};
