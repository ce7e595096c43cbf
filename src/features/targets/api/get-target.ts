import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import type { TargetConsensusDetail as TargetConsensusDetailShared, TargetDetail as TargetDetailShared, TargetEstimate as TargetEstimateShared, Wire, ZneFit as ZneFitShared } from '@shared/api-types';

// GET /api/challenges/:slug/targets/:key as the client receives it (server/routes/public-data.ts; the types: shared/api-types.ts)
export type ZneFit = ZneFitShared;
export type TargetEstimate = Wire<TargetEstimateShared>;
export type TargetConsensusDetail = Wire<TargetConsensusDetailShared>;
export type TargetDetail = Wire<TargetDetailShared>;

export const getTarget = (slug: string, key: string, signal?: AbortSignal) =>
  api.get<TargetDetail>(`/challenges/${encodeURIComponent(slug)}/targets/${encodeURIComponent(key)}`, { signal });

export const getTargetQueryOptions = (slug: string, key: string) =>
  queryOptions({ queryKey: ['challenges', slug, 'target', key], queryFn: ({ signal }) => getTarget(slug, key, signal) });
export const useTarget = (slug: string, key: string) => useQuery({ ...getTargetQueryOptions(slug, key), enabled: Boolean(slug && key) });
