import { QueryClientProvider } from '@tanstack/react-query';
import { RouterProvider } from 'react-router';
import { queryClient } from '@/lib/query-client';
import { setUnauthenticatedHandler } from '@/lib/api-client';
import { meQueryKey } from '@/features/me/api/get-me';
import { router } from './router';

// one place that reacts to a lost session: the me-query is refetched and the header follows
setUnauthenticatedHandler(() => {
  void queryClient.invalidateQueries({ queryKey: meQueryKey });
});

export function App() {
  return (
    <QueryClientProvider client={queryClient}>
      <RouterProvider router={router} />
    </QueryClientProvider>
  );
}
