import type { LoaderFunctionArgs } from 'react-router';
import { requireUser } from '@/lib/guards';
import { queryClient } from '@/lib/query-client';
import { PageHeader } from '@/components/ui';
import { getQueueQueryOptions } from '@/features/moderation/api/get-queue';
import { ModerationNav } from '@/features/moderation/components/moderation-nav';
import { ReviewQueue } from '@/features/moderation/components/review-queue';
import { useDocumentTitle } from '@/lib/use-document-title';

export async function loader({ request }: LoaderFunctionArgs) {
  await requireUser(request, ['moderator', 'admin']);
  await queryClient.prefetchQuery(getQueueQueryOptions());
  return null;
}

export function Component() {
  useDocumentTitle('Moderation');
  return (
    <div>
      <PageHeader title="Moderation">Entries in review with their automatic checks; challenges; the audit log.</PageHeader>
      <ModerationNav />
      <ReviewQueue />
    </div>
  );
}
