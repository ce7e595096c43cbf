import { useParams } from 'react-router';
import { EmptyState } from '@/components/ui';

export function Component() {
  const { entryId = '' } = useParams();
  return <EmptyState title="Entry">{entryId}</EmptyState>;
}
