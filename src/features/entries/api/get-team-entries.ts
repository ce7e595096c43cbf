import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import type { Entry } from './get-entry';

export type TeamEntry = Omit<Entry, 'history' | 'document' | 'revisions' | 'scores' | 'withheld'>;

export const getTeamEntries = (teamId: string, signal?: AbortSignal) => api.get<{ entries: TeamEntry[] }>(`/teams/${encodeURIComponent(teamId)}/entries`, { signal });

export const getTeamEntriesQueryOptions = (teamId: string) =>
  queryOptions({ queryKey: ['teams', teamId, 'entries'], queryFn: ({ signal }) => getTeamEntries(teamId, signal) });
export const useTeamEntries = (teamId: string) => useQuery(getTeamEntriesQueryOptions(teamId));
