/**
 * Challenge authoring: preview a spec (validation errors, or the planner's report), store it as a
 * draft version, publish (a correction needs a reason) and follow the reference job.
 */
import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api, fileForm } from '@/lib/api-client';

export interface PlanRow { target: string; method: string | null; size: number | null; unit: string | null; estimatedSeconds: number | null; reason: string | null; cone: unknown }
export interface SpecPreview {
  id: string; version: number; checksum: string; qubits: number; instances: number; targets: number;
  lattice: { kind: string; qubits: number; edges: [number, number][]; coords: [number, number][] };
  plans: PlanRow[];
}
export interface StoredDraft { slug: string; versionId: string; version: number; checksum: string; targets: number; instances: number }
export interface PublishResult { slug: string; versionId: string; version: number; checksum: string; jobId: string }
export interface Job { id: string; kind: string; state: string; progress: number | null; note: string | null; error: string | null; createdAt: string; startedAt: string | null; finishedAt: string | null }

export const previewSpec = (file: File) => api.post<SpecPreview>('/challenges/preview', fileForm(file));
export const storeDraft = (file: File) => api.post<StoredDraft>('/challenges', fileForm(file));
export const publishChallenge = (slug: string, reason?: string) => api.post<PublishResult>(`/challenges/${encodeURIComponent(slug)}/publish`, reason ? { reason } : {});
export const getJob = (id: string, signal?: AbortSignal) => api.get<Job>(`/jobs/${encodeURIComponent(id)}`, { signal });

export const usePreviewSpec = () => useMutation({ mutationFn: previewSpec });
export function useStoreDraft() {
  const qc = useQueryClient();
  return useMutation({ mutationFn: storeDraft, onSuccess: () => qc.invalidateQueries({ queryKey: ['challenges'], exact: true }) });
}
export function usePublishChallenge() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ slug, reason }: { slug: string; reason?: string }) => publishChallenge(slug, reason),
    onSuccess: (_d, v) => Promise.all([qc.invalidateQueries({ queryKey: ['challenges'], exact: true }), qc.invalidateQueries({ queryKey: ['challenges', v.slug] })]),
  });
}

const finished = (j: Job | undefined) => j?.state === 'done' || j?.state === 'failed';
/** a job, polled every second until it is done or failed */
export const getJobQueryOptions = (id: string) =>
  queryOptions({ queryKey: ['jobs', id], queryFn: ({ signal }) => getJob(id, signal), refetchInterval: (q) => (finished(q.state.data) ? false : 1000) });
export const useJob = (id: string | null) => useQuery({ ...getJobQueryOptions(id ?? ''), enabled: Boolean(id) });
