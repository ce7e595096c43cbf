import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

export interface StandingsMetrics {
  rmseVerifiable: number | null; maxErrorVerifiable: number | null; meanZ2Verifiable: number | null; calibrationDistance: number | null;
  coveredVerifiable: number | null; meanCrpsVerifiable: number | null; verifiableScored: number;
  agreementMedianRatio: number | null; outsideInterval: number; unverifiableScored: number; answered: number; gridCoverage: number; costHours: number | null;
}
export interface StandingsEntry {
  id: string; rank: number; tiedWithPrevious: boolean; label: string; teamId: string; teamName: string;
  track: 'hardware' | 'classical'; methodFamily: string; submittedAt: string; isBaseline: boolean; featured: boolean;
  cost: { cpuCoreHours?: number; gpuHours?: number; qpuSeconds?: number; wallTimeSeconds?: number };
  metrics: StandingsMetrics; onFront: boolean;
}
export interface Standings {
  challenge: string; version: number; checksum: string; status: 'ready' | 'pending' | 'none';
  computedAt: string | null; engineVersion: string | null; estimator: string | null;
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
    refetchInterval: (query) => (query.state.data?.status === 'pending' ? 4000 : false),
  });
export const useStandings = (slug: string, q: StandingsQuery = {}) => useQuery({ ...getStandingsQueryOptions(slug, q), enabled: Boolean(slug) });

export const METRIC_LABEL: Record<string, string> = {
  'rmse-verifiable': 'RMSE on verifiable targets',
  agreement: 'Agreement (median |d|/U)',
  'crps-verifiable': 'Mean CRPS on verifiable targets',
  'max-error-verifiable': 'Max error on verifiable targets',
  calibration: 'Calibration (|log mean z²|)',
};
