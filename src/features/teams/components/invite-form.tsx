import { useState, type FormEvent } from 'react';
import { useInviteMember } from '@/features/teams/api/invite-member';
import type { TeamRole } from '@/features/me/api/get-me';
import { emailProblem } from '@/features/auth/components/password-rules';
import { ApiError, errorMessage } from '@/lib/api-client';
import { Button, Field, FormMessage, SelectField } from '@/components/ui';

export function InviteForm({ teamId }: { teamId: string }) {
  const [email, setEmail] = useState('');
  const [role, setRole] = useState<TeamRole>('member');
  const [error, setError] = useState<string>();
  const [sentTo, setSentTo] = useState<string>();
  const m = useInviteMember(teamId);
  const submit = (e: FormEvent) => {
    e.preventDefault();
    const p = emailProblem(email);
    setError(p);
    if (p) return;
    const to = email.trim();
    m.mutate({ email: to, role }, { onSuccess: () => { setSentTo(to); setEmail(''); } });
  };
  const err = m.error instanceof ApiError ? m.error : null;
  const emailServer = err && /INVITED|MEMBER|EMAIL/.test(err.code) ? err.message : undefined;
  return (
    <form noValidate onSubmit={submit} className="space-y-3" aria-label="Invite someone">
      <div className="grid gap-3 sm:grid-cols-[minmax(0,1fr)_10rem]">
        <Field label="E-mail" type="email" autoComplete="off" value={email} onChange={(e) => { setEmail(e.target.value); setSentTo(undefined); }} error={error ?? emailServer} placeholder="colleague@institute.org" />
        <SelectField label="Role" value={role} onChange={(e) => setRole(e.target.value as TeamRole)}>
          <option value="member">Member</option>
          <option value="lead">Team lead</option>
        </SelectField>
      </div>
      <p className="text-sm text-ink-soft">Members post estimates; leads also invite people and manage API keys.</p>
      {m.isError && !emailServer && <FormMessage>{errorMessage(m.error)}</FormMessage>}
      {sentTo && <FormMessage tone="ok">Invitation sent to {sentTo}. It is valid for 7 days.</FormMessage>}
      <Button type="submit" busy={m.isPending}>Send invitation</Button>
    </form>
  );
}
