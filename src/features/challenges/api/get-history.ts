import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

export interface HistoryEvent { at: string; kind: string; summary: string; details?: Record<string, unknown> | null }

export const getHistory = (slug: string, signal?: AbortSignal) => api.get<{ events: HistoryEvent[] }>(`/challenges/${encodeURIComponent(slug)}/history`, { signal });

export const getHistoryQueryOptions = (slug: string) =>
  queryOptions({ queryKey: ['challenges', slug, 'history'], queryFn: ({ signal }) => getHistory(slug, signal) });
export const useHistory = (slug: string) => useQuery(getHistoryQueryOptions(slug));
