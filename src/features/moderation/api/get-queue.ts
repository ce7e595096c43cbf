import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import type { Track } from '@shared/vocabulary';

export interface QueueChecks {
  schema: { ok: boolean; problems: { target: string; message: string }[] };
  coverage: { targets: number; answered: number; fraction: number; partial: boolean };
  scores: { exactReferences: number; scored: number; rmse: number | null; meanZ2: number | null; fractionCovered: number | null; maxAbsError: number | null };
  outliers: { consensusComputedAt: string | null; compared: number; count: number; targets: { target: string; value: number; uncertainty: number; consensus: number; d: number; U: number }[] };
  bounds: { count: number; targets: { target: string; value: number; uncertainty: number; bound: number; beyondThreeSigma: boolean }[] };
  identical: { entryId: string; label: string; team: string; state: string; isBaseline: boolean; targets: number; examples: string[] }[];
  /** the blind-round commitment; unchangedSinceCheck: whether the estimates still hash to what the reveal checked */
  commitment: { result: 'pending' | 'match' | 'mismatch'; checkedAt: string | null; unchangedSinceCheck: boolean | null } | null;
}
export interface QueueItem {
  id: string;
  challenge: { slug: string; version: number };
  team: { id: string; name: string };
  label: string; track: Track; methodFamily: string; revision: number; lineageId: string | null; supersedesId: string | null;
  submittedAt: string | null;
  flags: string[];
  checks: QueueChecks;
}

export const getQueue = (signal?: AbortSignal) => api.get<{ count: number; entries: QueueItem[] }>('/moderation/queue', { signal });

export const queueQueryKey = ['moderation', 'queue'] as const;
export const getQueueQueryOptions = () => // a moderator needs the queue as it is now: always fresh on visit, and refreshed every 30 s
  queryOptions({ queryKey: queueQueryKey, queryFn: ({ signal }) => getQueue(signal), staleTime: 0, refetchInterval: 30_000 });
export const useQueue = () => useQuery(getQueueQueryOptions());
