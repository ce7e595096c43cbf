import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import type { Track } from '@shared/vocabulary';

export type SiteRole = 'user' | 'moderator' | 'admin';
export type TeamRole = 'lead' | 'member';

export interface MeUser {
  id: string;
  name: string;
  email: string;
  role: SiteRole;
  emailVerified: boolean;
}
export interface MeTeam {
  id: string;
  name: string;
  slug: string;
  role: TeamRole;
  /** the team's kind: the track its new entries start in */
  track?: Track;
}
export type Me =
  | { kind: 'visitor' }
  | { kind: 'api-key'; teamId: string; keyName: string | null }
  | { kind: 'user'; user: MeUser; teams: MeTeam[] };

export const getMe = (signal?: AbortSignal) => api.get<Me>('/me', { signal });

export const meQueryKey = ['me'] as const;

export const getMeQueryOptions = () =>
  queryOptions({ queryKey: meQueryKey, queryFn: ({ signal }) => getMe(signal), staleTime: 60_000 });

export const useMe = () => useQuery(getMeQueryOptions());

/** the signed-in user, or null */
export function useUser() {
  const q = useMe();
  const me = q.data;
  return { ...q, user: me?.kind === 'user' ? me.user : null, teams: me?.kind === 'user' ? me.teams : [] };
}
