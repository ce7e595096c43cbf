import type { ReactNode } from 'react';
import { TrackMark } from '@/components/ui';
import type { Track } from '@shared/vocabulary';

export function Legend({ children }: { children: ReactNode }) {
  return <div className="flex flex-wrap gap-x-4 gap-y-1 text-xs text-ink-soft">{children}</div>;
}
export function LegendMark({ kind, children }: { kind: Track | 'baseline' | 'exact' | 'consensus' | 'disputed' | 'verifiable'; children: ReactNode }) {
  const mark =
    kind === 'hardware' || kind === 'classical' ? <TrackMark track={kind} size={11} /> :
    kind === 'baseline' ? <svg width="11" height="11" aria-hidden="true"><rect x="1.5" y="1.5" width="8" height="8" fill="#fff" stroke="#111621" strokeWidth="1.6" /></svg> :
    kind === 'exact' ? <span className="inline-block h-0.5 w-4 bg-exact" aria-hidden="true" /> :
    kind === 'consensus' ? <span className="inline-block h-2.5 w-4 rounded-sm bg-consensus-soft ring-1 ring-consensus/40" aria-hidden="true" /> :
    kind === 'disputed' ? <span className="inline-block h-2.5 w-4 rounded-sm border border-dashed border-disputed" aria-hidden="true" /> :
    <svg width="11" height="11" aria-hidden="true"><rect x="2" y="2" width="7" height="7" fill="#111621" transform="rotate(45 5.5 5.5)" /></svg>;
  return <span className="inline-flex items-center gap-1.5">{mark}{children}</span>;
}

/** a fixed-height box for a chart (nivo's responsive charts need a sized parent) */
export function ChartBox({ height = 360, children, label }: { height?: number; children: ReactNode; label: string }) {
  return (
    <div role="img" aria-label={label} style={{ height }} className="w-full">
      {children}
    </div>
  );
}
