import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import type { Track } from '@shared/vocabulary';

export interface AgreementEntry { id: string; label?: string; teamName?: string; track?: Track; value?: number; uncertainty?: number }
export interface AgreementAverage { mode: 'average-unverifiable'; computedAt: string | null; entries: AgreementEntry[]; meanRatio: (number | null)[][]; targets: number[][]; incompatible: number[][] }
export interface AgreementTarget {
  mode: 'target'; target: string; computedAt: string | null; entries: AgreementEntry[];
  d: number[][]; U: number[][]; ratio: (number | null)[][];
  consensus: { value: number | null; uncertainty: number | null; estimator: string; disputed: boolean; verifiable: boolean } | null;
}
export type Agreement = AgreementAverage | AgreementTarget;

export const getAgreement = (slug: string, target: string, signal?: AbortSignal) =>
  api.get<Agreement>(`/challenges/${encodeURIComponent(slug)}/agreement`, { query: { target }, signal });

export const getAgreementQueryOptions = (slug: string, target: string) =>
  queryOptions({ queryKey: ['challenges', slug, 'agreement', target], queryFn: ({ signal }) => getAgreement(slug, target, signal), placeholderData: keepPreviousData });
export const useAgreement = (slug: string, target: string) => useQuery(getAgreementQueryOptions(slug, target));
