import { Link, useParams, type LoaderFunctionArgs } from 'react-router';
import { queryClient } from '@/lib/query-client';
import { getChallengesQueryOptions, useChallenges } from '@/features/challenges/api/get-challenges';
import { EmptyState, ErrorState, PageHeader, PageLoading } from '@/components/ui';

export async function loader(_: LoaderFunctionArgs) {
  void queryClient.prefetchQuery(getChallengesQueryOptions());
  return null;
}

export function Component() {
  const { slug = '' } = useParams();
  const q = useChallenges();
  if (q.isPending) return <PageLoading />;
  if (q.isError) return <ErrorState error={q.error} retry={() => q.refetch()} />;
  const c = q.data.challenges.find((x) => x.slug === slug);
  if (!c)
    return (
      <EmptyState title="This challenge was not found">
        <p>No published challenge has the slug <code>{slug}</code>. <Link to="/">See all challenges</Link>.</p>
      </EmptyState>
    );
  return (
    <div>
      <PageHeader kicker={<Link to="/">Challenges</Link>} title={c.title}>
        <p>{c.summary}</p>
      </PageHeader>
      <EmptyState title="The full challenge page is coming">
        Instances, exact references, standings and plots for <strong>{c.title}</strong> will appear here.
      </EmptyState>
    </div>
  );
}
