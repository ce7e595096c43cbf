import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import type { Reference } from '@/features/challenges/api/get-targets';
import type { ObservableSpec } from '@/features/challenges/api/get-challenge';

export interface ZneFit { model: string; ok: boolean; value: number | null; uncertainty: number | null; reason: string | null; chi2: number | null; nu: number | null }
export interface TargetEstimate {
  entry: { id: string; label: string; teamId: string; teamName: string; track: 'hardware' | 'classical'; methodFamily: string; isBaseline: boolean; publishedAt: string | null };
  value: number; uncertainty: number; kind: string;
  /** against the exact reference (u² = u_i² + u_ref²) or the consensus (server/presenters' rule); U = 2u */
  equivalence: { against: 'reference' | 'consensus'; d: number; u: number; U: number; included: boolean } | null;
  zne: { points: { scale: number; value: number; uncertainty: number }[]; unmitigated: number | null; fits: ZneFit[] } | null;
}
export interface TargetConsensusDetail {
  estimator: string; entries: number; includedCount: number; excluded: string[];
  value: number | null; uncertainty: number | null; chi2: number | null; nu: number | null; p: number | null; birgeRatio: number | null; tau2: number | null; I2: number | null;
  disputed: boolean; computedAt: string; engineVersion: string;
}
export interface TargetDetail {
  version: number; checksum: string; engineVersion: string;
  key: string; instance: string; params: { steps?: number; thetaH?: number; thetaJ?: number; family?: string };
  observable: { key: string; spec: ObservableSpec; bound: number | null };
  disputed: boolean; disputeNote: string | null;
  reference: Reference;
  consensus: TargetConsensusDetail | null;
  estimates: TargetEstimate[];
  siblings: { key: string; steps: number | null; thetaH: number | null }[];
}

export const getTarget = (slug: string, key: string, signal?: AbortSignal) =>
  api.get<TargetDetail>(`/challenges/${encodeURIComponent(slug)}/targets/${encodeURIComponent(key)}`, { signal });

export const getTargetQueryOptions = (slug: string, key: string) =>
  queryOptions({ queryKey: ['challenges', slug, 'target', key], queryFn: ({ signal }) => getTarget(slug, key, signal) });
export const useTarget = (slug: string, key: string) => useQuery({ ...getTargetQueryOptions(slug, key), enabled: Boolean(slug && key) });
