import { Link, useLocation, useNavigate, useParams } from 'react-router';
import { useUser } from '@/features/me/api/get-me';
import { useAcceptInvitation, useInvitation } from '@/features/teams/api/get-invitation';
import { AuthCard } from '@/features/auth/components/auth-card';
import { ApiError, errorMessage } from '@/lib/api-client';
import { formatDate } from '@/lib/format';
import { Button, buttonClass, ErrorState, FormMessage, PageLoading } from '@/components/ui';

export function Component() {
  const { invitationId = '' } = useParams();
  const location = useLocation();
  const navigate = useNavigate();
  const me = useUser();
  const inv = useInvitation(invitationId, Boolean(me.user));
  const accept = useAcceptInvitation();
  const here = encodeURIComponent(location.pathname);

  if (me.isPending) return <PageLoading />;
  if (!me.user)
    return (
      <AuthCard title="You have been invited to a team">
        <div className="space-y-3" data-testid="invitation-signed-out">
          <p>Sign in with the e-mail address the invitation was sent to, or create an account with it, then come back here to accept.</p>
          <div className="grid gap-2 sm:grid-cols-2">
            <Link to={`/sign-in?next=${here}`} className={buttonClass('primary')}>Sign in</Link>
            <Link to={`/sign-up?next=${here}`} className={buttonClass('secondary')}>Create an account</Link>
          </div>
        </div>
      </AuthCard>
    );
  if (inv.isPending) return <PageLoading label="Loading the invitation…" />;
  if (inv.isError) {
    const e = inv.error instanceof ApiError ? inv.error : null;
    return (
      <div className="mx-auto max-w-md">
        <ErrorState
          title="This invitation cannot be opened"
          error={e && (e.status === 400 || e.status === 404) ? new ApiError({ status: e.status, code: e.code, message: `${e.message} You are signed in as ${me.user.email}.` }) : inv.error}
        />
      </div>
    );
  }
  const i = inv.data;
  const roleLabel = i.role === 'owner' || i.role === 'admin' ? 'a team lead' : 'a member';
  const usable = i.status === 'pending' && new Date(i.expiresAt) > new Date();
  return (
    <AuthCard title={<>Join <span data-testid="invitation-team">{i.organizationName}</span></>}>
      <div className="space-y-4">
        <p>
          {i.inviterEmail ? <>{i.inviterEmail} invites you</> : <>You are invited</>} to join <strong>{i.organizationName}</strong> as {roleLabel}.
        </p>
        <dl className="grid grid-cols-[6rem_minmax(0,1fr)] gap-y-1 text-sm">
          <dt className="text-ink-soft">For</dt><dd className="break-all">{i.email}</dd>
          <dt className="text-ink-soft">Valid until</dt><dd className="num">{formatDate(i.expiresAt)}</dd>
        </dl>
        {!usable && <FormMessage tone="info">This invitation is {i.status === 'pending' ? 'expired' : i.status}; ask the team lead for a new one.</FormMessage>}
        {accept.isError && <FormMessage>{errorMessage(accept.error)}</FormMessage>}
        {usable && (
          <Button
            className="w-full"
            busy={accept.isPending}
            onClick={() => accept.mutate(invitationId, { onSuccess: () => navigate(`/teams/${i.organizationId}`) })}
          >
            Accept and join the team
          </Button>
        )}
      </div>
    </AuthCard>
  );
}
