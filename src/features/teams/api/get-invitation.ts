import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { authCall } from '@/lib/api-client';
import { authClient } from '@/lib/auth-client';
import { meQueryKey } from '@/features/me/api/get-me';

/** One invitation as better-auth shows it to its recipient. */
export interface InvitationDetail {
  id: string;
  email: string;
  role: string;
  status: string;
  expiresAt: string | Date;
  organizationId: string;
  organizationName: string;
  organizationSlug: string;
  inviterEmail?: string;
}

export const getInvitation = async (id: string) =>
  (await authCall(authClient.organization.getInvitation({ query: { id } }))) as unknown as InvitationDetail;

export const getInvitationQueryOptions = (id: string) =>
  queryOptions({ queryKey: ['invitation', id], queryFn: () => getInvitation(id), staleTime: 0 });
export const useInvitation = (id: string, enabled: boolean) => useQuery({ ...getInvitationQueryOptions(id), enabled });

export function useAcceptInvitation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (invitationId: string) => authCall(authClient.organization.acceptInvitation({ invitationId })),
    onSuccess: () => Promise.all([qc.invalidateQueries({ queryKey: meQueryKey }), qc.invalidateQueries({ queryKey: ['teams'] })]),
  });
}
