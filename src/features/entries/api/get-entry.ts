import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

import type { EntryDocument as EntryDocumentShared, EntryEstimate, EntryHistoryItem as EntryHistoryItemShared, EntryPage, EntryRevision as EntryRevisionShared, EstimateScore as EstimateScoreShared, Wire } from '@shared/api-types';

/** the entry document (schemas/entry.schema.json): shared/api-types.ts */
export type EntryDocument = EntryDocumentShared;
export type EntryDocumentEstimate = EntryEstimate;
export type NoiseScaledPoint = NonNullable<EntryEstimate['noiseScaled']>[number];
export type ConvergencePoint = NonNullable<EntryEstimate['convergence']>[number];
export type EntryRevision = Wire<EntryRevisionShared>;
export type EntryHistoryItem = Wire<EntryHistoryItemShared>;
/** The server's score of one estimate (server/presenters/entry.ts; the type: shared/api-types.ts). */
export type EstimateScore = EstimateScoreShared;
/** GET /api/entries/:id as the client receives it (server/presenters/entry.ts; the type: shared/api-types.ts). */
export type Entry = Wire<EntryPage>;

export const getEntry = (entryId: string, signal?: AbortSignal) => api.get<Entry>(`/entries/${encodeURIComponent(entryId)}`, { signal });

export const entryQueryKey = (entryId: string) => ['entries', entryId] as const;
export const getEntryQueryOptions = (entryId: string) =>
  queryOptions({ queryKey: entryQueryKey(entryId), queryFn: ({ signal }) => getEntry(entryId, signal) });
export const useEntry = (entryId: string) => useQuery(getEntryQueryOptions(entryId));
