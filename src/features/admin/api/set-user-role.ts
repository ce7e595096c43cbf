import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import type { SiteRole } from '@/features/me/api/get-me';

export const setUserRole = (userId: string, role: SiteRole) =>
  api.post<{ id: string; role: SiteRole }>(`/admin/users/${encodeURIComponent(userId)}/role`, { role });

export function useSetUserRole() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ userId, role }: { userId: string; role: SiteRole }) => setUserRole(userId, role),
    onSuccess: () => qc.invalidateQueries({ queryKey: ['admin', 'users'] }),
  });
}
