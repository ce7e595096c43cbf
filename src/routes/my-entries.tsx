import { useState } from 'react';
import { useNavigate, useSearchParams, type LoaderFunctionArgs } from 'react-router';
import { requireUser } from '@/lib/guards';
import { queryClient } from '@/lib/query-client';
import { getMeQueryOptions, useUser } from '@/features/me/api/get-me';
import { getChallengesQueryOptions, useChallenges } from '@/features/challenges/api/get-challenges';
import { Button, EmptyState, FormMessage, PageHeader, inputClass } from '@/components/ui';
import { TeamEntries } from '@/features/submit/components/my-entries';
import { useDocumentTitle } from '@/lib/use-document-title';

export async function loader({ request }: LoaderFunctionArgs) {
  await requireUser(request);
  await Promise.all([queryClient.ensureQueryData(getMeQueryOptions()), queryClient.prefetchQuery(getChallengesQueryOptions())]);
  return null;
}

function StartEntry() {
  const q = useChallenges();
  const navigate = useNavigate();
  const open = (q.data?.challenges ?? []).filter((c) => c.state === 'open');
  const [slug, setSlug] = useState('');
  return (
    <form className="flex flex-wrap items-center gap-2" onSubmit={(e) => { e.preventDefault(); if (slug) navigate(`/challenges/${slug}/submit`); }}>
      <select aria-label="Challenge for a new entry" value={slug} onChange={(e) => setSlug(e.target.value)} className={inputClass(false, 'max-w-72 pr-8', true)}>
        <option value="">choose a challenge…</option>
        {open.map((c) => <option key={c.slug} value={c.slug}>{c.title}</option>)}
      </select>
      <Button size="sm" type="submit" disabled={!slug}>New entry</Button>
    </form>
  );
}

export function Component() {
  useDocumentTitle('Your entries');
  const { teams } = useUser();
  const [search] = useSearchParams();
  const submitted = search.get('submitted');
  return (
    <div>
      <PageHeader title="My entries" actions={teams.length > 0 && <StartEntry />}>
        Drafts, entries in review and published entries of your teams.
      </PageHeader>
      {submitted && <div className="mb-4"><FormMessage tone="ok">Submitted for review. A moderator looks at it next; you get an e-mail with the decision.</FormMessage></div>}
      {teams.length === 0 ? (
        <EmptyState title="You are in no team yet">Entries belong to teams: create one or accept an invitation on the Teams page.</EmptyState>
      ) : (
        <div className="space-y-6">{teams.map((t) => <TeamEntries key={t.id} team={t} />)}</div>
      )}
    </div>
  );
}
