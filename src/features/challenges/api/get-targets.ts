import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import type { ReferenceSize, ReferenceView, Wire } from '@shared/api-types';

/** a target's reference as the caller may see it (server/presenters/reference.ts; the type: shared/api-types.ts) */
export type Reference = Wire<ReferenceView>;

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
/** What a reference's size record holds: the method's measure, and for a tensor network its width, flops and slices; the provenance sentence and a cross-check by a second exact method where one ran. */
export type { ReferenceSize };

export function describeSize(size: ReferenceSize | Record<string, unknown> | null | undefined): string {
  if (!size) return '';
  const s = size as ReferenceSize;
  const parts: string[] = [];
  if (typeof s.sites === 'number') parts.push(`${s.sites} sites`);
  if (typeof s.qubits === 'number') parts.push(`${s.qubits} qubits`);
  if (typeof s.terms === 'number') parts.push(`${s.terms} term${s.terms === 1 ? '' : 's'}`);
  if (typeof s.width === 'number') parts.push(`width ${s.width}`);
  if (typeof s.flops === 'number' && s.flops > 0) parts.push(`2^${Math.log2(s.flops).toFixed(1)} flops`);
  if (typeof s.slices === 'number' && s.slices > 1) parts.push(`${s.slices} slices`);
  const known = new Set(['sites', 'qubits', 'terms', 'width', 'flops', 'slices', 'detail', 'crossCheck']);
  for (const [k, v] of Object.entries(s)) if (!known.has(k) && typeof v === 'number') parts.push(`${v} ${k}`);
  return parts.join(', ');
}

/** "cross-checked by light-cone statevector, |diff| 3e-16", or '' when no second exact method ran. */
export function describeCrossCheck(size: ReferenceSize | Record<string, unknown> | null | undefined): string {
  const c = (size as ReferenceSize | null | undefined)?.crossCheck;
  if (!c || typeof c.absDiff !== 'number') return '';
  return `cross-checked by ${c.method.replace(/-/g, ' ')}, |diff| ${c.absDiff === 0 ? '0' : c.absDiff.toExponential(0).replace('e', '·10^')}`;
}
