/**
 * The editable table of estimates (target, value, uncertainty, kind) for small entries. A problem
 * whose pointer names a cell (/estimates/3/uncertainty) marks that cell and shows its message
 * under it. Pasting several lines from a spreadsheet into any cell fills rows from there.
 */
import { memo, useMemo, useRef, type ClipboardEvent } from 'react';
import { createColumnHelper, tableFeatures, useTable } from '@tanstack/react-table';
import { Button, cx, inputClass } from '@/components/ui';
import { emptyRow, rowsFromTsv, UNCERTAINTY_KINDS, type EstimateRow, type Problem } from '../lib/entry-form';
import { locate } from '../lib/entry-form';

/** what changed in the rows: one removed, or lines pasted over rows from..from+count-1 (with the paste's own problems) */
export interface RowsChange { removed?: number; pasted?: { from: number; count: number; problems: Problem[] } }

const features = tableFeatures({});
/** on a phone each row is two lines: # target ×, then value, uncertainty, kind */
const PHONE_CELL: Record<string, string> = {
  n: 'max-sm:col-span-1', target: 'max-sm:col-span-5', remove: 'max-sm:order-1 max-sm:col-span-1 max-sm:justify-self-end',
  value: 'max-sm:order-2 max-sm:col-span-2', uncertainty: 'max-sm:order-2 max-sm:col-span-2', kind: 'max-sm:order-2 max-sm:col-span-3',
};
const helper = createColumnHelper<typeof features, EstimateRow>();

type Column = 'target' | 'value' | 'uncertainty' | 'kind';
export interface CellProblems { get(row: number, column: Column | 'row'): string | undefined }

export function cellProblems(problems: Problem[]): CellProblems {
  const m = new Map<string, string>();
  for (const p of problems) {
    const l = locate(p.path);
    if (l.kind === 'cell' && !m.has(`${l.row}:${l.column}`)) m.set(`${l.row}:${l.column}`, p.message);
    if (l.kind === 'row' && !m.has(`${l.row}:row`)) m.set(`${l.row}:row`, p.message);
  }
  return { get: (row, column) => m.get(`${row}:${column}`) };
}

interface CellProps { index: number; row: EstimateRow; column: Column; error?: string; targets: string[]; onChange: (index: number, column: Column, value: string) => void }

const Cell = memo(function Cell({ index, row, column, error, targets, onChange }: CellProps) {
  const id = `est-${index}-${column}`;
  const errId = error ? `${id}-err` : undefined;
  const label = `${column === 'kind' ? 'Uncertainty kind' : column[0].toUpperCase() + column.slice(1)}, row ${index + 1}`;
  const common = { id, 'aria-label': label, 'aria-invalid': error ? true : undefined, 'aria-describedby': errId, 'data-invalid': error ? 'true' : undefined };
  let control;
  if (column === 'target') {
    const known = !row.target || targets.includes(row.target);
    control = (
      <select {...common} value={row.target} onChange={(e) => onChange(index, column, e.target.value)} className={inputClass(Boolean(error), 'w-full min-w-0 pr-7 font-mono text-xs sm:min-w-48', true)}>
        <option value="">choose a target…</option>
        {!known && <option value={row.target}>{row.target} (not a target)</option>}
        {targets.map((t) => <option key={t} value={t}>{t}</option>)}
      </select>
    );
  } else if (column === 'kind') {
    control = (
      <select {...common} value={row.kind} onChange={(e) => onChange(index, column, e.target.value)} className={inputClass(Boolean(error), 'w-full min-w-0 pr-7 sm:min-w-28', true)}>
        {!UNCERTAINTY_KINDS.includes(row.kind) && <option value={row.kind}>{row.kind || '—'}</option>}
        {UNCERTAINTY_KINDS.map((k) => <option key={k} value={k}>{k}</option>)}
      </select>
    );
  } else {
    control = (
      <input
        {...common}
        inputMode="decimal"
        autoComplete="off"
        placeholder={column === 'value' ? 'value' : 'u (1σ)'}
        value={column === 'value' ? row.value : row.uncertainty}
        onChange={(e) => onChange(index, column, e.target.value)}
        className={inputClass(Boolean(error), 'num w-full min-w-0 text-right sm:min-w-24', true)}
      />
    );
  }
  return (
    <div>
      {control}
      {error && <p id={errId} className="mt-1 max-w-64 text-xs text-danger" data-testid={`cell-error-${index}-${column}`}>{error}</p>}
    </div>
  );
});

export function EstimatesTable({ rows, onRowsChange, targets, problems }: {
  rows: EstimateRow[];
  onRowsChange: (rows: EstimateRow[], change: RowsChange) => void;
  targets: string[];
  problems: CellProblems;
}) {
  const latest = useRef(rows);
  latest.current = rows;
  const change = useRef(onRowsChange);
  change.current = onRowsChange;
  const onCell = useMemo(() => (index: number, column: Column, value: string) => {
    const next = latest.current.slice();
    const key = column === 'kind' ? 'kind' : column;
    next[index] = { ...next[index], [key]: value };
    change.current(next, {});
  }, []);

  const columns = useMemo(
    () =>
      helper.columns([
        helper.display({ id: 'n', header: '#', cell: (c) => <span className="num text-ink-faint">{c.row.index + 1}</span> }),
        helper.accessor('target', { header: 'Target', cell: (c) => <Cell index={c.row.index} row={c.row.original} column="target" error={problems.get(c.row.index, 'target') ?? problems.get(c.row.index, 'row')} targets={targets} onChange={onCell} /> }),
        helper.accessor('value', { header: 'Value', cell: (c) => <Cell index={c.row.index} row={c.row.original} column="value" error={problems.get(c.row.index, 'value')} targets={targets} onChange={onCell} /> }),
        helper.accessor('uncertainty', { header: 'Uncertainty (1σ)', cell: (c) => <Cell index={c.row.index} row={c.row.original} column="uncertainty" error={problems.get(c.row.index, 'uncertainty')} targets={targets} onChange={onCell} /> }),
        helper.accessor('kind', { header: 'Kind', cell: (c) => <Cell index={c.row.index} row={c.row.original} column="kind" error={problems.get(c.row.index, 'kind')} targets={targets} onChange={onCell} /> }),
        helper.display({
          id: 'remove', header: () => <span className="sr-only">Remove</span>,
          cell: (c) => (
            <button
              type="button"
              aria-label={`Remove row ${c.row.index + 1}`}
              onClick={() => { const next = latest.current.slice(); next.splice(c.row.index, 1); change.current(next, { removed: c.row.index }); }}
              className="grid size-8 place-items-center rounded text-ink-soft hover:bg-paper-sunk hover:text-danger"
            >
              <svg width="12" height="12" viewBox="0 0 12 12" aria-hidden="true"><path d="M2 2l8 8M10 2l-8 8" stroke="currentColor" strokeWidth="1.6" /></svg>
            </button>
          ),
        }),
      ]),
    [problems, targets, onCell],
  );
  const table = useTable({ features, columns, data: rows, getRowId: (r) => r.id });

  /** several pasted lines (or tab-separated cells) fill rows from the focused one */
  const onPaste = (e: ClipboardEvent<HTMLTableSectionElement>) => {
    const text = e.clipboardData.getData('text/plain');
    if (!text.includes('\n') && !text.includes('\t')) return;
    const m = /^est-(\d+)-/.exec((e.target as HTMLElement).id ?? '');
    const start = m ? Number(m[1]) : latest.current.length;
    const { rows: pasted, problems: pastedProblems } = rowsFromTsv(text, 'statistical', start);
    if (!pasted.length) return;
    e.preventDefault();
    const next = latest.current.slice();
    pasted.forEach((r, i) => {
      const at = start + i;
      next[at] = next[at] ? { ...next[at], target: r.target, value: r.value, uncertainty: r.uncertainty, kind: r.kind } : r;
    });
    change.current(next, { pasted: { from: start, count: pasted.length, problems: pastedProblems } });
  };

  return (
    <div className="space-y-2">
      <div className="relative -mx-4 overflow-x-auto px-4 sm:mx-0 sm:px-0">
        <table className="w-full border-collapse text-sm sm:min-w-[40rem]" data-testid="estimates-table">
          <thead className="max-sm:sr-only">
            {table.getHeaderGroups().map((g) => (
              <tr key={g.id}>
                {g.headers.map((h) => (
                  <th key={h.id} scope="col" className={cx('border-b border-rule-strong px-1.5 py-2 text-left text-xs font-semibold tracking-wide text-ink-soft first:pl-0', (h.column.id === 'value' || h.column.id === 'uncertainty') && 'text-right')}>
                    <table.FlexRender header={h} />
                  </th>
                ))}
              </tr>
            ))}
          </thead>
          <tbody onPaste={onPaste}>
            {table.getRowModel().rows.map((r) => (
              <tr key={r.id} className={cx('max-sm:grid max-sm:grid-cols-7 max-sm:gap-1.5 max-sm:border-b max-sm:border-rule max-sm:py-2', problems.get(r.index, 'row') && 'bg-danger-soft/40')}>
                {r.getAllCells().map((c) => (
                  <td key={c.id} className={cx('px-1.5 align-top first:pl-0 sm:border-b sm:border-rule sm:py-1.5 max-sm:px-0', PHONE_CELL[c.column.id], c.column.id === 'n' && 'w-8 pt-2 sm:pt-3', c.column.id === 'remove' && 'w-8')}>
                    <table.FlexRender cell={c} />
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <div className="flex flex-wrap items-center gap-3">
        <Button size="sm" variant="secondary" onClick={() => change.current([...latest.current, emptyRow()], {})}>Add a row</Button>
        <span className="text-xs text-ink-soft">Paste rows from a spreadsheet into any cell: target, value, uncertainty, kind (tab-separated).</span>
      </div>
    </div>
  );
}
