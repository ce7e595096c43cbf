import { useState, type FormEvent } from 'react';
import { Link, useNavigate, type LoaderFunctionArgs } from 'react-router';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { requireUser } from '@/lib/guards';
import { useUser } from '@/features/me/api/get-me';
import { changePassword } from '@/features/auth/api/auth-actions';
import { signOut } from '@/features/auth/api/sign-out';
import { MIN_PASSWORD, passwordProblem } from '@/features/auth/components/password-rules';
import { ApiError, errorMessage } from '@/lib/api-client';
import { Badge, Button, EmptyState, Field, FormMessage, PageHeader, PageLoading, Panel } from '@/components/ui';
import { useDocumentTitle } from '@/lib/use-document-title';

export async function loader({ request }: LoaderFunctionArgs) {
  await requireUser(request);
  return null;
}

export function Component() {
  useDocumentTitle('Your account');
  const { user, teams, isPending } = useUser();
  const qc = useQueryClient();
  const navigate = useNavigate();
  if (isPending) return <PageLoading />;
  if (!user) return <EmptyState title="You are signed out" action={<Link to="/sign-in?next=/account">Sign in</Link>} />;
  return (
    <div>
      <PageHeader
        title="Account"
        actions={
          <Button variant="secondary" onClick={async () => { await signOut(qc); navigate('/'); }}>
            Sign out
          </Button>
        }
      />
      <div className="grid grid-cols-1 items-start gap-6 lg:grid-cols-2">
        <Panel title="You">
          <dl className="grid grid-cols-[7rem_minmax(0,1fr)] gap-y-2 text-base">
            <dt className="text-ink-soft">Name</dt>
            <dd>{user.name}</dd>
            <dt className="text-ink-soft">E-mail</dt>
            <dd className="flex flex-wrap items-center gap-2 break-all">
              {user.email} {user.emailVerified ? <Badge tone="ok">confirmed</Badge> : <Badge tone="danger">not confirmed</Badge>}
            </dd>
            <dt className="text-ink-soft">Role</dt>
            <dd><Badge>{user.role}</Badge></dd>
          </dl>
        </Panel>
        <Panel title="Teams" actions={<Link to="/teams" className="text-sm">All teams</Link>}>
          {teams.length ? (
            <ul className="divide-y divide-rule">
              {teams.map((t) => (
                <li key={t.id} className="flex items-center justify-between gap-3 py-2 first:pt-0 last:pb-0">
                  <Link to={`/teams/${t.id}`}>{t.name}</Link>
                  <Badge>{t.role}</Badge>
                </li>
              ))}
            </ul>
          ) : (
            <EmptyState title="You are in no team yet" action={<Link to="/teams#create">Create a team</Link>}>
              A team lead can invite you, or you can start a team yourself.
            </EmptyState>
          )}
        </Panel>
        <ChangePassword />
      </div>
    </div>
  );
}

function ChangePassword() {
  const [f, setF] = useState({ current: '', next: '', confirm: '' });
  const [errors, setErrors] = useState<{ current?: string; next?: string; confirm?: string }>({});
  const m = useMutation({ mutationFn: changePassword, onSuccess: () => setF({ current: '', next: '', confirm: '' }) });
  const submit = (e: FormEvent) => {
    e.preventDefault();
    const errs = { current: f.current ? undefined : 'Enter your current password.', next: passwordProblem(f.next), confirm: undefined as string | undefined };
    if (!errs.next && f.next !== f.confirm) errs.confirm = 'The two passwords differ.';
    if (!errs.next && f.next === f.current) errs.next = 'Choose a password different from the current one.';
    setErrors(errs);
    if (!errs.current && !errs.next && !errs.confirm) m.mutate({ currentPassword: f.current, newPassword: f.next, revokeOtherSessions: true });
  };
  const wrongCurrent = m.error instanceof ApiError && (m.error.code === 'INVALID_PASSWORD' || m.error.status === 401) ? 'The current password is wrong.' : undefined;
  return (
    <Panel title="Change password" description="Other sessions of this account are signed out.">
      <form noValidate onSubmit={submit} className="max-w-sm space-y-4">
        <Field label="Current password" type="password" autoComplete="current-password" value={f.current} onChange={(e) => setF({ ...f, current: e.target.value })} error={errors.current ?? wrongCurrent} />
        <Field label="New password" type="password" autoComplete="new-password" value={f.next} onChange={(e) => setF({ ...f, next: e.target.value })} hint={`At least ${MIN_PASSWORD} characters.`} error={errors.next} />
        <Field label="Confirm new password" type="password" autoComplete="new-password" value={f.confirm} onChange={(e) => setF({ ...f, confirm: e.target.value })} error={errors.confirm} />
        {m.isError && !wrongCurrent && <FormMessage>{errorMessage(m.error)}</FormMessage>}
        {m.isSuccess && <FormMessage tone="ok">Your password is changed.</FormMessage>}
        <Button type="submit" busy={m.isPending}>Change password</Button>
      </form>
    </Panel>
  );
}
