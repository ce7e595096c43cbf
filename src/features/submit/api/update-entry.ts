import { useMutation, useQueryClient } from '@tanstack/react-query';
import { entryQueryKey } from '@/features/entries/api/get-entry';
import { sendDocument, type DocumentSource } from './send-document';
import type { SavedEntry } from './create-entry';

/** Replaces the whole document of a draft or returned entry (a draft with `incomplete`: also one with problems). */
export const updateEntry = (entryId: string, src: DocumentSource, incomplete = false) => sendDocument<SavedEntry>('PUT', `/entries/${encodeURIComponent(entryId)}`, src, { incomplete: incomplete ? '1' : undefined });

export function useUpdateEntry() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ entryId, src, incomplete }: { entryId: string; src: DocumentSource; teamId?: string; incomplete?: boolean }) => updateEntry(entryId, src, incomplete),
    onSuccess: (_d, v) => Promise.all([qc.invalidateQueries({ queryKey: entryQueryKey(v.entryId) }), qc.invalidateQueries({ queryKey: ['teams', v.teamId, 'entries'] })]),
  });
}
