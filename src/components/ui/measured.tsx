import type { ReactNode } from 'react';
import { formatMeasurement } from '@/lib/format';
import { cx } from './cx';

/**
 * A value with its standard uncertainty, digits following the uncertainty, in tabular figures.
 * The ± u part is in the same type size (uncertainties are content too), only a softer ink.
 */
export function Measured({ value, u, className, exactLabel = true }: { value: number | null | undefined; u?: number | null; className?: string; exactLabel?: boolean }) {
  const f = formatMeasurement(value, u);
  return (
    <span className={cx('num whitespace-nowrap', className)}>
      {f.scale && '('}<span>{f.value}</span>
      {f.u !== null && f.u !== '0' && <span className="text-ink-soft"> ± {f.u}</span>}
      {f.scale && `)${f.scale}`}
      {f.u === '0' && exactLabel && <span className="text-ink-faint"> exact</span>}
    </span>
  );
}

/**
 * Provenance one click away: a small disclosure that opens a card beside the number
 * (method, engine version, computed at …). Works with the keyboard (it is a <details>).
 */
export function Provenance({ label = 'Provenance', children, className }: { label?: string; children: ReactNode; className?: string }) {
  return (
    <details className={cx('group relative inline-block align-baseline', className)}>
      <summary
        aria-label={label}
        title={label}
        className="ml-1 inline-flex h-4 w-4 cursor-pointer list-none items-center justify-center rounded-full border border-rule-strong text-[10px] leading-none text-ink-soft hover:border-ink hover:text-ink [&::-webkit-details-marker]:hidden"
      >
        i
      </summary>
      <div className="absolute right-0 z-20 mt-1 w-64 rounded-card border border-rule-strong bg-paper-raised p-3 text-left text-xs font-normal whitespace-normal text-ink shadow-lg normal-case">
        {children}
      </div>
    </details>
  );
}

/** a definition list for provenance cards */
export function ProvenanceList({ items }: { items: [string, ReactNode][] }) {
  return (
    <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-0.5">
      {items.map(([k, v]) => (
        <div key={k} className="contents">
          <dt className="text-ink-soft">{k}</dt>
          <dd className="num break-words">{v}</dd>
        </div>
      ))}
    </dl>
  );
}
