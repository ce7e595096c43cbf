import { useMutation, useQueryClient } from '@tanstack/react-query';
import { sendDocument, type DocumentSource } from './send-document';
import type { ProblemItem } from './validate-entry';

export interface SavedEntry {
  id: string; state: string; estimates?: number; coverage?: { targets: number; covered: number; fraction: number }; warnings?: ProblemItem[];
  /** saved with problems (?incomplete=1): a draft that cannot be submitted until they are fixed */
  incomplete?: boolean; problems?: ProblemItem[];
}

/**
 * Stores a new draft entry for a team (?team= when the user is in several teams); with `incomplete`
 * a document with problems is stored too, as a draft listing them.
 */
export const createEntry = (slug: string, src: DocumentSource, teamId?: string, incomplete = false) =>
  sendDocument<SavedEntry>('POST', `/challenges/${encodeURIComponent(slug)}/entries`, src, { team: teamId, incomplete: incomplete ? '1' : undefined });

export function useCreateEntry() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ slug, src, teamId, incomplete }: { slug: string; src: DocumentSource; teamId?: string; incomplete?: boolean }) => createEntry(slug, src, teamId, incomplete),
    onSuccess: (_d, v) => qc.invalidateQueries({ queryKey: ['teams', v.teamId, 'entries'] }),
  });
}
