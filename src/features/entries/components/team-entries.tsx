import { Link } from 'react-router';
import { useTeamEntries } from '@/features/entries/api/get-team-entries';
import { formatDate, formatPercent } from '@/lib/format';
import { Badge, EmptyState, ErrorState, PageLoading, Table, Td, Th, TrackMark, isTrack } from '@/components/ui';

/** a team's entries (published and superseded for visitors; all states for its members) and the tracks they are in */
export function TeamEntries({ teamId }: { teamId: string }) {
  const q = useTeamEntries(teamId);
  if (q.isPending) return <PageLoading label="Loading the entries…" />;
  if (q.isError) return <ErrorState error={q.error} retry={() => q.refetch()} />;
  const es = q.data.entries;
  if (!es.length) return <EmptyState title="No entries yet">When this team's entries are published they are listed here.</EmptyState>;
  const tracks = [...new Set(es.map((e) => e.track))].filter(isTrack);
  return (
    <div>
      <p className="mb-2 flex flex-wrap items-center gap-3 text-sm text-ink-soft">
        Tracks:
        {tracks.map((t) => <span key={t} className="inline-flex items-center gap-1"><TrackMark track={t} />{t}</span>)}
      </p>
      <Table data-testid="team-entries" aria-label="Entries of this team">
        <thead>
          <tr><Th>Entry</Th><Th>Challenge</Th><Th>State</Th><Th num>Grid</Th><Th num>Published</Th></tr>
        </thead>
        <tbody>
          {es.map((e) => (
            <tr key={e.id}>
              <Td>
                <span className="inline-flex items-center gap-1.5"><TrackMark track={e.track} /><Link to={`/entries/${encodeURIComponent(e.id)}`}>{e.label}</Link></span>
                <span className="block text-xs text-ink-soft">{e.methodFamily}{e.revision > 1 ? ` · revision ${e.revision}` : ''}</span>
              </Td>
              <Td><Link to={`/challenges/${encodeURIComponent(e.challenge.slug)}`}>{e.challenge.slug}</Link> <span className="num text-xs text-ink-soft">v{e.challenge.version}</span></Td>
              <Td><Badge tone={e.state === 'published' ? 'ok' : e.state === 'rejected' ? 'danger' : 'neutral'}>{e.state}</Badge></Td>
              <Td num>{formatPercent(e.coverage.fraction)}</Td>
              <Td num className="whitespace-nowrap">{formatDate(e.publishedAt)}</Td>
            </tr>
          ))}
        </tbody>
      </Table>
    </div>
  );
}
