import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

export interface EstimateEntry { id: string; label: string; teamName: string; track: 'hardware' | 'classical'; methodFamily: string; isBaseline: boolean }
export interface SweepEstimate { entryId: string; target: string; value: number; uncertainty: number; kind: string; raw?: unknown }
export interface EstimatesResponse { entries: EstimateEntry[]; estimates: SweepEstimate[] }

export const getEstimates = (slug: string, q: { observable?: string; steps?: number }, signal?: AbortSignal) =>
  api.get<EstimatesResponse>(`/challenges/${encodeURIComponent(slug)}/estimates`, { query: q, signal });

export const getEstimatesQueryOptions = (slug: string, q: { observable?: string; steps?: number }) =>
  queryOptions({ queryKey: ['challenges', slug, 'estimates', q.observable ?? '', q.steps ?? ''], queryFn: ({ signal }) => getEstimates(slug, q, signal), placeholderData: keepPreviousData });
export const useEstimates = (slug: string, q: { observable?: string; steps?: number }, enabled = true) =>
  useQuery({ ...getEstimatesQueryOptions(slug, q), enabled });
