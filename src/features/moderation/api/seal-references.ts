import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

export interface SealResult { sealId: string; version: number; targets: number; referencesSealedNow: number; pendingReferences: number; sealedUntil: string; jobId: string | null }
export const sealReferences = (slug: string, targets: string[] | 'all', until: string) =>
  api.post<SealResult>(`/challenges/${encodeURIComponent(slug)}/seal`, { targets, until });

export function useSealReferences(slug: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ targets, until }: { targets: string[] | 'all'; until: string }) => sealReferences(slug, targets, until),
    onSuccess: () => qc.invalidateQueries({ queryKey: ['challenges', slug, 'targets'] }),
  });
}
