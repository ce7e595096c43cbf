import type { ReactNode } from 'react';
import { ApiError, errorMessage } from '@/lib/api-client';
import { Button } from './button';
import { cx } from './cx';

export function EmptyState({ title, children, action, className }: { title: ReactNode; children?: ReactNode; action?: ReactNode; className?: string }) {
  return (
    <div className={cx('rounded-card border border-dashed border-rule-strong px-4 py-8 text-center', className)}>
      <p className="font-medium">{title}</p>
      {children && <div className="mx-auto mt-1 max-w-prose text-sm text-ink-soft">{children}</div>}
      {action && <div className="mt-4 flex justify-center">{action}</div>}
    </div>
  );
}

export function ErrorState({ error, title, retry, className }: { error: unknown; title?: ReactNode; retry?: () => void; className?: string }) {
  const e = error instanceof ApiError ? error : null;
  const heading = title ?? (e?.status === 404 ? 'Not found' : e?.status === 403 ? 'Not allowed' : e?.status === 401 ? 'Sign in needed' : 'This could not be loaded');
  return (
    <div role="alert" className={cx('rounded-card border border-danger/40 bg-danger-soft px-4 py-5 text-danger-ink', className)}>
      <p className="font-medium">{heading}</p>
      <p className="mt-1 text-sm">{errorMessage(error)}</p>
      {e?.requestId && <p className="mt-1 text-xs text-danger-ink/80">Request id <code>{e.requestId}</code></p>}
      {retry && (
        <Button variant="secondary" size="sm" className="mt-3" onClick={retry}>
          Try again
        </Button>
      )}
    </div>
  );
}
