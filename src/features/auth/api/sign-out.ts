import type { QueryClient } from '@tanstack/react-query';
import { authClient } from '@/lib/auth-client';
import { meQueryKey } from '@/features/me/api/get-me';

/** Ends the session, then forgets everything that was specific to the signed-in user. */
export async function signOut(qc: QueryClient) {
  await authClient.signOut().catch(() => undefined);
  qc.removeQueries({ predicate: (q) => q.queryKey[0] !== 'challenges' && q.queryKey[0] !== 'teams' });
  await qc.invalidateQueries({ queryKey: meQueryKey });
}
