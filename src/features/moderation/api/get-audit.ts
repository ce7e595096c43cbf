import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

export interface AuditLine { id: number; at: string; actorId: string | null; actor: string | null; action: string; subjectType: string; subjectId: string; details: Record<string, unknown> }
export interface AuditFilters { subjectType?: string; subjectId?: string; action?: string; before?: string }

export const getAudit = (f: AuditFilters, signal?: AbortSignal) => api.get<{ lines: AuditLine[]; next: string | null }>('/audit', { query: { ...f, limit: 100 }, signal });

export const getAuditQueryOptions = (f: AuditFilters) =>
  queryOptions({ queryKey: ['moderation', 'audit', f], queryFn: ({ signal }) => getAudit(f, signal), placeholderData: keepPreviousData });
export const useAudit = (f: AuditFilters) => useQuery(getAuditQueryOptions(f));
