import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import type { Track } from '@shared/vocabulary';

export interface ChallengeVersionInfo { version: number; checksum: string; state: string; publishedAt: string | null; supersededReason: string | null }
export interface ChallengeJob { id: string; kind: string; state: 'queued' | 'running' | 'done' | 'failed' | string; progress: number | null; note: string | null; error: string | null; createdAt: string; finishedAt: string | null }
export interface ChallengeInstance { key: string; params: { family?: string; steps?: number; thetaH?: number; thetaJ?: number } & Record<string, unknown>; qubits: number; gateCount: number; depth: number }
export interface ObservableSpec { id?: string; terms?: { coef: number; pauli: string }[]; pauli?: string; label?: string; description?: string }
export interface ChallengeObservable { key: string; spec: ObservableSpec; bound: number | null }
export type TrackKey = Track;
/**
 * Whether the challenge takes entries now, on the server's clock (asOf): the same answer as the
 * enforcement. acceptsEntriesNow: a submission would be taken now; acceptsDraftsNow: a new draft
 * would be stored now (also before the window opens, when only the submission waits). Drafts
 * already saved stay editable whatever it says, and a returned entry can be sent back to review.
 */
export interface SubmissionsStatus {
  acceptsEntriesNow: boolean;
  acceptsDraftsNow: boolean;
  /** short, when it takes no submission: "submissions closed", "opens 2026-12-24 00:00 UTC", "closed …", "no track open" */
  reason: string | null;
  openTracks: TrackKey[];
  window: { opensAt: string | null; closesAt: string | null };
  tracks: Record<TrackKey, { acceptsEntriesNow: boolean; acceptsDraftsNow: boolean; reason: string | null }>;
  asOf: string;
}
export interface ChallengeDetail {
  slug: string;
  title: string;
  description: string;
  state: string;
  settings: { estimator?: string; primaryMetric?: string; tracks?: string[]; license?: string };
  submissions: SubmissionsStatus;
  version: ChallengeVersionInfo & { id: string };
  versions: ChallengeVersionInfo[];
  spec: Record<string, unknown>;
  lattice: { kind: string; qubits: number; edges: [number, number][]; coords: [number, number][] };
  instances: ChallengeInstance[];
  observables: ChallengeObservable[];
  jobs: ChallengeJob[];
}

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
