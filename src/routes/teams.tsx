import { Link } from 'react-router';
import { queryClient } from '@/lib/query-client';
import { getTeamsQueryOptions, useTeams } from '@/features/teams/api/get-teams';
import { useUser } from '@/features/me/api/get-me';
import { CreateTeamForm } from '@/features/teams/components/create-team-form';
import { EmptyState, ErrorState, isTrack, PageHeader, PageLoading, Panel, TrackBadge } from '@/components/ui';
import { useDocumentTitle } from '@/lib/use-document-title';

export async function loader() {
  void queryClient.prefetchQuery(getTeamsQueryOptions());
  return null;
}

export function Component() {
  useDocumentTitle('Teams');
  const q = useTeams();
  const { user } = useUser();
  return (
    <div>
      <PageHeader title="Teams">
        <p>The groups posting estimates, on the quantum-hardware track or the classical-simulation track.</p>
      </PageHeader>
      <div className="grid grid-cols-1 gap-8 lg:grid-cols-[minmax(0,1fr)_22rem]">
        <section aria-label="All teams">
          {q.isPending ? (
            <PageLoading label="Loading the teams…" />
          ) : q.isError ? (
            <ErrorState error={q.error} retry={() => q.refetch()} />
          ) : q.data.teams.length === 0 ? (
            <EmptyState title="No teams yet">The first team to sign up will appear here.</EmptyState>
          ) : (
            <ul className="divide-y divide-rule border-b border-rule" data-testid="team-list">
              {q.data.teams.map((t) => (
                <li key={t.id} className="py-4 first:pt-0">
                  <div className="flex flex-wrap items-baseline justify-between gap-x-3 gap-y-1">
                    <h2 className="text-lg font-medium">
                      <Link to={`/teams/${t.id}`} className="no-underline hover:underline">{t.name}</Link>
                    </h2>
                    <span className="flex items-center gap-3 text-sm text-ink-soft">
                      {isTrack(t.track) && <TrackBadge track={t.track} />}
                      <span className="num">{t.members} {t.members === 1 ? 'member' : 'members'}</span>
                    </span>
                  </div>
                  {t.description && <p className="mt-1 text-ink-soft">{t.description}</p>}
                </li>
              ))}
            </ul>
          )}
        </section>
        <aside id="create">
          {user?.emailVerified ? (
            <Panel title="Create a team" description="You become its lead and can invite others.">
              <CreateTeamForm />
            </Panel>
          ) : user ? (
            <EmptyState title="Confirm your address to create a team">Open the link in your confirmation mail first.</EmptyState>
          ) : (
            <EmptyState title="Start a team" action={<Link to="/sign-in?next=/teams">Sign in to create one</Link>}>
              Signed-in members with a confirmed address can create a team and invite colleagues.
            </EmptyState>
          )}
        </aside>
      </div>
    </div>
  );
}
