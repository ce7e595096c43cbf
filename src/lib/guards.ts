import { redirect } from 'react-router';
import { queryClient } from './query-client';
import { getMeQueryOptions, type MeUser, type SiteRole } from '@/features/me/api/get-me';

/** only same-site paths are followed after sign-in */
export function safeNext(next: string | null | undefined, fallback = '/'): string {
  if (!next || !next.startsWith('/') || next.startsWith('//') || next.startsWith('/\\')) return fallback;
  return next;
}

/** In a loader: the signed-in user, or a redirect to sign-in that comes back here afterwards. */
export async function requireUser(request: Request, roles?: SiteRole[]): Promise<MeUser> {
  const me = await queryClient.ensureQueryData(getMeQueryOptions());
  if (me.kind !== 'user') {
    const u = new URL(request.url);
    throw redirect(`/sign-in?next=${encodeURIComponent(u.pathname + u.search)}`);
  }
  if (roles && !roles.includes(me.user.role)) {
    throw new Response('This page is for ' + roles.join(' or ') + ' accounts.', { status: 403, statusText: 'Forbidden' });
  }
  return me.user;
}
