import type { HTMLAttributes, TdHTMLAttributes, ThHTMLAttributes } from 'react';
import { cx } from './cx';

/** Table styles: hairline rules, dense rows, tabular figures; numbers right-aligned with `num`. */
export function Table({ className, ...rest }: HTMLAttributes<HTMLTableElement>) {
  return (
    <div className="-mx-4 overflow-x-auto px-4 sm:mx-0 sm:px-0">
      <table className={cx('w-full border-collapse text-sm', className)} {...rest} />
    </div>
  );
}
export function Th({ className, num, ...rest }: ThHTMLAttributes<HTMLTableCellElement> & { num?: boolean }) {
  return <th scope="col" className={cx('border-b border-rule-strong px-2 py-2 text-left text-xs font-semibold tracking-wide text-ink-soft first:pl-0 last:pr-0', num && 'text-right', className)} {...rest} />;
}
export function Td({ className, num, ...rest }: TdHTMLAttributes<HTMLTableCellElement> & { num?: boolean }) {
  return <td className={cx('border-b border-rule px-2 py-2 align-top first:pl-0 last:pr-0', num && 'num text-right', className)} {...rest} />;
}
