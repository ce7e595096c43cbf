import { useDeferredValue, useState } from 'react';
import { Link, type LoaderFunctionArgs } from 'react-router';
import { requireUser } from '@/lib/guards';
import { queryClient } from '@/lib/query-client';
import { getUsersQueryOptions, useUsers } from '@/features/admin/api/get-users';
import { UsersTable } from '@/features/admin/components/users-table';
import { useUser } from '@/features/me/api/get-me';
import { EmptyState, ErrorState, inputClass, PageHeader, PageLoading, Spinner } from '@/components/ui';
import { useDocumentTitle } from '@/lib/use-document-title';

export async function loader({ request }: LoaderFunctionArgs) {
  await requireUser(request, ['admin']);
  await queryClient.ensureQueryData(getUsersQueryOptions(''));
  return null;
}

export function Component() {
  useDocumentTitle('Administration');
  const [q, setQ] = useState('');
  const deferred = useDeferredValue(q.trim());
  const users = useUsers(deferred);
  const { user } = useUser();
  return (
    <div>
      <PageHeader title="Admin" kicker="Site administration" actions={<Link to="/admin/outbox">Outbox</Link>}>
        <p>Users, their roles and access. Every change is written to the audit log.</p>
      </PageHeader>
      <div className="mb-4 flex items-center gap-3">
        <label htmlFor="user-search" className="sr-only">Search users</label>
        <input id="user-search" type="search" placeholder="Search by name or e-mail" value={q} onChange={(e) => setQ(e.target.value)} className={inputClass(false, 'max-w-sm')} />
        {users.isFetching && <Spinner size="sm" label="" />}
      </div>
      {users.isPending ? (
        <PageLoading />
      ) : users.isError ? (
        <ErrorState error={users.error} retry={() => users.refetch()} />
      ) : users.data.users.length === 0 ? (
        <EmptyState title="No users match">Nobody’s name or e-mail contains “{deferred}”.</EmptyState>
      ) : (
        <UsersTable users={users.data.users} selfId={user?.id ?? ''} />
      )}
    </div>
  );
}
