import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

export const setUserBan = (userId: string, banned: boolean, reason?: string) =>
  api.post<{ id: string; banned: boolean }>(`/admin/users/${encodeURIComponent(userId)}/ban`, { banned, ...(reason ? { reason } : {}) });

export function useSetUserBan() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ userId, banned, reason }: { userId: string; banned: boolean; reason?: string }) => setUserBan(userId, banned, reason),
    onSuccess: () => qc.invalidateQueries({ queryKey: ['admin', 'users'] }),
  });
}
