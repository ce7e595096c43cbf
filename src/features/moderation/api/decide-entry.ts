import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { entryQueryKey } from '@/features/entries/api/get-entry';
import { queueQueryKey } from './get-queue';

export type Decision = 'publish' | 'return' | 'reject';
export interface DecisionResult { id: string; decision: Decision; state: string; reviewId: string; decidedAt: string; superseded: string[]; jobIds: string[]; mailed: unknown }

export const decideEntry = (entryId: string, decision: Decision, reason: string) =>
  api.post<DecisionResult>(`/entries/${encodeURIComponent(entryId)}/decision`, { decision, reason });

/** After a decision (or a 409: someone decided first) the queue is refreshed either way. */
export function useDecideEntry() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ entryId, decision, reason }: { entryId: string; decision: Decision; reason: string }) => decideEntry(entryId, decision, reason),
    onSettled: (_d, _e, v) => Promise.all([qc.invalidateQueries({ queryKey: queueQueryKey }), qc.invalidateQueries({ queryKey: entryQueryKey(v.entryId) })]),
  });
}
