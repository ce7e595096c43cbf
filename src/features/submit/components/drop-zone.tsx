import { useId, useRef, useState, type ReactNode } from 'react';
import { cx } from '@/components/ui';

/** A file drop target with a file input for those who do not drag. */
export function DropZone({ onFile, accept = '.json,application/json', children, disabled }: { onFile: (f: File) => void; accept?: string; children?: ReactNode; disabled?: boolean }) {
  const [over, setOver] = useState(false);
  const input = useRef<HTMLInputElement>(null);
  const id = useId();
  return (
    <div
      data-testid="drop-zone"
      onDragOver={(e) => { e.preventDefault(); if (!disabled) setOver(true); }}
      onDragLeave={() => setOver(false)}
      onDrop={(e) => {
        e.preventDefault();
        setOver(false);
        const f = e.dataTransfer.files?.[0];
        if (f && !disabled) onFile(f);
      }}
      className={cx(
        'flex flex-col items-center justify-center gap-2 rounded-card border-2 border-dashed px-4 py-6 text-center transition-colors',
        over ? 'border-ink bg-paper-sunk' : 'border-rule-strong bg-paper-raised',
      )}
    >
      <svg width="28" height="28" viewBox="0 0 28 28" aria-hidden="true" className="text-ink-soft">
        <path d="M14 18V5m0 0-5 5m5-5 5 5M5 19v3a1 1 0 0 0 1 1h16a1 1 0 0 0 1-1v-3" fill="none" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" strokeLinejoin="round" />
      </svg>
      <p className="text-sm">
        Drop a JSON file here, or{' '}
        <label htmlFor={id} className="cursor-pointer font-medium text-ink underline underline-offset-2">
          choose a file
        </label>
      </p>
      <input
        id={id}
        ref={input}
        type="file"
        accept={accept}
        disabled={disabled}
        className="sr-only"
        data-testid="file-input"
        onChange={(e) => {
          const f = e.target.files?.[0];
          if (f) onFile(f);
          if (input.current) input.current.value = '';
        }}
      />
      {children && <div className="text-xs text-ink-soft">{children}</div>}
    </div>
  );
}
