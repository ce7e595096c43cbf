import type { ReactNode } from 'react';
import { cx } from './cx';
import type { Track } from '@shared/vocabulary';

export type BadgeTone = 'neutral' | Track | 'exact' | 'consensus' | 'disputed' | 'danger' | 'ok';

const tones: Record<BadgeTone, string> = {
  neutral: 'bg-paper-sunk text-ink-soft border-rule',
  hardware: 'bg-hardware-soft text-hardware-ink border-hardware/30',
  classical: 'bg-classical-soft text-classical-ink border-classical/30',
  exact: 'bg-exact-soft text-exact border-exact/30',
  consensus: 'bg-consensus-soft text-consensus-ink border-consensus/30',
  disputed: 'bg-paper-raised text-disputed-ink border-disputed border-dashed',
  danger: 'bg-danger-soft text-danger-ink border-danger/30',
  ok: 'bg-ok-soft text-ok-ink border-ok/30',
};

export function Badge({ tone = 'neutral', children, className }: { tone?: BadgeTone; children: ReactNode; className?: string }) {
  return <span className={cx('inline-flex items-center gap-1 rounded border px-1.5 py-px text-xs font-medium whitespace-nowrap', tones[tone], className)}>{children}</span>;
}
