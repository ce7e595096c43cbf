import { useRef, type KeyboardEvent, type ReactNode } from 'react';
import { cx } from './cx';

export interface TabDef { id: string; label: ReactNode }

/**
 * A tab list (WAI-ARIA tabs pattern): arrow keys move between tabs, Home/End jump; the panel is
 * rendered by the caller with id `${idPrefix}-panel` and aria-labelledby the active tab.
 */
export function Tabs({ tabs, active, onChange, label, idPrefix = 'tab' }: { tabs: TabDef[]; active: string; onChange: (id: string) => void; label: string; idPrefix?: string }) {
  const refs = useRef<(HTMLButtonElement | null)[]>([]);
  const onKey = (e: KeyboardEvent, i: number) => {
    let j = -1;
    if (e.key === 'ArrowRight') j = (i + 1) % tabs.length;
    else if (e.key === 'ArrowLeft') j = (i - 1 + tabs.length) % tabs.length;
    else if (e.key === 'Home') j = 0;
    else if (e.key === 'End') j = tabs.length - 1;
    if (j < 0) return;
    e.preventDefault();
    onChange(tabs[j].id);
    refs.current[j]?.focus();
  };
  return (
    <div role="tablist" aria-label={label} className="-mx-4 flex gap-1 overflow-x-auto border-b border-rule px-4 sm:mx-0 sm:px-0">
      {tabs.map((t, i) => {
        const on = t.id === active;
        return (
          <button
            key={t.id}
            ref={(el) => { refs.current[i] = el; }}
            type="button"
            role="tab"
            id={`${idPrefix}-${t.id}`}
            aria-selected={on}
            aria-controls={`${idPrefix}-panel`}
            tabIndex={on ? 0 : -1}
            onClick={() => onChange(t.id)}
            onKeyDown={(e) => onKey(e, i)}
            className={cx(
              '-mb-px shrink-0 border-b-2 px-3 py-2 text-sm whitespace-nowrap',
              on ? 'border-ink font-medium text-ink' : 'border-transparent text-ink-soft hover:border-rule-strong hover:text-ink',
            )}
          >
            {t.label}
          </button>
        );
      })}
    </div>
  );
}

/** a small segmented control for choices inside a view (observable, track …) */
export function Segmented<T extends string>({ options, value, onChange, label }: { options: { value: T; label: ReactNode }[]; value: T; onChange: (v: T) => void; label: string }) {
  return (
    <div role="radiogroup" aria-label={label} className="inline-flex flex-wrap gap-1">
      {options.map((o) => (
        <button
          key={o.value}
          type="button"
          role="radio"
          aria-checked={o.value === value}
          onClick={() => onChange(o.value)}
          className={cx('rounded border px-2 py-0.5 text-sm', o.value === value ? 'border-ink bg-ink text-paper' : 'border-rule-strong bg-paper-raised hover:border-ink')}
        >
          {o.label}
        </button>
      ))}
    </div>
  );
}
