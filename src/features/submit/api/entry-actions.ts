/**
 * The changes a team makes on its own entry: submit (to review), withdraw (with a reason), revise
 * (a new draft revision of a published entry) and delete (a draft only). One endpoint each; they
 * share the invalidation of the entry and the team's list.
 */
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { entryQueryKey } from '@/features/entries/api/get-entry';

export const submitEntry = (entryId: string) => api.post<{ id: string; state: string }>(`/entries/${encodeURIComponent(entryId)}/submit`);
export const withdrawEntry = (entryId: string, reason: string) => api.post<{ id: string; state: string }>(`/entries/${encodeURIComponent(entryId)}/withdraw`, { reason });
export const reviseEntry = (entryId: string) => api.post<{ id: string; state: string }>(`/entries/${encodeURIComponent(entryId)}/revise`);
export const deleteDraft = (entryId: string) => api.delete<{ id: string; deleted: true }>(`/entries/${encodeURIComponent(entryId)}`);

type Action = { action: 'submit' | 'revise' | 'delete'; entryId: string; teamId: string } | { action: 'withdraw'; entryId: string; teamId: string; reason: string };

export function useEntryAction() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (a: Action): Promise<{ id: string }> => (a.action === 'withdraw' ? withdrawEntry(a.entryId, a.reason) : a.action === 'submit' ? submitEntry(a.entryId) : a.action === 'delete' ? deleteDraft(a.entryId) : reviseEntry(a.entryId)),
    onSuccess: (_d, a) => Promise.all([qc.invalidateQueries({ queryKey: entryQueryKey(a.entryId) }), qc.invalidateQueries({ queryKey: ['teams', a.teamId, 'entries'] })]),
  });
}
