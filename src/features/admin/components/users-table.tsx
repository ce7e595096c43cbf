import { useMemo, useState } from 'react';
import {
  columnFilteringFeature,
  createColumnHelper,
  createFilteredRowModel,
  createSortedRowModel,
  filterFn_equals,
  filterFn_includesString,
  rowSortingFeature,
  sortFn_alphanumeric,
  sortFn_datetime,
  sortFn_text,
  tableFeatures,
  useTable,
} from '@tanstack/react-table';
import type { AdminUser } from '@/features/admin/api/get-users';
import { useSetUserRole } from '@/features/admin/api/set-user-role';
import { useSetUserBan } from '@/features/admin/api/set-user-ban';
import type { SiteRole } from '@/features/me/api/get-me';
import { errorMessage } from '@/lib/api-client';
import { formatDate } from '@/lib/format';
import { Badge, Button, FormMessage, cx, inputClass } from '@/components/ui';

const features = tableFeatures({
  rowSortingFeature,
  columnFilteringFeature,
  sortedRowModel: createSortedRowModel(),
  filteredRowModel: createFilteredRowModel(),
  sortFns: { alphanumeric: sortFn_alphanumeric, text: sortFn_text, datetime: sortFn_datetime },
  filterFns: { includesString: filterFn_includesString, equals: filterFn_equals },
});
const helper = createColumnHelper<typeof features, AdminUser>();

function RoleCell({ u, selfId }: { u: AdminUser; selfId: string }) {
  const m = useSetUserRole();
  return (
    <div>
      <select
        aria-label={`Role of ${u.name}`}
        className={inputClass(false, 'w-32', true)}
        value={m.isPending ? m.variables.role : u.role}
        disabled={m.isPending || u.id === selfId}
        title={u.id === selfId ? 'You cannot change your own role' : undefined}
        onChange={(e) => m.mutate({ userId: u.id, role: e.target.value as SiteRole })}
      >
        <option value="user">user</option>
        <option value="moderator">moderator</option>
        <option value="admin">admin</option>
      </select>
      {m.isError && <p className="mt-1 text-xs text-danger">{errorMessage(m.error)}</p>}
    </div>
  );
}

function BanCell({ u, selfId }: { u: AdminUser; selfId: string }) {
  const m = useSetUserBan();
  if (u.id === selfId) return <span className="text-xs text-ink-faint">you</span>;
  return (
    <div>
      <Button
        size="sm"
        variant={u.banned ? 'secondary' : 'danger'}
        busy={m.isPending}
        onClick={() => {
          if (u.banned) return m.mutate({ userId: u.id, banned: false });
          const reason = window.prompt(`Ban ${u.name}? Their sessions end at once. Reason (kept in the audit log):`, '');
          if (reason === null) return;
          m.mutate({ userId: u.id, banned: true, reason: reason.trim() || undefined });
        }}
      >
        {u.banned ? 'Lift ban' : 'Ban'}
      </Button>
      {m.isError && <p className="mt-1 text-xs text-danger">{errorMessage(m.error)}</p>}
    </div>
  );
}

export function UsersTable({ users, selfId }: { users: AdminUser[]; selfId: string }) {
  const [roleFilter, setRoleFilter] = useState<string>('');
  const columns = useMemo(
    () =>
      helper.columns([
        helper.accessor('name', { header: 'Name', sortFn: 'text', filterFn: 'includesString' }),
        helper.accessor('email', { header: 'E-mail', sortFn: 'text', cell: (c) => <span className="break-all">{c.getValue()}</span> }),
        helper.accessor('emailVerified', {
          header: 'Confirmed',
          enableSorting: true,
          cell: (c) => (c.getValue() ? <Badge tone="ok">yes</Badge> : <Badge>no</Badge>),
        }),
        helper.accessor('role', { header: 'Role', filterFn: 'equals', sortFn: 'text', cell: (c) => <RoleCell u={c.row.original} selfId={selfId} /> }),
        helper.accessor('banned', { header: 'Access', cell: (c) => <div className="flex items-center gap-2">{c.getValue() && <Badge tone="danger">banned</Badge>}<BanCell u={c.row.original} selfId={selfId} /></div> }),
        helper.accessor('createdAt', { header: 'Joined', sortFn: 'datetime', cell: (c) => <span className="num whitespace-nowrap">{formatDate(c.getValue())}</span> }),
      ]),
    [selfId],
  );
  const [sorting, setSorting] = useState([{ id: 'createdAt', desc: true }]);
  const columnFilters = useMemo(() => (roleFilter ? [{ id: 'role', value: roleFilter }] : []), [roleFilter]);
  const table = useTable({
    features,
    columns,
    data: users,
    getRowId: (r) => r.id,
    state: { sorting, columnFilters },
    onSortingChange: (u) => setSorting((s) => (typeof u === 'function' ? u(s) : u) as typeof s),
  });
  const rows = table.getRowModel().rows;

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center gap-2 text-sm">
        <span className="text-ink-soft">Show</span>
        {(['', 'user', 'moderator', 'admin'] as const).map((r) => (
          <button
            key={r || 'all'}
            type="button"
            aria-pressed={roleFilter === r}
            onClick={() => setRoleFilter(r)}
            className={cx('rounded border px-2 py-0.5', roleFilter === r ? 'border-ink bg-ink text-paper' : 'border-rule-strong bg-paper-raised hover:border-ink')}
          >
            {r ? `${r}s` : 'all'}
          </button>
        ))}
        <span className="num ml-auto text-ink-soft">{rows.length} of {users.length}</span>
      </div>
      <div className="-mx-4 overflow-x-auto px-4 sm:mx-0 sm:px-0">
        <table className="w-full min-w-[44rem] border-collapse text-sm" data-testid="users-table">
          <thead>
            {table.getHeaderGroups().map((g) => (
              <tr key={g.id}>
                {g.headers.map((h) => {
                  const sorted = h.column.getIsSorted();
                  return (
                    <th key={h.id} scope="col" aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : undefined} className="border-b border-rule-strong px-2 py-2 text-left text-xs font-semibold tracking-wide text-ink-soft first:pl-0">
                      {h.column.getCanSort() ? (
                        <button type="button" onClick={h.column.getToggleSortingHandler()} className="inline-flex items-center gap-1 hover:text-ink">
                          <table.FlexRender header={h} />
                          <span aria-hidden="true" className="w-2 text-ink">{sorted === 'asc' ? '↑' : sorted === 'desc' ? '↓' : ''}</span>
                        </button>
                      ) : (
                        <table.FlexRender header={h} />
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {rows.map((r) => (
              <tr key={r.id} className={cx(r.original.banned && 'bg-danger-soft/40')}>
                {r.getAllCells().map((c) => (
                  <td key={c.id} className="border-b border-rule px-2 py-2 align-middle first:pl-0">
                    <table.FlexRender cell={c} />
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {rows.length === 0 && <FormMessage tone="info">No users match this filter.</FormMessage>}
    </div>
  );
}
