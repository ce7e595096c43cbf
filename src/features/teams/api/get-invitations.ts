import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import type { TeamRole } from '@/features/me/api/get-me';
import { teamQueryKey } from './get-team';

export interface Invitation {
  id: string;
  email: string;
  role: TeamRole;
  status: 'pending' | 'accepted' | 'rejected' | 'canceled' | string;
  expiresAt: string;
  createdAt: string;
}

export const getInvitations = (teamId: string, signal?: AbortSignal) =>
  api.get<{ invitations: Invitation[] }>(`/teams/${encodeURIComponent(teamId)}/invitations`, { signal });

export const invitationsQueryKey = (teamId: string) => [...teamQueryKey(teamId), 'invitations'] as const;
export const getInvitationsQueryOptions = (teamId: string) =>
  queryOptions({ queryKey: invitationsQueryKey(teamId), queryFn: ({ signal }) => getInvitations(teamId, signal) });
export const useInvitations = (teamId: string, enabled = true) => useQuery({ ...getInvitationsQueryOptions(teamId), enabled });
