import { useState, type FormEvent } from 'react';
import { Link } from 'react-router';
import { useMutation } from '@tanstack/react-query';
import { requestPasswordReset } from '@/features/auth/api/auth-actions';
import { AuthCard } from '@/features/auth/components/auth-card';
import { emailProblem } from '@/features/auth/components/password-rules';
import { ApiError, errorMessage } from '@/lib/api-client';
import { Button, Field, FormMessage } from '@/components/ui';
import { useDocumentTitle } from '@/lib/use-document-title';

export function Component() {
  useDocumentTitle('Forgotten password');
  const [email, setEmail] = useState('');
  const [error, setError] = useState<string>();
  const m = useMutation({ mutationFn: requestPasswordReset });
  const submit = (e: FormEvent) => {
    e.preventDefault();
    const p = emailProblem(email);
    setError(p);
    if (!p) m.mutate(email.trim());
  };
  // whatever the server knows, the answer is the same: no hint whether the account exists
  const done = m.isSuccess || (m.isError && !(m.error instanceof ApiError && (m.error.status === 429 || m.error.status === 0)));
  return (
    <AuthCard title="Reset your password" intro="Enter the address you signed up with; we mail you a link to choose a new password." footer={<p><Link to="/sign-in">Back to sign in</Link></p>}>
      {done ? (
        <FormMessage tone="ok">If an account exists for {email.trim()}, a mail with a reset link is on its way. The link works once, for one hour.</FormMessage>
      ) : (
        <form noValidate onSubmit={submit} className="space-y-4">
          <Field label="E-mail" type="email" autoComplete="email" value={email} onChange={(e) => setEmail(e.target.value)} error={error} required />
          {m.isError && <FormMessage>{errorMessage(m.error)}</FormMessage>}
          <Button type="submit" busy={m.isPending} className="w-full">Send the reset link</Button>
        </form>
      )}
    </AuthCard>
  );
}
