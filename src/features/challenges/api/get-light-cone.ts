import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

export interface LightCone { qubits: number[] }

export const getLightCone = (slug: string, target: string, signal?: AbortSignal) =>
  api.get<LightCone>(`/challenges/${encodeURIComponent(slug)}/targets/${encodeURIComponent(target)}/light-cone`, { signal });

export const getLightConeQueryOptions = (slug: string, target: string) =>
  queryOptions({ queryKey: ['challenges', slug, 'light-cone', target], queryFn: ({ signal }) => getLightCone(slug, target, signal), staleTime: Infinity, enabled: Boolean(target) });
export const useLightCone = (slug: string, target: string) => useQuery(getLightConeQueryOptions(slug, target));
