import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

export type Reference =
  | { status: 'exact'; value: number; uncertainty: number; method: string; size: Record<string, number> | null; wallMs: number | null; engineVersion: string | null; createdAt: string }
  | { status: 'none'; reason: string | null; engineVersion?: string | null }
  | { status: 'sealed'; sealedUntil: string }
  | { status: 'pending' };

export interface TargetConsensusInfo {
  estimator: string; entries: number; value: number | null; uncertainty: number | null;
  chi2: number | null; nu: number | null; p: number | null; birgeRatio: number | null; tau2: number | null; I2: number | null; disputed: boolean;
}
export interface Target {
  key: string;
  instance: string;
  params: { steps?: number; thetaH?: number; thetaJ?: number } & Record<string, unknown>;
  observable: string;
  disputed: boolean;
  disputeNote: string | null;
  reference: Reference;
  consensus: TargetConsensusInfo | null;
}
export interface TargetsResponse { version: number; checksum: string; estimator: string | null; standingsComputedAt: string | null; targets: Target[] }

export const getTargets = (slug: string, signal?: AbortSignal) => api.get<TargetsResponse>(`/challenges/${encodeURIComponent(slug)}/targets`, { signal });

export const getTargetsQueryOptions = (slug: string) =>
  queryOptions({
    queryKey: ['challenges', slug, 'targets'],
    queryFn: ({ signal }) => getTargets(slug, signal),
    refetchInterval: (q) => (q.state.data?.targets.some((t) => t.reference.status === 'pending') ? 5000 : false),
  });
export const useTargets = (slug: string) => useQuery({ ...getTargetsQueryOptions(slug), enabled: Boolean(slug) });

/** "free-fermion, 60 sites" */
export function describeSize(size: Record<string, number> | null | undefined): string {
  if (!size) return '';
  const parts: string[] = [];
  if (size.sites !== undefined) parts.push(`${size.sites} sites`);
  if (size.qubits !== undefined) parts.push(`${size.qubits} qubits`);
  if (size.terms !== undefined) parts.push(`${size.terms} term${size.terms === 1 ? '' : 's'}`);
  for (const [k, v] of Object.entries(size)) if (!['sites', 'qubits', 'terms'].includes(k)) parts.push(`${v} ${k}`);
  return parts.join(', ');
}
