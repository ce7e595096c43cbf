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

/** An error in place of the content. A 404 is calm (nothing is broken); retry only where retrying can help. */
export function ErrorState({ error, title, retry, className, children }: { error: unknown; title?: ReactNode; retry?: () => void; className?: string; children?: ReactNode }) {
  const e = error instanceof ApiError ? error : null;
  const notFound = e?.status === 404;
  const heading = title ?? (notFound ? 'Not found' : e?.status === 403 ? 'Not allowed' : e?.status === 401 ? 'Sign in needed' : 'This could not be loaded');
  const canRetry = retry && !(e && e.status >= 400 && e.status < 500);
  return (
    <div
      role="alert"
      className={cx(
        'rounded-card border px-4 py-5',
        notFound ? 'border-dashed border-rule-strong bg-paper-raised text-ink' : 'border-danger/40 bg-danger-soft text-danger-ink',
        className,
      )}
    >
      <p className="font-medium">{heading}</p>
      <p className="mt-1 text-sm">{errorMessage(error)}</p>
      {e?.requestId && !notFound && <p className="mt-1 text-xs opacity-80">Request id <code>{e.requestId}</code></p>}
      {(canRetry || children) && (
        <div className="mt-3 flex flex-wrap items-center gap-3 text-sm">
          {canRetry && (
            <Button variant="secondary" size="sm" onClick={retry}>
              Try again
            </Button>
          )}
          {children}
        </div>
      )}
    </div>
  );
}
