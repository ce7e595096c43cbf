import { useState } from 'react';
import { cx } from './cx';

/** copies a text (a checksum, a citation) and says so for a moment */
export function CopyButton({ text, label = 'Copy', className }: { text: string; label?: string; className?: string }) {
  const [done, setDone] = useState<'idle' | 'ok' | 'fail'>('idle');
  const copy = async () => {
    try {
      await navigator.clipboard.writeText(text);
      setDone('ok');
    } catch {
      setDone('fail');
    }
    setTimeout(() => setDone('idle'), 1800);
  };
  return (
    <button type="button" onClick={copy} className={cx('inline-flex h-7 items-center rounded border border-rule-strong bg-paper-raised px-2 text-xs hover:border-ink', className)} aria-live="polite">
      {done === 'ok' ? 'Copied' : done === 'fail' ? 'Select and copy' : label}
    </button>
  );
}

/** a chart's text alternative: a toggle that shows the table the chart was drawn from */
export function ChartTableToggle({ shown, onToggle, controls }: { shown: boolean; onToggle: () => void; controls: string }) {
  return (
    <button type="button" aria-expanded={shown} aria-controls={controls} onClick={onToggle} className="inline-flex h-7 items-center rounded border border-rule-strong bg-paper-raised px-2 text-xs hover:border-ink">
      {shown ? 'Hide the data table' : 'Show as a table'}
    </button>
  );
}
