import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

export const disputeTarget = (slug: string, targetKey: string, disputed: boolean, note?: string) =>
  api.post<{ target: string; disputed: boolean }>(`/challenges/${encodeURIComponent(slug)}/targets/${encodeURIComponent(targetKey)}/dispute`, { disputed, ...(note ? { note } : {}) });

export function useDisputeTarget(slug: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ targetKey, disputed, note }: { targetKey: string; disputed: boolean; note?: string }) => disputeTarget(slug, targetKey, disputed, note),
    onSuccess: () => qc.invalidateQueries({ queryKey: ['challenges', slug, 'targets'] }),
  });
}
