import { useMutation, useQueryClient } from '@tanstack/react-query';
import { authCall } from '@/lib/api-client';
import { authClient } from '@/lib/auth-client';
import { meQueryKey } from '@/features/me/api/get-me';
import { teamsQueryKey, type Track } from './get-teams';

export interface CreateTeamInput {
  name: string;
  slug: string;
  track: Track;
  description: string;
}

export const createTeam = (input: CreateTeamInput) =>
  authCall(
    authClient.organization.create({
      name: input.name,
      slug: input.slug,
      metadata: { track: input.track, ...(input.description ? { description: input.description } : {}) },
    }),
  );

export function useCreateTeam() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: createTeam,
    onSuccess: async () => {
      await Promise.all([qc.invalidateQueries({ queryKey: teamsQueryKey, exact: true }), qc.invalidateQueries({ queryKey: meQueryKey })]);
    },
  });
}

/** "Cobalt Qubit Lab" → "cobalt-qubit-lab" */
export function slugify(name: string): string {
  return name
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 48);
}
