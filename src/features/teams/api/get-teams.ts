import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import type { Track } from '@shared/vocabulary';

export type { Track };
export interface TeamSummary {
  id: string;
  name: string;
  slug: string;
  members: number;
  track?: Track | string;
  description?: string;
}

export const getTeams = (signal?: AbortSignal) => api.get<{ teams: TeamSummary[] }>('/teams', { signal });

export const teamsQueryKey = ['teams'] as const;
export const getTeamsQueryOptions = () => queryOptions({ queryKey: teamsQueryKey, queryFn: ({ signal }) => getTeams(signal) });
export const useTeams = () => useQuery(getTeamsQueryOptions());
