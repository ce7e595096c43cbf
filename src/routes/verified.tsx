import { Link, useSearchParams } from 'react-router';
import { AuthCard } from '@/features/auth/components/auth-card';
import { buttonClass } from '@/components/ui';

export function Component() {
  const [params] = useSearchParams();
  const error = params.get('error');
  if (error)
    return (
      <AuthCard title="This link did not work">
        <div className="space-y-3" data-testid="verify-failed">
          <p>The confirmation link is invalid or has expired{error !== 'invalid_token' && error !== 'INVALID_TOKEN' ? <> (<code>{error}</code>)</> : null}.</p>
          <p className="text-ink-soft">Sign in with your address and password: we will offer to send a fresh link.</p>
          <Link to="/sign-in" className={buttonClass('primary', 'md', 'w-full')}>Go to sign in</Link>
        </div>
      </AuthCard>
    );
  return (
    <AuthCard title="Address confirmed">
      <div className="space-y-3" data-testid="verified">
        <p>Thank you: your e-mail address is confirmed. You can sign in now.</p>
        <Link to="/sign-in" className={buttonClass('primary', 'md', 'w-full')}>Sign in</Link>
      </div>
    </AuthCard>
  );
}
