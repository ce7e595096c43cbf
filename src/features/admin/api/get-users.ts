import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import type { SiteRole } from '@/features/me/api/get-me';

export interface AdminUser {
  id: string;
  name: string;
  email: string;
  role: SiteRole;
  emailVerified: boolean;
  banned: boolean;
  createdAt: string;
}

export const getUsers = (q: string, signal?: AbortSignal) => api.get<{ users: AdminUser[] }>('/admin/users', { query: { q }, signal });

export const usersQueryKey = (q = '') => ['admin', 'users', q] as const;
export const getUsersQueryOptions = (q = '') =>
  queryOptions({ queryKey: usersQueryKey(q), queryFn: ({ signal }) => getUsers(q, signal), placeholderData: keepPreviousData });
export const useUsers = (q: string) => useQuery(getUsersQueryOptions(q));
