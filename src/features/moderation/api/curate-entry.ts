import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

export interface CurationResult { id: string; featured: boolean; hiddenReason: string | null; changes: string[]; jobId: string | null }
export type Curation = { featured?: boolean; hidden?: { reason: string } | null };

export const curateEntry = (entryId: string, body: Curation) => api.post<CurationResult>(`/entries/${encodeURIComponent(entryId)}/curation`, body);

export function useCurateEntry(slug: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ entryId, body }: { entryId: string; body: Curation }) => curateEntry(entryId, body),
    onSuccess: () => qc.invalidateQueries({ queryKey: ['moderation', 'challenge-entries', slug] }),
  });
}
