import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

export interface ChallengeVersionInfo { version: number; checksum: string; state: string; publishedAt: string | null; supersededReason: string | null }
export interface ChallengeJob { id: string; kind: string; state: 'queued' | 'running' | 'done' | 'failed' | string; progress: number | null; note: string | null; error: string | null; createdAt: string; finishedAt: string | null }
export interface ChallengeInstance { key: string; params: { family?: string; steps?: number; thetaH?: number; thetaJ?: number } & Record<string, unknown>; qubits: number; gateCount: number; depth: number }
export interface ObservableSpec { id?: string; terms?: { coef: number; pauli: string }[]; pauli?: string; label?: string; description?: string }
export interface ChallengeObservable { key: string; spec: ObservableSpec; bound: number | null }
export interface ChallengeDetail {
  slug: string;
  title: string;
  description: string;
  state: string;
  settings: { estimator?: string; primaryMetric?: string; tracks?: string[]; license?: string };
  version: ChallengeVersionInfo & { id: string };
  versions: ChallengeVersionInfo[];
  spec: Record<string, unknown>;
  lattice: { kind: string; qubits: number; edges: [number, number][]; coords: [number, number][] };
  instances: ChallengeInstance[];
  observables: ChallengeObservable[];
  jobs: ChallengeJob[];
}

export const getChallenge = (slug: string, signal?: AbortSignal) => api.get<ChallengeDetail>(`/challenges/${encodeURIComponent(slug)}`, { signal });

const busy = (d: ChallengeDetail | undefined) => Boolean(d?.jobs.some((j) => j.state === 'queued' || j.state === 'running'));

export const challengeQueryKey = (slug: string) => ['challenges', slug] as const;
export const getChallengeQueryOptions = (slug: string) =>
  queryOptions({
    queryKey: challengeQueryKey(slug),
    queryFn: ({ signal }) => getChallenge(slug, signal),
    // reference jobs report progress: poll every 2 s while any of them is queued or running
    refetchInterval: (q) => (busy(q.state.data) ? 2000 : false),
  });
export const useChallenge = (slug: string) => useQuery(getChallengeQueryOptions(slug));
