import { useMutation, useQueryClient } from '@tanstack/react-query';
import { sendDocument, type DocumentSource } from './send-document';
import type { ProblemItem } from './validate-entry';

export interface SavedEntry { id: string; state: string; estimates: number; coverage: { targets: number; covered: number; fraction: number }; warnings: ProblemItem[] }

/** Stores a new draft entry for a team (?team= when the user is in several teams). */
export const createEntry = (slug: string, src: DocumentSource, teamId?: string) =>
  sendDocument<SavedEntry>('POST', `/challenges/${encodeURIComponent(slug)}/entries`, src, { team: teamId });

export function useCreateEntry() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ slug, src, teamId }: { slug: string; src: DocumentSource; teamId?: string }) => createEntry(slug, src, teamId),
    onSuccess: (_d, v) => qc.invalidateQueries({ queryKey: ['teams', v.teamId, 'entries'] }),
  });
}
