import type { LoaderFunctionArgs } from 'react-router';
import { requireUser } from '@/lib/guards';
import { EmptyState, PageHeader } from '@/components/ui';

export async function loader({ request }: LoaderFunctionArgs) {
  await requireUser(request, ['moderator', 'admin']);
  return null;
}

export function Component() {
  return (
    <div>
      <PageHeader title="Moderation" />
      <EmptyState title="The review queue is coming">Entries waiting for review, disputes and sealed references will be listed here.</EmptyState>
    </div>
  );
}
