import { Link, useLocation } from 'react-router';
import { EmptyState } from '@/components/ui';
import { useDocumentTitle } from '@/lib/use-document-title';

export function Component() {
  useDocumentTitle('Page not found');
  const { pathname } = useLocation();
  return (
    <EmptyState title="There is no page here" className="mx-auto max-w-prose">
      <p>Nothing lives at <code>{pathname}</code>. <Link to="/">Go to the challenges</Link> or <Link to="/teams">the teams</Link>.</p>
    </EmptyState>
  );
}
