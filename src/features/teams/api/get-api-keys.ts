import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { teamQueryKey } from './get-team';

export interface ApiKeySummary {
  id: string;
  name: string | null;
  start: string | null;
  createdAt: string;
  expiresAt: string | null;
  lastRequest: string | null;
  enabled: boolean | null;
}

export const getApiKeys = (teamId: string, signal?: AbortSignal) =>
  api.get<{ keys: ApiKeySummary[] }>(`/teams/${encodeURIComponent(teamId)}/api-keys`, { signal });

export const apiKeysQueryKey = (teamId: string) => [...teamQueryKey(teamId), 'api-keys'] as const;
export const getApiKeysQueryOptions = (teamId: string) =>
  queryOptions({ queryKey: apiKeysQueryKey(teamId), queryFn: ({ signal }) => getApiKeys(teamId, signal) });
export const useApiKeys = (teamId: string, enabled = true) => useQuery({ ...getApiKeysQueryOptions(teamId), enabled });
