import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { untilWindowChange, type SubmissionsStatus } from './get-challenge';

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
  submissions: SubmissionsStatus;
}

export const getChallenges = (signal?: AbortSignal) => api.get<{ challenges: ChallengeSummary[] }>('/challenges', { signal });

export const getChallengesQueryOptions = () =>
  queryOptions({
    queryKey: ['challenges'],
    queryFn: ({ signal }) => getChallenges(signal),
    // a state column that follows the submission windows of a page left open
    refetchInterval: (q) => (q.state.data ? untilWindowChange(q.state.data.challenges.map((c) => c.submissions), q.state.dataUpdatedAt) : false),
  });

export const useChallenges = () => useQuery(getChallengesQueryOptions());
