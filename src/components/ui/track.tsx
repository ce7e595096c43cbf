import { cx } from './cx';
import type { Track } from '@shared/vocabulary';

export type TrackName = Track;

export const TRACK_LABEL: Record<TrackName, string> = {
  hardware: 'Quantum hardware',
  classical: 'Classical simulation',
};

export const isTrack = (t: unknown): t is TrackName => t === 'hardware' || t === 'classical';

/**
 * The mark of a track, the same everywhere (plots, tables, badges): hardware is a filled
 * diamond, classical a hollow circle, so the pair reads in grey and for colour-blind readers.
 */
export function TrackMark({ track, size = 12, className }: { track: TrackName; size?: number; className?: string }) {
  return (
    <svg width={size} height={size} viewBox="0 0 12 12" aria-hidden="true" className={cx('inline-block shrink-0', track === 'hardware' ? 'text-hardware' : 'text-classical', className)}>
      {track === 'hardware' ? (
        <path d="M6 0.8 11.2 6 6 11.2 0.8 6Z" fill="currentColor" />
      ) : (
        <circle cx="6" cy="6" r="4.4" fill="none" stroke="currentColor" strokeWidth="1.9" />
      )}
    </svg>
  );
}

export function TrackBadge({ track }: { track: TrackName }) {
  return (
    <span
      className={cx(
        'inline-flex items-center gap-1.5 rounded border px-1.5 py-px text-xs font-medium whitespace-nowrap',
        track === 'hardware' ? 'border-hardware/30 bg-hardware-soft text-hardware-ink' : 'border-classical/30 bg-classical-soft text-classical-ink',
      )}
    >
      <TrackMark track={track} size={10} />
      {TRACK_LABEL[track]}
    </span>
  );
}
