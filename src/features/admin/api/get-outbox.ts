import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

export interface OutboxSummary {
  id: string;
  receivedAt: string;
  from: string;
  to: string;
  subject: string;
}

export const getOutbox = (to: string, signal?: AbortSignal) => api.get<{ messages: OutboxSummary[] }>('/admin/outbox', { query: { to }, signal });

export const getOutboxQueryOptions = (to = '') =>
  queryOptions({ queryKey: ['admin', 'outbox', to], queryFn: ({ signal }) => getOutbox(to, signal), staleTime: 0, refetchInterval: 5000 });
export const useOutbox = (to = '') => useQuery(getOutboxQueryOptions(to));
