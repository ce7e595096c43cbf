import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import type { Track } from '@shared/vocabulary';

export interface EstimateEntry { id: string; label: string; teamName: string; track: Track; methodFamily: string; isBaseline: boolean }
export interface SweepEstimate { entryId: string; target: string; value: number; uncertainty: number; kind: string; raw?: unknown }
export interface EstimatesResponse { entries: EstimateEntry[]; estimates: SweepEstimate[] }

/** raw: 0 leaves out the noise-scaled data and convergence traces (smaller answers for tables) */
export interface EstimatesQuery { observable?: string; steps?: number; raw?: 0 }

export const getEstimates = (slug: string, q: EstimatesQuery, signal?: AbortSignal) =>
  api.get<EstimatesResponse>(`/challenges/${encodeURIComponent(slug)}/estimates`, { query: { ...q }, signal });

export const getEstimatesQueryOptions = (slug: string, q: EstimatesQuery) =>
  queryOptions({ queryKey: ['challenges', slug, 'estimates', q.observable ?? '', q.steps ?? '', q.raw ?? ''], queryFn: ({ signal }) => getEstimates(slug, q, signal), placeholderData: keepPreviousData });
export const useEstimates = (slug: string, q: EstimatesQuery, enabled = true) =>
  useQuery({ ...getEstimatesQueryOptions(slug, q), enabled });
