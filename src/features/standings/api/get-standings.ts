import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

import type { StandingsResponse, Wire } from '@shared/api-types';

/** GET /api/challenges/:slug/standings as the client receives it (the type: shared/api-types.ts). */
export type Standings = Wire<StandingsResponse>;
export type StandingsEntry = Standings['entries'][number];
export type StandingsMetrics = StandingsEntry['metrics'];
export type Coverage = StandingsEntry['coverage']['overall'];
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
