import type { QueryClient } from '@tanstack/react-query';
import { authClient } from '@/lib/auth-client';
import { meQueryKey } from '@/features/me/api/get-me';

/** Public data survives a sign-out; everything that belonged to the signed-in user is dropped. */
const isPublic = (key: readonly unknown[]) =>
  key[0] === 'challenges' || (key[0] === 'teams' && key.length <= 2);

/** Ends the session, forgets the user's data, and asks the server again who we are. */
export async function signOut(qc: QueryClient) {
  await authClient.signOut().catch(() => undefined);
  qc.removeQueries({ predicate: (q) => !isPublic(q.queryKey) && q.queryKey[0] !== meQueryKey[0] });
  await qc.resetQueries({ queryKey: meQueryKey });
}
