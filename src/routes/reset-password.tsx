import { useState, type FormEvent } from 'react';
import { Link, useSearchParams } from 'react-router';
import { useMutation } from '@tanstack/react-query';
import { resetPassword } from '@/features/auth/api/auth-actions';
import { AuthCard } from '@/features/auth/components/auth-card';
import { MIN_PASSWORD, passwordProblem } from '@/features/auth/components/password-rules';
import { errorMessage } from '@/lib/api-client';
import { Button, buttonClass, Field, FormMessage } from '@/components/ui';
import { useDocumentTitle } from '@/lib/use-document-title';

export function Component() {
  useDocumentTitle('Choose a new password');
  const [params] = useSearchParams();
  const token = params.get('token') ?? '';
  const linkError = params.get('error');
  const [pw, setPw] = useState('');
  const [confirm, setConfirm] = useState('');
  const [errors, setErrors] = useState<{ pw?: string; confirm?: string }>({});
  const m = useMutation({ mutationFn: resetPassword });

  if (!token || linkError)
    return (
      <AuthCard title="This reset link did not work">
        <p>The link is invalid or has expired (reset links work once, for one hour).</p>
        <Link to="/forgot-password" className={buttonClass('primary', 'md', 'mt-4 w-full')}>Ask for a new link</Link>
      </AuthCard>
    );

  if (m.isSuccess)
    return (
      <AuthCard title="Password changed">
        <p>Your new password is set, and every other session of this account has been signed out.</p>
        <Link to="/sign-in" className={buttonClass('primary', 'md', 'mt-4 w-full')}>Sign in</Link>
      </AuthCard>
    );

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const errs = { pw: passwordProblem(pw), confirm: undefined as string | undefined };
    if (!errs.pw && pw !== confirm) errs.confirm = 'The two passwords differ.';
    setErrors(errs);
    if (!errs.pw && !errs.confirm) m.mutate({ newPassword: pw, token });
  };
  return (
    <AuthCard title="Choose a new password">
      <form noValidate onSubmit={submit} className="space-y-4">
        <Field label="New password" type="password" autoComplete="new-password" value={pw} onChange={(e) => setPw(e.target.value)} hint={`At least ${MIN_PASSWORD} characters.`} error={errors.pw} />
        <Field label="Confirm new password" type="password" autoComplete="new-password" value={confirm} onChange={(e) => setConfirm(e.target.value)} error={errors.confirm} />
        {m.isError && (
          <FormMessage>
            {errorMessage(m.error)} <Link to="/forgot-password">Ask for a new link</Link>.
          </FormMessage>
        )}
        <Button type="submit" busy={m.isPending} className="w-full">Set the new password</Button>
      </form>
    </AuthCard>
  );
}
