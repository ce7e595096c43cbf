import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import type { Track } from '@shared/vocabulary';

import type { ChallengeDetail as ChallengeDetailShared, ChallengeInstance as ChallengeInstanceShared, ChallengeJob as ChallengeJobShared, ChallengeObservable as ChallengeObservableShared, ChallengeVersionInfo as ChallengeVersionInfoShared, ObservableJson, SubmissionsStatus as SubmissionsStatusShared, Wire } from '@shared/api-types';

// GET /api/challenges/:slug as the client receives it (server/routes/challenges.ts; the types: shared/api-types.ts)
export type ChallengeVersionInfo = Wire<ChallengeVersionInfoShared>;
export type ChallengeJob = Wire<ChallengeJobShared>;
export type ChallengeInstance = Wire<ChallengeInstanceShared>;
export type ObservableSpec = ObservableJson;
export type ChallengeObservable = Wire<ChallengeObservableShared>;
export type TrackKey = Track;
/**
 * Whether the challenge takes entries now, on the server's clock (asOf): the same answer as the
 * enforcement (shared/api-types.ts SubmissionsStatus).
 */
export type SubmissionsStatus = Wire<SubmissionsStatusShared>;
export type ChallengeDetail = Wire<ChallengeDetailShared>;

export const getChallenge = (slug: string, signal?: AbortSignal) => api.get<ChallengeDetail>(`/challenges/${encodeURIComponent(slug)}`, { signal });

const busy = (d: ChallengeDetail | undefined) => Boolean(d?.jobs.some((j) => j.state === 'queued' || j.state === 'running'));

/**
 * Milliseconds until the submission window of one of these challenges next opens or closes, on the
 * server's clock (asOf, corrected by when the answer arrived), plus a second; false when none does
 * within a day. A page left open then asks again, so what it says stays the server's answer.
 */
export function untilWindowChange(list: SubmissionsStatus[], receivedAt: number): number | false {
  let next = Infinity;
  for (const s of list) {
    const asOf = Date.parse(s.asOf);
    for (const at of [s.window.opensAt, s.window.closesAt]) {
      const t = at ? Date.parse(at) - asOf : NaN; // ms after the server's answer
      if (t > 0 && t < next) next = t;
    }
  }
  if (next > 86_400_000) return false;
  return Math.max(5_000, next - (Date.now() - receivedAt) + 1_000);
}

export const challengeQueryKey = (slug: string) => ['challenges', slug] as const;
export const getChallengeQueryOptions = (slug: string) =>
  queryOptions({
    queryKey: challengeQueryKey(slug),
    queryFn: ({ signal }) => getChallenge(slug, signal),
    // reference jobs report progress: poll every 2 s while any of them is queued or running
    // and once more when the submission window opens or closes
    refetchInterval: (q) => (busy(q.state.data) ? 2000 : q.state.data ? untilWindowChange([q.state.data.submissions], q.state.dataUpdatedAt) : false),
  });
export const useChallenge = (slug: string) => useQuery(getChallengeQueryOptions(slug));
