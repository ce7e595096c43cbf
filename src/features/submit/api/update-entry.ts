import { useMutation, useQueryClient } from '@tanstack/react-query';
import { entryQueryKey } from '@/features/entries/api/get-entry';
import { sendDocument, type DocumentSource } from './send-document';
import type { SavedEntry } from './create-entry';

/** Replaces the whole document of a draft or returned entry. */
export const updateEntry = (entryId: string, src: DocumentSource) => sendDocument<SavedEntry>('PUT', `/entries/${encodeURIComponent(entryId)}`, src);

export function useUpdateEntry() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ entryId, src }: { entryId: string; src: DocumentSource; teamId?: string }) => updateEntry(entryId, src),
    onSuccess: (_d, v) => Promise.all([qc.invalidateQueries({ queryKey: entryQueryKey(v.entryId) }), qc.invalidateQueries({ queryKey: ['teams', v.teamId, 'entries'] })]),
  });
}
