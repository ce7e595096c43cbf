import { Link } from 'react-router';
import type { ChallengeDetail } from '@/features/challenges/api/get-challenge';
import { useHistory } from '@/features/challenges/api/get-history';
import { useStandings } from '@/features/standings/api/get-standings';
import { formatDateTime } from '@/lib/format';
import { Badge, EmptyState, ErrorState, PageLoading, Panel, type BadgeTone } from '@/components/ui';

const KIND: Record<string, { label: string; tone: BadgeTone }> = {
  version: { label: 'version', tone: 'ok' },
  superseded: { label: 'superseded', tone: 'neutral' },
  references: { label: 'references', tone: 'exact' },
  standings: { label: 'standings', tone: 'consensus' },
  engine: { label: 'engine change', tone: 'exact' },
};

export default function HistorySection({ c }: { c: ChallengeDetail }) {
  const q = useHistory(c.slug);
  // entry events carry the entry id: name the entry from the standings where it is ranked
  const st = useStandings(c.slug, { track: 'all' });
  const labels = new Map((st.data?.entries ?? []).map((e) => [e.id, e.label]));
  if (q.isPending) return <PageLoading label="Loading the history…" />;
  if (q.isError) return <ErrorState error={q.error} retry={() => q.refetch()} />;
  const ev = q.data.events;
  return (
    <Panel title="History" id="history" description="Versions, reference computations, standings recomputations, reference-engine changes and public moderation events, newest first. Nothing is edited in place: every change is an event here.">
      {ev.length === 0 ? (
        <EmptyState title="No events yet" />
      ) : (
        <ol className="relative space-y-4 border-l border-rule pl-5" data-testid="history">
          {ev.map((e, i) => {
            const k = KIND[e.kind] ?? { label: e.kind.replace('.', ' '), tone: e.kind.includes('dispute') ? 'disputed' : 'neutral' as BadgeTone };
            const asOf = typeof e.details?.asOf === 'string' ? e.details.asOf : null;
            return (
              <li key={`${e.at}-${i}`} className="relative">
                <span className="absolute top-1.5 -left-[1.6rem] h-2 w-2 rounded-full bg-ink-faint ring-4 ring-paper-raised" aria-hidden="true" />
                <div className="flex flex-wrap items-center gap-2 text-sm">
                  <time className="num text-ink-soft" dateTime={e.at}>{formatDateTime(e.at)}</time>
                  <Badge tone={k.tone}>{k.label}</Badge>
                </div>
                <p className="mt-0.5">
                  {e.summary}
                  {e.kind.startsWith('entry.') && typeof e.details?.subject === 'string' && (
                    <>: <Link to={`/entries/${encodeURIComponent(e.details.subject)}`}>{labels.get(e.details.subject) ?? 'the entry'}</Link></>
                  )}
                </p>
                {asOf && (
                  <Link className="text-sm" to={`/challenges/${encodeURIComponent(c.slug)}?asOf=${encodeURIComponent(asOf)}`}>
                    standings as of this recomputation
                  </Link>
                )}
              </li>
            );
          })}
        </ol>
      )}
    </Panel>
  );
}
