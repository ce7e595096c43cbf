import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { apiKeysQueryKey } from './get-api-keys';

export interface CreatedApiKey {
  id: string;
  name: string;
  /** the secret: shown once, never again */
  key: string;
  start: string | null;
  expiresAt: string | null;
}

export const createApiKey = (teamId: string, body: { name: string; expiresInDays?: number }) =>
  api.post<CreatedApiKey>(`/teams/${encodeURIComponent(teamId)}/api-keys`, body);

export function useCreateApiKey(teamId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: { name: string; expiresInDays?: number }) => createApiKey(teamId, body),
    onSuccess: () => qc.invalidateQueries({ queryKey: apiKeysQueryKey(teamId) }),
  });
}
