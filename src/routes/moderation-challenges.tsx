import { Link, type LoaderFunctionArgs } from 'react-router';
import { requireUser } from '@/lib/guards';
import { queryClient } from '@/lib/query-client';
import { formatRelative } from '@/lib/format';
import { getChallengesQueryOptions, useChallenges } from '@/features/challenges/api/get-challenges';
import { Badge, PageHeader, Panel, Spinner, Table, Td, Th } from '@/components/ui';
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
            <Table>
              <thead><tr><Th>Challenge</Th><Th>State</Th><Th num>Version</Th><Th num>Targets</Th><Th num>Exact</Th><Th num>Sealed</Th><Th>Last activity</Th></tr></thead>
              <tbody>
                {list.map((c) => (
                  <tr key={c.slug}>
                    <Td><Link to={`/moderation/challenges/${c.slug}`} className="font-medium">{c.title}</Link><span className="block font-mono text-xs text-ink-soft">{c.slug}</span></Td>
                    <Td><Badge tone={c.state === 'open' ? 'ok' : 'neutral'}>{c.state}</Badge></Td>
                    <Td num>{c.version ?? '—'}</Td>
                    <Td num>{c.targets}</Td>
                    <Td num>{c.exactTargets}</Td>
                    <Td num>{c.sealedTargets}</Td>
                    <Td className="whitespace-nowrap text-ink-soft">{formatRelative(c.lastActivity)}</Td>
                  </tr>
                ))}
              </tbody>
            </Table>
          )}
        </Panel>
        <AuthorChallenge published={published} />
      </div>
    </div>
  );
}
