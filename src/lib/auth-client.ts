import { createAuthClient } from 'better-auth/react';
import { adminClient, organizationClient } from 'better-auth/client/plugins';

/** better-auth's client, on the same origin (cookies, Origin header and all). */
export const authClient = createAuthClient({
  baseURL: typeof window !== 'undefined' ? window.location.origin : undefined,
  basePath: '/api/auth',
  fetchOptions: { credentials: 'include' },
  plugins: [organizationClient(), adminClient()],
});
