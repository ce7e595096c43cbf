import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import type { TeamEntry } from '@/features/entries/api/get-team-entries';

/** The published entries of a challenge's current version (for curation: moderators also get the hidden ones, marked). */
export type PublishedEntry = TeamEntry;
export const getChallengeEntries = (slug: string, signal?: AbortSignal) =>
  api.get<{ entries: PublishedEntry[] }>(`/challenges/${encodeURIComponent(slug)}/entries`, { signal });

export const getChallengeEntriesQueryOptions = (slug: string) =>
  queryOptions({ queryKey: ['moderation', 'challenge-entries', slug], queryFn: ({ signal }) => getChallengeEntries(slug, signal) });
export const useChallengeEntries = (slug: string) => useQuery(getChallengeEntriesQueryOptions(slug));
