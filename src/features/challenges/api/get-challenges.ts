import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

export type ChallengeState = 'draft' | 'open' | 'closed' | 'archived' | string;
export interface ChallengeSummary {
  slug: string;
  title: string;
  summary: string;
  state: ChallengeState;
  version: number | null;
  checksum: string | null;
  lattice: ({ kind: string } & Record<string, unknown>) | null;
  qubits: number | null;
  family: string | null;
  steps: { min: number; max: number } | null;
  targets: number;
  exactTargets: number;
  sealedTargets: number;
  entries: { hardware: number; classical: number };
  lastActivity: string | null;
}

export const getChallenges = (signal?: AbortSignal) => api.get<{ challenges: ChallengeSummary[] }>('/challenges', { signal });

export const getChallengesQueryOptions = () =>
  queryOptions({ queryKey: ['challenges'], queryFn: ({ signal }) => getChallenges(signal) });

export const useChallenges = () => useQuery(getChallengesQueryOptions());
