/** Following a challenge or a team (mail on publications, references and rescoring), and unfollowing. */
import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

export type FollowSubject = 'challenge' | 'team';
export interface Follow { id: string; subjectType: FollowSubject; subjectId: string; createdAt: string }

export const followsQueryKey = ['me', 'follows'] as const;
export const getFollowsQueryOptions = () => queryOptions({ queryKey: followsQueryKey, queryFn: ({ signal }) => api.get<{ follows: Follow[] }>('/me/follows', { signal }) });
export const useFollows = (enabled: boolean) => useQuery({ ...getFollowsQueryOptions(), enabled });

export function useFollowActions() {
  const qc = useQueryClient();
  const done = () => qc.invalidateQueries({ queryKey: followsQueryKey });
  return {
    follow: useMutation({ mutationFn: (p: { subjectType: FollowSubject; subjectId: string }) => api.post<{ id: string }>('/follows', p), onSuccess: done }),
    unfollow: useMutation({ mutationFn: (id: string) => api.delete<{ id: string }>(`/follows/${encodeURIComponent(id)}`), onSuccess: done }),
  };
}

export const unfollowByToken = (token: string) => api.post<{ following: false; subjectType: FollowSubject; subjectId: string }>('/follows/unfollow', { token });
