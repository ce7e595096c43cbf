import type { ReactNode } from 'react';

/** the narrow column the sign-in, sign-up and password pages sit in */
export function AuthCard({ title, intro, children, footer }: { title: ReactNode; intro?: ReactNode; children: ReactNode; footer?: ReactNode }) {
  return (
    <div className="mx-auto w-full max-w-md">
      <div className="rounded-card border border-rule bg-paper-raised px-5 py-6 sm:px-8 sm:py-8">
        <h1 className="text-2xl">{title}</h1>
        {intro && <div className="mt-1 text-ink-soft">{intro}</div>}
        <div className="mt-6">{children}</div>
      </div>
      {footer && <div className="mt-4 space-y-1 px-1 text-sm text-ink-soft">{footer}</div>}
    </div>
  );
}
