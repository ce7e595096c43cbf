import { useState } from 'react';
import { Link, type LoaderFunctionArgs } from 'react-router';
import { requireUser } from '@/lib/guards';
import { queryClient } from '@/lib/query-client';
import { getOutboxQueryOptions, useOutbox } from '@/features/admin/api/get-outbox';
import { formatDateTime } from '@/lib/format';
import { EmptyState, ErrorState, inputClass, PageHeader, PageLoading } from '@/components/ui';

export async function loader({ request }: LoaderFunctionArgs) {
  await requireUser(request, ['admin']);
  void queryClient.prefetchQuery(getOutboxQueryOptions(''));
  return null;
}

export function Component() {
  const [to, setTo] = useState('');
  const q = useOutbox(to.trim());
  return (
    <div>
      <PageHeader title="Outbox" kicker={<Link to="/admin">Admin</Link>}>
        <p>Mail caught by the local mail server, newest first. Links in a message work when opened here.</p>
      </PageHeader>
      <div className="mb-4">
        <label htmlFor="outbox-to" className="sr-only">Filter by recipient</label>
        <input id="outbox-to" type="search" placeholder="Filter by recipient" value={to} onChange={(e) => setTo(e.target.value)} className={inputClass(false, 'max-w-sm')} />
      </div>
      {q.isPending ? (
        <PageLoading label="Loading the outbox…" />
      ) : q.isError ? (
        <ErrorState error={q.error} retry={() => q.refetch()} />
      ) : q.data.messages.length === 0 ? (
        <EmptyState title={to ? 'No mail to this address' : 'The outbox is empty'}>Sign-ups, password resets and invitations send mail here.</EmptyState>
      ) : (
        <ul className="divide-y divide-rule border-y border-rule" data-testid="outbox-list">
          {q.data.messages.map((m) => (
            <li key={m.id}>
              <Link to={`/admin/outbox/${m.id}`} className="grid gap-x-4 gap-y-0.5 py-3 no-underline hover:bg-paper-sunk sm:grid-cols-[minmax(0,14rem)_minmax(0,1fr)_auto] sm:px-2">
                <span className="truncate text-sm text-ink-soft">{m.to}</span>
                <span className="truncate font-medium">{m.subject || '(no subject)'}</span>
                <span className="num text-xs whitespace-nowrap text-ink-faint sm:text-sm">{formatDateTime(m.receivedAt)}</span>
              </Link>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
