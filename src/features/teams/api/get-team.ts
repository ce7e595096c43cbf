import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import type { TeamRole } from '@/features/me/api/get-me';
import type { Track } from './get-teams';

export interface TeamMember {
  name: string;
  role: TeamRole;
  since: string;
}
export interface Team {
  id: string;
  name: string;
  slug: string;
  createdAt: string;
  track?: Track | string;
  description?: string;
  members: TeamMember[];
}

export const getTeam = (teamId: string, signal?: AbortSignal) => api.get<Team>(`/teams/${encodeURIComponent(teamId)}`, { signal });

export const teamQueryKey = (teamId: string) => ['teams', teamId] as const;
export const getTeamQueryOptions = (teamId: string) =>
  queryOptions({ queryKey: teamQueryKey(teamId), queryFn: ({ signal }) => getTeam(teamId, signal) });
export const useTeam = (teamId: string) => useQuery(getTeamQueryOptions(teamId));
