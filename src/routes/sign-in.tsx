import { useState, type FormEvent } from 'react';
import { Link, useNavigate, useSearchParams } from 'react-router';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { resendVerification, signInEmail } from '@/features/auth/api/auth-actions';
import { AuthCard } from '@/features/auth/components/auth-card';
import { emailProblem } from '@/features/auth/components/password-rules';
import { meQueryKey } from '@/features/me/api/get-me';
import { ApiError, errorMessage } from '@/lib/api-client';
import { safeNext } from '@/lib/guards';
import { Button, Field, FormMessage } from '@/components/ui';
import { useDocumentTitle } from '@/lib/use-document-title';

export function Component() {
  useDocumentTitle('Sign in');
  const [params] = useSearchParams();
  const next = safeNext(params.get('next'));
  const navigate = useNavigate();
  const qc = useQueryClient();
  const [email, setEmail] = useState(params.get('email') ?? '');
  const [password, setPassword] = useState('');
  const [errors, setErrors] = useState<{ email?: string; password?: string }>({});

  const signIn = useMutation({
    mutationFn: signInEmail,
    onSuccess: async () => {
      await qc.invalidateQueries({ queryKey: meQueryKey });
      navigate(next, { replace: true });
    },
  });
  const resend = useMutation({ mutationFn: resendVerification });

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const errs = { email: emailProblem(email), password: password ? undefined : 'Enter your password.' };
    setErrors(errs);
    if (errs.email || errs.password) return;
    resend.reset();
    signIn.mutate({ email: email.trim(), password });
  };

  const err = signIn.error instanceof ApiError ? signIn.error : null;
  const notVerified = err?.status === 403 && err.code === 'EMAIL_NOT_VERIFIED';
  const nextQs = next !== '/' ? `?next=${encodeURIComponent(next)}` : '';

  return (
    <AuthCard
      title="Sign in"
      footer={
        <>
          <p>New to Parallax? <Link to={`/sign-up${nextQs}`}>Create an account</Link></p>
          <p><Link to="/forgot-password">Forgot your password?</Link></p>
        </>
      }
    >
      <form noValidate onSubmit={submit} className="space-y-4">
        <Field label="E-mail" type="email" autoComplete="email" value={email} onChange={(e) => setEmail(e.target.value)} error={errors.email} required />
        <Field label="Password" type="password" autoComplete="current-password" value={password} onChange={(e) => setPassword(e.target.value)} error={errors.password} required />
        {signIn.isError && !notVerified && (
          <FormMessage>
            {err?.status === 401 ? 'The e-mail address or password is wrong.' : errorMessage(signIn.error)}
          </FormMessage>
        )}
        {notVerified && (
          <div data-testid="not-verified">
            <FormMessage tone="info">
              <p className="font-medium">Confirm your address first.</p>
              <p className="mt-1">Open the link in the confirmation mail we sent to {email.trim()}. It can take a minute to arrive.</p>
              <div className="mt-2">
                {resend.isSuccess ? (
                  <p role="status" className="text-ok-ink">A new confirmation mail is on its way.</p>
                ) : (
                  <Button variant="secondary" size="sm" busy={resend.isPending} onClick={() => resend.mutate(email.trim())}>
                    Send the confirmation mail again
                  </Button>
                )}
                {resend.isError && <p className="mt-1 text-danger">{errorMessage(resend.error)}</p>}
              </div>
            </FormMessage>
          </div>
        )}
        <Button type="submit" busy={signIn.isPending} className="w-full">Sign in</Button>
      </form>
    </AuthCard>
  );
}
