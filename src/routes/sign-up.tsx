import { useState, type FormEvent } from 'react';
import { Link, useSearchParams } from 'react-router';
import { useMutation } from '@tanstack/react-query';
import { signUpEmail } from '@/features/auth/api/auth-actions';
import { AuthCard } from '@/features/auth/components/auth-card';
import { emailProblem, MIN_PASSWORD, passwordProblem } from '@/features/auth/components/password-rules';
import { ApiError } from '@/lib/api-client';
import { safeNext } from '@/lib/guards';
import { Button, Field, FormMessage } from '@/components/ui';
import { useDocumentTitle } from '@/lib/use-document-title';

type Errors = Partial<Record<'name' | 'email' | 'password' | 'confirm', string>>;

export function Component() {
  useDocumentTitle('Sign up');
  const [params] = useSearchParams();
  const next = safeNext(params.get('next'), '');
  const [form, setForm] = useState({ name: '', email: params.get('email') ?? '', password: '', confirm: '' });
  const [errors, setErrors] = useState<Errors>({});
  const m = useMutation({ mutationFn: signUpEmail });

  const set = (k: keyof typeof form) => (e: { target: { value: string } }) => setForm((f) => ({ ...f, [k]: e.target.value }));

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const errs: Errors = {};
    if (!form.name.trim()) errs.name = 'Enter your name as it should appear beside your team’s entries.';
    errs.email = emailProblem(form.email);
    errs.password = passwordProblem(form.password);
    if (!errs.password && form.confirm !== form.password) errs.confirm = 'The two passwords differ.';
    setErrors(errs);
    if (Object.values(errs).some(Boolean)) return;
    m.mutate({ name: form.name.trim(), email: form.email.trim(), password: form.password });
  };

  if (m.isSuccess)
    return (
      <AuthCard title="Check your mail">
        <div data-testid="sign-up-done" className="space-y-3">
          <p>
            We sent a confirmation link to <strong>{form.email.trim()}</strong>. Open it to finish signing up; it works for 24 hours.
          </p>
          <p className="text-sm text-ink-soft">Nothing arrived? Look in the spam folder, or sign in to have it sent again.</p>
          <p>
            <Link to={`/sign-in${next ? `?next=${encodeURIComponent(next)}` : ''}`}>Go to sign in</Link>
          </p>
        </div>
      </AuthCard>
    );

  const serverError = m.error instanceof ApiError ? m.error : m.error ? new ApiError({ status: 0, code: 'x', message: String(m.error) }) : null;
  const emailServer = serverError?.code.startsWith('USER_ALREADY_EXISTS') ? serverError.message : undefined;
  const pwServer = serverError?.code.startsWith('PASSWORD_') ? serverError.message : undefined;

  return (
    <AuthCard
      title="Create an account"
      intro="Browsing is open to everyone; an account lets you join a team and post estimates."
      footer={<p>Already have an account? <Link to={`/sign-in${next ? `?next=${encodeURIComponent(next)}` : ''}`}>Sign in</Link></p>}
    >
      <form noValidate onSubmit={submit} className="space-y-4">
        <Field label="Name" autoComplete="name" value={form.name} onChange={set('name')} error={errors.name} required />
        <Field label="E-mail" type="email" autoComplete="email" value={form.email} onChange={set('email')} error={errors.email ?? emailServer} required />
        <Field
          label="Password"
          type="password"
          autoComplete="new-password"
          value={form.password}
          onChange={set('password')}
          hint={`At least ${MIN_PASSWORD} characters. A passphrase of a few words works well.`}
          error={errors.password ?? pwServer}
          required
        />
        <Field label="Confirm password" type="password" autoComplete="new-password" value={form.confirm} onChange={set('confirm')} error={errors.confirm} required />
        {serverError && !emailServer && !pwServer && <FormMessage>{serverError.message}</FormMessage>}
        <Button type="submit" busy={m.isPending} className="w-full">Create account</Button>
      </form>
    </AuthCard>
  );
}
