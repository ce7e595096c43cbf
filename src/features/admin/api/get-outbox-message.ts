import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import type { OutboxSummary } from './get-outbox';

export interface OutboxMessage extends OutboxSummary {
  text: string | null;
  html: string | null;
}

export const getOutboxMessage = (id: string, signal?: AbortSignal) => api.get<OutboxMessage>(`/admin/outbox/${encodeURIComponent(id)}`, { signal });

export const getOutboxMessageQueryOptions = (id: string) =>
  queryOptions({ queryKey: ['admin', 'outbox', 'message', id], queryFn: ({ signal }) => getOutboxMessage(id, signal), staleTime: Infinity });
export const useOutboxMessage = (id: string) => useQuery(getOutboxMessageQueryOptions(id));
