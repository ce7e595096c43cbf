import { isRouteErrorResponse, Link, useRouteError } from 'react-router';
import { ErrorState } from '@/components/ui';
import { ApiError } from '@/lib/api-client';

export function RouteError() {
  const error = useRouteError();
  if (isRouteErrorResponse(error)) {
    const e = new ApiError({ status: error.status, code: String(error.status), message: typeof error.data === 'string' ? error.data : error.statusText });
    return (
      <div className="mx-auto max-w-prose py-6">
        <ErrorState error={e} />
        <p className="mt-4 text-sm"><Link to="/">Back to the challenges</Link></p>
      </div>
    );
  }
  return (
    <div className="mx-auto max-w-prose py-6">
      <ErrorState error={error} retry={() => window.location.reload()} />
      <p className="mt-4 text-sm"><Link to="/">Back to the challenges</Link></p>
    </div>
  );
}
