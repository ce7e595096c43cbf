import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { challengeQueryKey } from '@/features/challenges/api/get-challenge';

export interface SettingsPatch {
  estimator?: string; primaryMetric?: string; tracks?: string[];
  submissionWindow?: { opensAt?: string | null; closesAt?: string | null } | null;
  license?: string; state?: 'open' | 'closed'; reason?: string;
}
export const updateSettings = (slug: string, patch: SettingsPatch) =>
  api.post<{ slug: string; state: string; settings: Record<string, unknown>; changed: string[]; jobId: string | null }>(`/challenges/${encodeURIComponent(slug)}/settings`, patch);

export function useUpdateSettings(slug: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (patch: SettingsPatch) => updateSettings(slug, patch),
    onSuccess: () => Promise.all([qc.invalidateQueries({ queryKey: challengeQueryKey(slug) }), qc.invalidateQueries({ queryKey: ['challenges'], exact: true })]),
  });
}
