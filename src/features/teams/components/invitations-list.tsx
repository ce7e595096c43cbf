import { useInvitations } from '@/features/teams/api/get-invitations';
import { Badge, EmptyState, ErrorState, Spinner, Table, Td, Th, type BadgeTone } from '@/components/ui';
import { formatDate } from '@/lib/format';

const TONE: Record<string, BadgeTone> = { pending: 'consensus', accepted: 'ok', rejected: 'danger', canceled: 'neutral' };

export function InvitationsList({ teamId }: { teamId: string }) {
  const q = useInvitations(teamId);
  if (q.isPending) return <Spinner label="Loading invitations…" />;
  if (q.isError) return <ErrorState error={q.error} retry={() => q.refetch()} />;
  if (!q.data.invitations.length) return <EmptyState title="No invitations yet">Invite someone with the form above.</EmptyState>;
  return (
    <Table data-testid="invitations">
      <thead>
        <tr><Th>E-mail</Th><Th className="hidden sm:table-cell">Role</Th><Th>Status</Th><Th num>Expires</Th></tr>
      </thead>
      <tbody>
        {q.data.invitations.map((i) => {
          const expired = i.status === 'pending' && new Date(i.expiresAt) < new Date();
          return (
            <tr key={i.id}>
              <Td className="[overflow-wrap:anywhere]">
                {i.email}
                <span className="block text-xs text-ink-soft sm:hidden">{i.role}</span>
              </Td>
              <Td className="hidden sm:table-cell">{i.role}</Td>
              <Td><Badge tone={expired ? 'neutral' : TONE[i.status] ?? 'neutral'}>{expired ? 'expired' : i.status}</Badge></Td>
              <Td num className="whitespace-nowrap">{formatDate(i.expiresAt)}</Td>
            </tr>
          );
        })}
      </tbody>
    </Table>
  );
}
