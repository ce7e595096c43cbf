import type { Problem } from '../lib/entry-form';
import { controlId, describePath, rowsInMessage } from '../lib/entry-form';
import { cx } from '@/components/ui';

/**
 * Problems (errors or warnings) with the place they name: rows of the estimates as the table counts
 * them (from 1), the JSON pointer beside; a place that names a control jumps to it.
 */
export function ProblemList({ problems, tone, testId }: { problems: Problem[]; tone: 'danger' | 'warning'; testId?: string }) {
  if (!problems.length) return null;
  return (
    <ul data-testid={testId} className={cx('divide-y rounded border text-sm', tone === 'danger' ? 'divide-danger/20 border-danger/40 bg-danger-soft text-danger-ink' : 'divide-rule border-rule-strong bg-paper-sunk text-ink')}>
      {problems.map((p, i) => {
        const target = controlId(p.path);
        return (
          <li key={`${p.path}-${i}`} className="flex flex-col gap-0.5 px-3 py-2 sm:flex-row sm:gap-3">
            <code className="shrink-0 font-mono text-xs sm:w-56 sm:pt-0.5">
              {target ? (
                <a
                  href={`#${target}`}
                  className="break-all"
                  onClick={(e) => {
                    const el = document.getElementById(target);
                    if (!el) return;
                    e.preventDefault();
                    el.scrollIntoView({ block: 'center' });
                    const control = el.matches('input,select,textarea') ? el : el.querySelector<HTMLElement>('input,select,textarea');
                    (control ?? el).focus();
                  }}
                >
                  {describePath(p.path)}
                </a>
              ) : (
                <span className="break-all">{describePath(p.path)}</span>
              )}
              {describePath(p.path) !== (p.path || '(document)') && <span className="block text-ink-soft">{p.path}</span>}
            </code>
            <span>{rowsInMessage(p.message)}</span>
          </li>
        );
      })}
    </ul>
  );
}
