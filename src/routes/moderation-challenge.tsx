import { Link, useParams, type LoaderFunctionArgs } from 'react-router';
import { requireUser } from '@/lib/guards';
import { queryClient } from '@/lib/query-client';
import { getChallengeQueryOptions, useChallenge } from '@/features/challenges/api/get-challenge';
import { useTargets } from '@/features/challenges/api/get-targets';
import { Badge, ErrorState, PageHeader, PageLoading, Progress } from '@/components/ui';
import { ModerationNav } from '@/features/moderation/components/moderation-nav';
import { Curation, Disputes, SealForm, SettingsForm } from '@/features/moderation/components/challenge-tools';

export async function loader({ request, params }: LoaderFunctionArgs) {
  await requireUser(request, ['moderator', 'admin']);
  await queryClient.prefetchQuery(getChallengeQueryOptions(String(params.slug)));
  return null;
}

export function Component() {
  const slug = String(useParams().slug);
  const c = useChallenge(slug);
  const t = useTargets(slug);
  if (c.isPending) return <PageLoading />;
  if (c.isError) return <ErrorState error={c.error} retry={() => c.refetch()} />;
  const d = c.data;
  const running = d.jobs.filter((j) => j.state === 'queued' || j.state === 'running');
  return (
    <div>
      <PageHeader title="Moderation">Entries in review with their automatic checks; challenges; the audit log.</PageHeader>
      <ModerationNav />
      <div className="mb-6 flex flex-wrap items-baseline gap-3">
        <h2 className="text-xl">{d.title}</h2>
        <Badge tone={d.state === 'open' ? 'ok' : 'neutral'}>{d.state}</Badge>
        <span className="text-sm text-ink-soft">v{d.version.version} · <Link to={`/challenges/${slug}`}>public page</Link> · <Link to={`/moderation/audit?subjectId=${slug}`}>audit log</Link></span>
      </div>
      {running.map((j) => <div key={j.id} className="mb-4"><Progress value={j.state === 'queued' ? undefined : j.progress ?? 0} label={`${j.kind}: ${j.state}${j.note ? ` · ${j.note}` : ''}`} /></div>)}
      <div className="grid gap-6 lg:grid-cols-2">
        <SettingsForm key={d.version.id + JSON.stringify(d.settings) + d.state} c={d} />
        <SealForm slug={slug} targetKeys={(t.data?.targets ?? []).map((x) => x.key)} />
        <Disputes slug={slug} />
        <Curation slug={slug} />
      </div>
    </div>
  );
}
