import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { apiKeysQueryKey } from './get-api-keys';

export const revokeApiKey = (teamId: string, keyId: string) =>
  api.delete<{ revoked: string }>(`/teams/${encodeURIComponent(teamId)}/api-keys/${encodeURIComponent(keyId)}`);

export function useRevokeApiKey(teamId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (keyId: string) => revokeApiKey(teamId, keyId),
    onSuccess: () => qc.invalidateQueries({ queryKey: apiKeysQueryKey(teamId) }),
  });
}
