import { lazy, Suspense, type ComponentType } from 'react';
import { Link, useParams, useSearchParams, type LoaderFunctionArgs } from 'react-router';
import { queryClient } from '@/lib/query-client';
import { getChallengeQueryOptions, useChallenge, type ChallengeDetail } from '@/features/challenges/api/get-challenge';
import { getStandingsQueryOptions } from '@/features/standings/api/get-standings';
import { StandingsSection } from '@/features/standings/components/standings-section';
import { SpecSection } from '@/features/challenges/components/spec-section';
import { SubmissionsStatusLine, SubmitEntryButton } from '@/features/challenges/components/submissions-status';
import { formatDate } from '@/lib/format';
import { useDocumentTitle } from '@/lib/use-document-title';
import { CopyButton, ErrorState, PageHeader, PageLoading, Tabs } from '@/components/ui';
import { FollowButton } from '@/features/follows/components/follow-button';
import { ChecksumNote } from '@/features/api-docs/checksum-note';

// the chart views (and nivo with them) load when a visitor opens them
const SweepSection = lazy(() => import('@/features/challenges/components/sweep-section'));
const AgreementSection = lazy(() => import('@/features/challenges/components/agreement-section'));
const CostSection = lazy(() => import('@/features/challenges/components/cost-section'));
const VerifiabilitySection = lazy(() => import('@/features/challenges/components/verifiability-section'));
const HistorySection = lazy(() => import('@/features/challenges/components/history-section'));
const ExportsSection = lazy(() => import('@/features/challenges/components/exports-section'));

export async function loader({ params }: LoaderFunctionArgs) {
  const slug = params.slug!;
  void queryClient.prefetchQuery(getChallengeQueryOptions(slug));
  void queryClient.prefetchQuery(getStandingsQueryOptions(slug, { track: 'all' }));
  return null;
}

const TABS = [
  { id: 'standings', label: 'Standings' },
  { id: 'spec', label: 'Specification' },
  { id: 'sweep', label: 'Sweep plot' },
  { id: 'agreement', label: 'Agreement' },
  { id: 'cost', label: 'Accuracy vs cost' },
  { id: 'verifiability', label: 'Verifiability' },
  { id: 'history', label: 'History' },
  { id: 'exports', label: 'Downloads' },
] as const;
type TabId = (typeof TABS)[number]['id'];

const VIEWS: Record<TabId, ComponentType<{ c: ChallengeDetail }>> = {
  standings: ({ c }) => <StandingsSection slug={c.slug} />,
  spec: SpecSection,
  sweep: SweepSection,
  agreement: AgreementSection,
  cost: CostSection,
  verifiability: VerifiabilitySection,
  history: HistorySection,
  exports: ExportsSection,
};

export function Component() {
  const { slug = '' } = useParams();
  const [params, setParams] = useSearchParams();
  const q = useChallenge(slug);
  useDocumentTitle(q.data ? `${q.data.title}${params.get('view') ? ` · ${TABS.find((t) => t.id === params.get('view'))?.label ?? ''}` : ''}` : 'Challenge');
  const tab = (TABS.find((t) => t.id === params.get('view'))?.id ?? 'standings') as TabId;
  const setTab = (id: string) =>
    setParams((p) => {
      const n = new URLSearchParams(p);
      if (id === 'standings') n.delete('view');
      else n.set('view', id);
      return n;
    });

  if (q.isPending) return <PageLoading label="Loading the challenge…" />;
  if (q.isError) return <ErrorState error={q.error} retry={() => q.refetch()}><Link to="/challenges">See all challenges</Link></ErrorState>;
  const c = q.data;
  const View = VIEWS[tab];
  return (
    <div>
      <PageHeader
        kicker={<Link to="/challenges">Challenges</Link>}
        title={c.title}
        actions={
          <div className="flex flex-col items-start gap-2 text-sm sm:items-end">
            <span className="num text-ink-soft">v{c.version.version} · {formatDate(c.version.publishedAt)}</span>
            <SubmitEntryButton slug={c.slug} state={c.state} s={c.submissions} />
            <span className="flex flex-wrap items-center gap-3 text-sm">
              <Link to={`/challenges/${encodeURIComponent(c.slug)}/depth`}>Depth view</Link>
              <Link to={`/challenges/${encodeURIComponent(c.slug)}/specification`}>Specification</Link>
              <FollowButton subjectType="challenge" subjectId={c.slug} name={c.title} />
            </span>
          </div>
        }
      >
        <p className="line-clamp-3">{c.description}</p>
        <p className="mt-2 flex min-w-0 flex-wrap items-center gap-2 text-xs">
          <code className="min-w-0 truncate text-ink-faint" title={`sha256:${c.version.checksum}`}>sha256:{c.version.checksum.slice(0, 16)}…</code>
          <CopyButton text={`sha256:${c.version.checksum}`} label="Copy checksum" />
          {c.settings.license && <span className="text-ink-soft">Data licence {c.settings.license}</span>}
          <ChecksumNote slug={c.slug} version={c.version.version} />
        </p>
        <SubmissionsStatusLine state={c.state} s={c.submissions} receivedAt={q.dataUpdatedAt} />
      </PageHeader>
      <Tabs tabs={[...TABS]} active={tab} onChange={setTab} label="Challenge views" idPrefix="challenge-tab" />
      <div role="tabpanel" id="challenge-tab-panel" aria-labelledby={`challenge-tab-${tab}`} className="pt-6" tabIndex={-1}>
        <Suspense fallback={<PageLoading label="Loading this view…" />}>
          <View c={c} />
        </Suspense>
      </div>
    </div>
  );
}
