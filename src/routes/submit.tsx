import { useLoaderData, type LoaderFunctionArgs } from 'react-router';
import { queryClient } from '@/lib/query-client';
import { requireUser } from '@/lib/guards';
import { getChallengeQueryOptions, useChallenge } from '@/features/challenges/api/get-challenge';
import { getTargetsQueryOptions, useTargets } from '@/features/challenges/api/get-targets';
import { getEntryQueryOptions } from '@/features/entries/api/get-entry';
import { useUser } from '@/features/me/api/get-me';
import { ErrorState, PageLoading } from '@/components/ui';
import { SubmitPage } from '@/features/submit/components/submit-page';

export async function loader({ request, params }: LoaderFunctionArgs) {
  await requireUser(request);
  const slug = String(params.slug);
  const entryId = new URL(request.url).searchParams.get('entry');
  const [, , entry] = await Promise.all([
    queryClient.ensureQueryData(getChallengeQueryOptions(slug)),
    queryClient.ensureQueryData(getTargetsQueryOptions(slug)),
    // a fresh copy: the form starts from the stored document
    entryId ? queryClient.fetchQuery({ ...getEntryQueryOptions(entryId), staleTime: 0 }) : null,
  ]);
  return { slug, entry };
}

export function Component() {
  const { slug, entry } = useLoaderData<typeof loader>();
  const c = useChallenge(slug);
  const t = useTargets(slug);
  const { teams } = useUser();
  if (c.isPending || t.isPending) return <PageLoading />;
  if (c.isError) return <ErrorState error={c.error} retry={() => c.refetch()} />;
  if (t.isError) return <ErrorState error={t.error} retry={() => t.refetch()} />;
  // a new key per resumed entry, so the form starts from its document
  return <SubmitPage key={entry?.id ?? 'new'} challenge={c.data} targets={t.data.targets} teams={teams} entry={entry} receivedAt={c.dataUpdatedAt} />;
}
