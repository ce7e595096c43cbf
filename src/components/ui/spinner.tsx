import { cx } from './cx';

/** a quiet indeterminate mark: two arcs turning (two viewpoints) */
export function Spinner({ size = 'md', label = 'Loading…', className }: { size?: 'sm' | 'md'; label?: string; className?: string }) {
  const px = size === 'sm' ? 14 : 20;
  return (
    <span role={label ? 'status' : undefined} className={cx('inline-flex items-center gap-2 text-ink-soft', className)}>
      <svg width={px} height={px} viewBox="0 0 20 20" className="animate-spin" aria-hidden="true">
        <circle cx="10" cy="10" r="8" fill="none" stroke="currentColor" strokeOpacity="0.18" strokeWidth="2.5" />
        <path d="M10 2a8 8 0 0 1 8 8" fill="none" stroke="currentColor" strokeWidth="2.5" strokeLinecap="round" />
      </svg>
      {label && <span className="text-sm">{label}</span>}
    </span>
  );
}

/** determinate progress (0..1) or indeterminate when value is undefined */
export function Progress({ value, label }: { value?: number; label: string }) {
  const pct = value === undefined ? undefined : Math.round(Math.max(0, Math.min(1, value)) * 100);
  return (
    <div className="space-y-1">
      <div className="flex justify-between text-sm text-ink-soft">
        <span>{label}</span>
        {pct !== undefined && <span className="num">{pct} %</span>}
      </div>
      <div
        role="progressbar"
        aria-label={label}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={pct}
        className="h-1.5 overflow-hidden rounded-full bg-paper-sunk"
      >
        <div className={cx('h-full rounded-full bg-ink', pct === undefined && 'w-1/3 animate-pulse')} style={pct !== undefined ? { width: `${pct}%` } : undefined} />
      </div>
    </div>
  );
}

/** a page-level loading placeholder */
export function PageLoading({ label = 'Loading…' }: { label?: string }) {
  return (
    <div className="py-16 text-center">
      <Spinner label={label} />
    </div>
  );
}
