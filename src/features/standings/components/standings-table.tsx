import { useMemo, useState } from 'react';
import { Link } from 'react-router';
import {
  columnFilteringFeature,
  createColumnHelper,
  createFilteredRowModel,
  createSortedRowModel,
  filterFn_equals,
  rowSortingFeature,
  sortFn_alphanumeric,
  sortFn_basic,
  sortFn_text,
  tableFeatures,
  useTable,
} from '@tanstack/react-table';
import { METRIC_SCOPE, type StandingsEntry } from '@/features/standings/api/get-standings';
import { formatHours, formatMetric, formatPercent, formatSig } from '@/lib/format';
import { Badge, Provenance, ProvenanceList, TrackMark, cx } from '@/components/ui';

const features = tableFeatures({
  rowSortingFeature,
  columnFilteringFeature,
  sortedRowModel: createSortedRowModel(),
  filteredRowModel: createFilteredRowModel(),
  sortFns: { alphanumeric: sortFn_alphanumeric, text: sortFn_text, basic: sortFn_basic },
  filterFns: { equals: filterFn_equals },
});
const helper = createColumnHelper<typeof features, StandingsEntry>();
const orUndef = (x: number | null | undefined) => (x === null || x === undefined || !Number.isFinite(x) ? undefined : x);

export function CostCell({ e }: { e: StandingsEntry }) {
  const h = e.metrics.costHours;
  if (h === null) return <span className="text-ink-faint">not declared</span>;
  const c = e.cost;
  // classical compute (CPU core-hours + GPU hours) and QPU time are different resources: shown apart
  const classical = c.cpuCoreHours !== undefined || c.gpuHours !== undefined ? (c.cpuCoreHours ?? 0) + (c.gpuHours ?? 0) : null;
  const qpu = c.qpuSeconds !== undefined ? c.qpuSeconds / 3600 : null;
  return (
    <span className="inline-flex items-baseline whitespace-nowrap">
      <span className="num">
        {classical !== null && <span title="CPU core-hours + GPU hours">{formatHours(classical)} compute</span>}
        {classical !== null && qpu !== null && <span aria-hidden="true"> · </span>}
        {qpu !== null && <span title="QPU time">{formatHours(qpu)} QPU</span>}
        {classical === null && qpu === null && formatHours(h)}
      </span>
      <Provenance label={`Cost parts of ${e.label}`}>
        <p className="mb-1 font-medium">Declared cost</p>
        <ProvenanceList
          items={[
            ['CPU core-hours', c.cpuCoreHours !== undefined ? formatSig(c.cpuCoreHours, 3) : '—'],
            ['GPU hours', c.gpuHours !== undefined ? formatSig(c.gpuHours, 3) : '—'],
            ['QPU seconds', c.qpuSeconds !== undefined ? formatSig(c.qpuSeconds, 3) : '—'],
            ['Wall time', c.wallTimeSeconds !== undefined ? `${formatSig(c.wallTimeSeconds / 3600, 3)} h` : '—'],
          ]}
        />
        <p className="mt-2 text-ink-soft">Classical compute (CPU core-hours + GPU hours) and QPU time are shown apart; sorting by cost uses their plain sum (QPU seconds / 3600 as hours). The parts are stated as declared.</p>
      </Provenance>
    </span>
  );
}

const metricCell = (x: number | null | undefined) => <span className="num">{formatMetric(x)}</span>;

/** The rank with its 95% bootstrap interval; the house baseline is a reference row, not ranked. */
export function RankCell({ e }: { e: StandingsEntry }) {
  if (e.rank === null) return <span className="text-xs text-ink-soft" title="The house baseline is shown for reference and never ranked">ref.</span>;
  const iv = e.rankInterval;
  return (
    <span className="whitespace-nowrap">
      <span className="num">{e.tiedWithPrevious ? '=' : ''}{e.rank}</span>
      {iv && <span className="num ml-1 text-xs text-ink-soft" title="95% interval of the rank from a bootstrap over the ranked targets">{iv[0] === iv[1] ? `[${iv[0]}]` : `[${iv[0]}–${iv[1]}]`}</span>}
    </span>
  );
}

/** Answered / ranked targets of the metric's scope. */
export function CoverageCell({ e, metric }: { e: StandingsEntry; metric: string }) {
  const c = e.coverage?.[METRIC_SCOPE[metric]?.scope ?? 'overall'];
  if (!c) return <span className="text-ink-faint">—</span>;
  return <span className={cx('num whitespace-nowrap', c.answered < c.ranked && 'text-disputed-ink')} title={`${c.answered} of the ${c.ranked} ranked targets answered; each missing one scores the worst case`}>{c.answered}/{c.ranked}</span>;
}

/** The ranking score (a proper score, lower is better), with its standard error over targets. */
function ScoreCell({ e, metric }: { e: StandingsEntry; metric: string }) {
  const key = METRIC_SCOPE[metric]?.key ?? 'scoreOverall';
  const v = e.metrics[key];
  return (
    <span className="num whitespace-nowrap">
      {formatMetric(v)}
      {key === 'scoreOverall' && e.metrics.scoreOverallSe !== null && e.metrics.scoreOverallSe !== undefined && <span className="ml-1 text-xs text-ink-soft">± {formatMetric(e.metrics.scoreOverallSe, 2)}</span>}
    </span>
  );
}

export function StandingsTable({ entries, metric, slug }: { entries: StandingsEntry[]; metric: string; slug: string }) {
  const [family, setFamily] = useState('');
  // max error, mean z² and grid coverage are shown on request, so that the table fits 1280 px
  const [allMeasures, setAllMeasures] = useState(false);
  const families = useMemo(() => [...new Set(entries.map((e) => e.methodFamily))].sort(), [entries]);
  const columns = useMemo(
    () =>
      helper.columns([
        helper.accessor((r) => r.rank ?? undefined, { id: 'rank', header: 'Rank', sortFn: 'basic', sortUndefined: 'last', cell: (c) => <RankCell e={c.row.original} /> }),
        helper.accessor('label', {
          header: 'Entry',
          sortFn: 'text',
          cell: (c) => {
            const e = c.row.original;
            return (
              <div className="min-w-[10rem]">
                <span className="inline-flex items-center gap-1.5">
                  <TrackMark track={e.track} />
                  <Link to={`/entries/${encodeURIComponent(e.id)}`} className="font-medium">{e.label}</Link>
                  <span className="sr-only">({e.track})</span>
                  <Link to={`/compare?a=${encodeURIComponent(e.id)}&b=consensus`} className="text-xs" aria-label={`Compare ${e.label} with the consensus`}>compare</Link>
                </span>
                <div className="mt-0.5 flex flex-wrap gap-1">
                  {e.isBaseline && <Badge tone="exact">house baseline · reference row, not ranked</Badge>}
                  {e.isBaseline && e.bound && <span className="num text-xs text-ink-soft" title="Truncation bound (sum of the dropped |c|), capped at the observable's bound: a bound, not a standard uncertainty">bound ≤ {formatSig(e.bound.max, 2)} (median {formatSig(e.bound.median, 2)})</span>}
                  {e.featured && <Badge tone="consensus">featured</Badge>}
                  {e.onFront && <Badge tone="ok">on the cost front</Badge>}
                </div>
              </div>
            );
          },
        }),
        helper.accessor('teamName', {
          header: 'Team · method',
          sortFn: 'text',
          cell: (c) => (
            <div>
              <Link to={`/teams/${encodeURIComponent(c.row.original.teamId)}`}>{c.getValue()}</Link>
              <div className="whitespace-nowrap text-xs text-ink-soft">{c.row.original.methodFamily}</div>
            </div>
          ),
        }),
        helper.accessor((r) => orUndef(r.metrics[METRIC_SCOPE[metric]?.key ?? 'scoreOverall']), { id: 'score', header: 'Score', sortFn: 'basic', sortUndefined: 'last', cell: (c) => <ScoreCell e={c.row.original} metric={metric} /> }),
        helper.accessor((r) => (r.coverage ? r.coverage[METRIC_SCOPE[metric]?.scope ?? 'overall'].answered : undefined), { id: 'answered', header: 'Answered', sortFn: 'basic', sortUndefined: 'last', cell: (c) => <CoverageCell e={c.row.original} metric={metric} /> }),
        helper.accessor((r) => orUndef(r.metrics.rmseVerifiable), { id: 'rmse', header: 'RMSE', sortFn: 'basic', sortUndefined: 'last', cell: (c) => metricCell(c.getValue()) }),
        helper.accessor((r) => orUndef(r.metrics.maxErrorVerifiable), { id: 'maxError', header: 'Max error', sortFn: 'basic', sortUndefined: 'last', cell: (c) => metricCell(c.getValue()) }),
        helper.accessor((r) => orUndef(r.metrics.meanZ2Verifiable), { id: 'meanZ2', header: 'Mean z²', sortFn: 'basic', sortUndefined: 'last', cell: (c) => metricCell(c.getValue()) }),
        helper.accessor((r) => orUndef(r.metrics.coveredVerifiable), { id: 'covered', header: 'Covered', sortFn: 'basic', sortUndefined: 'last', cell: (c) => <span className="num">{formatPercent(c.getValue())}</span> }),
        helper.accessor((r) => orUndef(r.metrics.agreementMedianRatio), {
          id: 'agreement',
          header: 'Median |d|/U',
          sortFn: 'basic',
          sortUndefined: 'last',
          cell: (c) => {
            const m = c.row.original.metrics;
            return (
              <span className="num whitespace-nowrap" title={`median |d|/U over ${m.unverifiableScored} targets without exact reference; ${m.outsideInterval} outside |d| ≤ U`}>
                {formatMetric(c.getValue())}
                {m.unverifiableScored > 0 && <span className={cx('ml-1 text-xs', m.outsideInterval > 0 ? 'text-disputed-ink' : 'text-ink-faint')}>{m.outsideInterval} out</span>}
              </span>
            );
          },
        }),
        helper.accessor((r) => r.metrics.gridCoverage, { id: 'grid', header: 'Grid', sortFn: 'basic', cell: (c) => <span className="num">{formatPercent(c.getValue())}</span> }),
        helper.accessor((r) => orUndef(r.metrics.costHours), { id: 'cost', header: 'Cost', sortFn: 'basic', sortUndefined: 'last', cell: (c) => <CostCell e={c.row.original} /> }),
      ]),
    [metric],
  );
  const [sorting, setSorting] = useState([{ id: 'rank', desc: false }]);
  const shown = useMemo(() => (family ? entries.filter((e) => e.methodFamily === family) : entries), [entries, family]);
  const table = useTable({
    features,
    columns,
    data: shown,
    getRowId: (r) => r.id,
    state: { sorting },
    onSortingChange: (u) => setSorting((s) => (typeof u === 'function' ? u(s) : u) as typeof s),
  });
  const rows = table.getRowModel().rows;
  const hidden = new Set(allMeasures ? [] : ['maxError', 'meanZ2', 'grid']);
  const numeric = new Set(['rank', 'score', 'answered', 'rmse', 'maxError', 'meanZ2', 'covered', 'agreement', 'grid', 'cost']);
  const primaryCol: Record<string, string> = { overall: 'score', 'crps-verifiable': 'score', agreement: 'score' };

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center gap-2 text-sm">
        <label className="inline-flex items-center gap-2">
          <span className="text-ink-soft">Method family</span>
          <select value={family} onChange={(e) => setFamily(e.target.value)} className="h-8 rounded border border-rule-strong bg-paper-raised px-2 text-sm" aria-label="Filter by method family">
            <option value="">all</option>
            {families.map((f) => <option key={f} value={f}>{f}</option>)}
          </select>
        </label>
        <label className="hidden items-center gap-1.5 md:inline-flex">
          <input type="checkbox" checked={allMeasures} onChange={(e) => setAllMeasures(e.target.checked)} />
          <span>All measures (max error, mean z², grid)</span>
        </label>
        <Link to="/scoring" className="text-sm">How scoring works</Link>
        <span className="num ml-auto text-ink-soft">{rows.length} of {entries.length} entries</span>
      </div>
      <label className="flex items-center gap-2 text-sm md:hidden">
        <span className="text-ink-soft">Sort by</span>
        <select
          aria-label="Sort the standings by"
          value={`${sorting[0]?.id ?? 'rank'}:${sorting[0]?.desc ? 'desc' : 'asc'}`}
          onChange={(e) => { const [id, dir] = e.target.value.split(':'); setSorting([{ id, desc: dir === 'desc' }]); }}
          className="h-8 rounded border border-rule-strong bg-paper-raised px-2 text-sm"
        >
          <option value="rank:asc">rank</option>
          <option value="score:asc">score, best first</option>
          <option value="answered:desc">answered, most first</option>
          <option value="rmse:asc">RMSE, lowest first</option>
          <option value="maxError:asc">max error, lowest first</option>
          <option value="meanZ2:asc">mean z², lowest first</option>
          <option value="covered:desc">coverage, highest first</option>
          <option value="agreement:asc">agreement, best first</option>
          <option value="cost:asc">cost, cheapest first</option>
        </select>
      </label>
      <ol className="divide-y divide-rule border-y border-rule md:hidden" data-testid="standings-cards">
        {rows.map((r) => {
          const e = r.original, m = e.metrics;
          return (
            <li key={r.id} className={cx('py-3', e.isBaseline && 'bg-exact-soft/50')}>
              <div className="flex items-start gap-3">
                <span className="num w-10 shrink-0 pt-0.5 text-right text-lg font-semibold"><RankCell e={e} /></span>
                <div className="min-w-0 flex-1">
                  <span className="inline-flex items-start gap-1.5">
                    <TrackMark track={e.track} className="mt-1.5" />
                    <Link to={`/entries/${encodeURIComponent(e.id)}`} className="font-medium">{e.label}</Link>
                  </span>
                  <p className="text-sm text-ink-soft">
                    <Link to={`/teams/${encodeURIComponent(e.teamId)}`}>{e.teamName}</Link> · {e.methodFamily}
                  </p>
                  <div className="mt-0.5 flex flex-wrap gap-1">
                    {e.isBaseline && <Badge tone="exact">house baseline · reference row, not ranked</Badge>}
                    {e.onFront && <Badge tone="ok">on the cost front</Badge>}
                  </div>
                  <dl className="mt-2 grid grid-cols-3 gap-x-3 gap-y-1 text-sm">
                    <div className="col-span-2"><dt className="text-xs text-ink-faint">Score</dt><dd><ScoreCell e={e} metric={metric} /></dd></div>
                    <div><dt className="text-xs text-ink-faint">Answered</dt><dd><CoverageCell e={e} metric={metric} /></dd></div>
                    <div><dt className="text-xs text-ink-faint">RMSE</dt><dd className="num">{formatMetric(m.rmseVerifiable)}</dd></div>
                    <div><dt className="text-xs text-ink-faint">Max error</dt><dd className="num">{formatMetric(m.maxErrorVerifiable)}</dd></div>
                    <div><dt className="text-xs text-ink-faint">Mean z²</dt><dd className="num">{formatMetric(m.meanZ2Verifiable)}</dd></div>
                    <div><dt className="text-xs text-ink-faint">Covered</dt><dd className="num">{formatPercent(m.coveredVerifiable)}</dd></div>
                    <div><dt className="text-xs text-ink-faint">Median |d|/U</dt><dd className="num">{formatMetric(m.agreementMedianRatio)}{m.unverifiableScored > 0 && <span className="text-xs text-ink-faint"> {m.outsideInterval} out</span>}</dd></div>
                    <div><dt className="text-xs text-ink-faint">Cost</dt><dd><CostCell e={e} /></dd></div>
                  </dl>
                </div>
              </div>
            </li>
          );
        })}
      </ol>
      <div className="-mx-4 hidden overflow-x-auto px-4 sm:mx-0 sm:px-0 md:block">
        <table className="w-full min-w-[58rem] border-collapse text-sm" data-testid="standings-table">
          <caption className="sr-only">Standings of {slug}: the column buttons sort, the rank is the official order by the chosen metric</caption>
          <thead>
            {table.getHeaderGroups().map((g) => (
              <tr key={g.id}>
                {g.headers.filter((h) => !hidden.has(h.column.id)).map((h) => {
                  const sorted = h.column.getIsSorted();
                  const num = numeric.has(h.column.id);
                  const primary = primaryCol[metric] === h.column.id;
                  return (
                    <th key={h.id} scope="col" aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : undefined} className={cx('border-b border-rule-strong px-2 py-2 text-xs font-semibold tracking-wide first:pl-0 last:pr-0', num ? 'text-right' : 'text-left', primary ? 'text-ink' : 'text-ink-soft')}>
                      <button type="button" onClick={h.column.getToggleSortingHandler()} className={cx('inline-flex items-center gap-1 hover:text-ink', num && 'flex-row-reverse')}>
                        <table.FlexRender header={h} />
                        <span aria-hidden="true" className="w-2 text-ink">{sorted === 'asc' ? '↑' : sorted === 'desc' ? '↓' : ''}</span>
                      </button>
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {rows.map((r) => (
              <tr key={r.id} className={cx(r.original.isBaseline && 'bg-exact-soft/50')} data-testid="standings-row">
                {r.getAllCells().filter((c) => !hidden.has(c.column.id)).map((c) => (
                  <td key={c.id} className={cx('border-b border-rule px-2 py-2 align-top first:pl-0 last:pr-0', numeric.has(c.column.id) && 'text-right')}>
                    <table.FlexRender cell={c} />
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {rows.length === 0 && <p className="text-sm text-ink-soft">No entry of this method family.</p>}
    </div>
  );
}
