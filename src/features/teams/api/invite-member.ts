import { useMutation, useQueryClient } from '@tanstack/react-query';
import { authCall } from '@/lib/api-client';
import { authClient } from '@/lib/auth-client';
import type { TeamRole } from '@/features/me/api/get-me';
import { invitationsQueryKey } from './get-invitations';

export interface InviteInput {
  teamId: string;
  email: string;
  role: TeamRole;
}

/** better-auth's organisation roles: a Parallax team lead is an "owner". */
export const inviteMember = ({ teamId, email, role }: InviteInput) =>
  authCall(authClient.organization.inviteMember({ email, role: role === 'lead' ? 'owner' : 'member', organizationId: teamId }));

export function useInviteMember(teamId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: Omit<InviteInput, 'teamId'>) => inviteMember({ ...input, teamId }),
    onSuccess: () => qc.invalidateQueries({ queryKey: invitationsQueryKey(teamId) }),
  });
}
