import type { HTMLAttributes, ReactNode } from 'react';
import { cx } from './cx';

export function Card({ className, ...rest }: HTMLAttributes<HTMLDivElement>) {
  return <div className={cx('rounded-card border border-rule bg-paper-raised', className)} {...rest} />;
}

/** a titled section of a page: a heading row (with optional actions) over its body */
export function Panel({ title, description, actions, children, className, id }: { title: ReactNode; description?: ReactNode; actions?: ReactNode; children: ReactNode; className?: string; id?: string }) {
  const headingId = id ? `${id}-title` : undefined;
  return (
    <section aria-labelledby={headingId} id={id} className={cx('rounded-card border border-rule bg-paper-raised', className)}>
      <header className="flex flex-wrap items-start justify-between gap-3 border-b border-rule px-4 py-3 sm:px-5">
        <div className="min-w-0">
          <h2 id={headingId} className="text-lg">
            {title}
          </h2>
          {description && <p className="text-sm text-ink-soft">{description}</p>}
        </div>
        {actions && <div className="flex shrink-0 items-center gap-2">{actions}</div>}
      </header>
      <div className="px-4 py-4 sm:px-5">{children}</div>
    </section>
  );
}

export function PageHeader({ title, kicker, children, actions }: { title: ReactNode; kicker?: ReactNode; children?: ReactNode; actions?: ReactNode }) {
  return (
    <header className="mb-6 flex flex-wrap items-end justify-between gap-4 border-b border-rule pb-4">
      <div className="min-w-0 max-w-prose">
        {kicker && <p className="mb-1 text-sm text-ink-soft">{kicker}</p>}
        <h1 className="text-2xl sm:text-3xl">{title}</h1>
        {children && <div className="mt-2 text-ink-soft">{children}</div>}
      </div>
      {actions && <div className="flex flex-wrap gap-2">{actions}</div>}
    </header>
  );
}
