import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

export type Track = 'hardware' | 'classical';
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
