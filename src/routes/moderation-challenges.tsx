import { Link, type LoaderFunctionArgs } from 'react-router';
import { requireUser } from '@/lib/guards';
import { queryClient } from '@/lib/query-client';
import { formatRelative } from '@/lib/format';
import { getChallengesQueryOptions, useChallenges } from '@/features/challenges/api/get-challenges';
import { Badge, PageHeader, Panel, Spinner } from '@/components/ui';
import { ModerationNav } from '@/features/moderation/components/moderation-nav';
import { AuthorChallenge } from '@/features/moderation/components/author-challenge';

export async function loader({ request }: LoaderFunctionArgs) {
  await requireUser(request, ['moderator', 'admin']);
  await queryClient.prefetchQuery(getChallengesQueryOptions());
  return null;
}

export function Component() {
  const q = useChallenges();
  const list = q.data?.challenges ?? [];
  const published = new Set(list.filter((c) => c.state !== 'draft').map((c) => c.slug));
  return (
    <div>
      <PageHeader title="Moderation">Entries in review with their automatic checks; challenges; the audit log.</PageHeader>
      <ModerationNav />
      <div className="space-y-6">
        <Panel title="Challenges" description="Settings, sealed references, disputes and curation, per challenge.">
          {q.isPending ? <Spinner /> : (
            <ul className="divide-y divide-rule" data-testid="moderation-challenges">
              {list.map((c) => (
                <li key={c.slug} className="flex flex-wrap items-baseline justify-between gap-x-4 gap-y-1 py-2.5">
                  <span className="min-w-0">
                    <Link to={`/moderation/challenges/${c.slug}`} className="font-medium">{c.title}</Link>{' '}
                    <Badge tone={c.state === 'open' ? 'ok' : 'neutral'}>{c.state}</Badge>
                    <span className="block font-mono text-xs text-ink-soft">{c.slug} v{c.version ?? '—'}</span>
                  </span>
                  <span className="num text-sm text-ink-soft">
                    {c.targets} targets · {c.exactTargets} exact{c.sealedTargets > 0 && ` · ${c.sealedTargets} sealed`} · {formatRelative(c.lastActivity)}
                  </span>
                </li>
              ))}
            </ul>
          )}
        </Panel>
        <AuthorChallenge published={published} />
      </div>
    </div>
  );
}
