import { Link, useParams, type LoaderFunctionArgs } from 'react-router';
import { queryClient } from '@/lib/query-client';
import { getTeamQueryOptions, useTeam } from '@/features/teams/api/get-team';
import { useUser } from '@/features/me/api/get-me';
import { InviteForm } from '@/features/teams/components/invite-form';
import { InvitationsList } from '@/features/teams/components/invitations-list';
import { ApiKeysPanel } from '@/features/teams/components/api-keys-panel';
import { TeamEntries } from '@/features/entries/components/team-entries';
import { formatDate } from '@/lib/format';
import { Badge, EmptyState, ErrorState, isTrack, PageHeader, PageLoading, Panel, Table, Td, Th, TrackBadge } from '@/components/ui';
import { useDocumentTitle } from '@/lib/use-document-title';
import { FollowButton } from '@/features/follows/components/follow-button';

export async function loader({ params }: LoaderFunctionArgs) {
  void queryClient.prefetchQuery(getTeamQueryOptions(params.teamId!));
  return null;
}

export function Component() {
  const { teamId = '' } = useParams();
  const q = useTeam(teamId);
  useDocumentTitle(q.data?.name ?? 'Team');
  const { teams } = useUser();
  const myRole = teams.find((t) => t.id === teamId)?.role;

  if (q.isPending) return <PageLoading label="Loading the team…" />;
  if (q.isError) return <ErrorState error={q.error} retry={() => q.refetch()}><Link to="/teams">See all teams</Link></ErrorState>;
  const t = q.data;
  return (
    <div>
      <PageHeader
        kicker={<Link to="/teams">Teams</Link>}
        title={t.name}
        actions={<span className="flex flex-wrap items-center gap-2">{myRole && <Badge tone="ok">you are {myRole === 'lead' ? 'a team lead' : 'a member'}</Badge>}<FollowButton subjectType="team" subjectId={t.id} name={t.name} /></span>}
      >
        <div className="flex flex-wrap items-center gap-3">
          {isTrack(t.track) && <TrackBadge track={t.track} />}
          <span className="text-sm">since {formatDate(t.createdAt)}</span>
        </div>
        {t.description && <p className="mt-2">{t.description}</p>}
      </PageHeader>
      <div className="grid grid-cols-1 items-start gap-6 lg:grid-cols-[minmax(0,1fr)_minmax(0,1fr)]">
        <Panel title="Members" description={<span className="num">{t.members.length} {t.members.length === 1 ? 'person' : 'people'}</span>}>
          {t.members.length === 0 ? (
            <EmptyState title="No members">This team has no members.</EmptyState>
          ) : (
            <Table data-testid="members">
              <thead>
                <tr><Th>Name</Th><Th>Role</Th><Th num>Since</Th></tr>
              </thead>
              <tbody>
                {t.members.map((m, i) => (
                  <tr key={`${m.name}-${i}`}>
                    <Td>{m.name}</Td>
                    <Td>{m.role === 'lead' ? <Badge>lead</Badge> : 'member'}</Td>
                    <Td num className="whitespace-nowrap">{formatDate(m.since)}</Td>
                  </tr>
                ))}
              </tbody>
            </Table>
          )}
        </Panel>
        <Panel title="Entries" description="Estimates this team has posted, by challenge." className="lg:col-span-2" id="team-entries">
          <TeamEntries teamId={t.id} />
        </Panel>
        {myRole === 'lead' && (
          <Panel title="Invite someone" description="They get a mail with a link to accept.">
            <InviteForm teamId={t.id} />
            <h3 className="mt-6 mb-2 text-base font-semibold">Invitations</h3>
            <InvitationsList teamId={t.id} />
          </Panel>
        )}
        {myRole === 'lead' && (
          <Panel title="API keys" description="For scripts that post estimates on behalf of the team." className="lg:col-span-2">
            <ApiKeysPanel teamId={t.id} />
          </Panel>
        )}
      </div>
    </div>
  );
}
