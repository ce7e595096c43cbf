import type { LoaderFunctionArgs } from 'react-router';
import { requireUser } from '@/lib/guards';
import { PageHeader } from '@/components/ui';
import { ModerationNav } from '@/features/moderation/components/moderation-nav';
import { AuditTable } from '@/features/moderation/components/audit-table';

export async function loader({ request }: LoaderFunctionArgs) {
  await requireUser(request, ['moderator', 'admin']);
  return null;
}

export function Component() {
  return (
    <div>
      <PageHeader title="Moderation">Entries in review with their automatic checks; challenges; the audit log.</PageHeader>
      <ModerationNav />
      <AuditTable />
    </div>
  );
}
