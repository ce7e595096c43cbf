import { useMemo, useState } from 'react';
import { Link, useSearchParams } from 'react-router';
import { useChallenges, type ChallengeSummary } from '@/features/challenges/api/get-challenges';
import { formatDate, formatPercent, formatRelative } from '@/lib/format';
import { Badge, EmptyState, ErrorState, PageLoading, TrackMark, cx, inputClass } from '@/components/ui';
import { EntryStatusBadge, entryStatus } from './submissions-status';

/** "chain, 60 sites", "heavy-hex 3 × 3" */
export function describeLattice(l: ChallengeSummary['lattice']): string {
  if (!l) return '—';
  const n = l.n ?? l.qubits;
  if (typeof l.rows === 'number' && typeof l.cols === 'number') return `${l.kind} ${l.rows} × ${l.cols}`;
  if (typeof n === 'number') return `${l.kind}, ${n} sites`;
  return String(l.kind);
}

/** whether it takes entries now (the server's answer: open, opens <date>, closed), and a sealed round */
export function StateBadge({ c }: { c: Pick<ChallengeSummary, 'state' | 'sealedTargets' | 'submissions'> }) {
  return (
    <span className="inline-flex flex-wrap gap-1">
      <EntryStatusBadge state={c.state} s={c.submissions} />
      {c.sealedTargets > 0 && <Badge tone="consensus">sealed round</Badge>}
    </span>
  );
}

/** the share of targets with an exact reference, as a small bar with its number */
export function ExactShare({ exact, total, className }: { exact: number; total: number; className?: string }) {
  const f = total ? exact / total : 0;
  return (
    <span className={cx('inline-flex items-center gap-2', className)} title={`${exact} of ${total} targets have an exact reference`}>
      <span className="relative inline-block h-1.5 w-14 overflow-hidden rounded-full bg-consensus-soft ring-1 ring-consensus/25" aria-hidden="true">
        <span className="absolute inset-y-0 left-0 bg-exact" style={{ width: `${Math.round(f * 100)}%` }} />
      </span>
      <span className="num text-sm">{formatPercent(f)}</span>
      <span className="sr-only">{exact} of {total} targets have an exact reference</span>
    </span>
  );
}

export function EntryCounts({ e }: { e: ChallengeSummary['entries'] }) {
  return (
    <span className="inline-flex items-center gap-3 whitespace-nowrap">
      <span className="inline-flex items-center gap-1" title="hardware entries"><TrackMark track="hardware" size={10} /><span className="num">{e.hardware}</span><span className="sr-only"> hardware</span></span>
      <span className="inline-flex items-center gap-1" title="classical entries"><TrackMark track="classical" size={10} /><span className="num">{e.classical}</span><span className="sr-only"> classical</span></span>
    </span>
  );
}

type SortKey = 'title' | 'qubits' | 'depth' | 'targets' | 'exact' | 'entries' | 'lastActivity';
const sortValue: Record<SortKey, (c: ChallengeSummary) => number | string> = {
  title: (c) => c.title.toLowerCase(),
  qubits: (c) => c.qubits ?? -1,
  depth: (c) => c.steps?.max ?? -1,
  targets: (c) => c.targets,
  exact: (c) => (c.targets ? c.exactTargets / c.targets : -1),
  entries: (c) => c.entries.hardware + c.entries.classical,
  lastActivity: (c) => c.lastActivity ?? '',
};

const stateOf = (c: ChallengeSummary) => {
  const k = entryStatus(c.state, c.submissions).key;
  return c.sealedTargets > 0 ? ['sealed', k] : [k];
};
const STATE_OPTION: Record<string, string> = { sealed: 'sealed round', open: 'open for entries', upcoming: 'opens later', closed: 'closed for entries', draft: 'draft' };

/**
 * The catalogue: search, filters (lattice, state, track with entries), a sortable table at
 * desktop and cards at phone width. `layout="cards"` keeps the cards at every width (home page).
 */
export function ChallengeCatalogue({ layout = 'auto' }: { layout?: 'auto' | 'cards' }) {
  const q = useChallenges();
  const [params, setParams] = useSearchParams();
  const search = params.get('q') ?? '';
  const lattice = params.get('lattice') ?? '';
  const state = params.get('state') ?? '';
  const track = params.get('track') ?? '';
  const [sort, setSort] = useState<{ key: SortKey; desc: boolean }>({ key: 'lastActivity', desc: true });
  const set = (k: string, v: string) =>
    setParams((p) => {
      const n = new URLSearchParams(p);
      if (v) n.set(k, v);
      else n.delete(k);
      return n;
    }, { replace: true });

  const all = useMemo(() => q.data?.challenges ?? [], [q.data]);
  const kinds = useMemo(() => [...new Set(all.map((c) => c.lattice?.kind).filter(Boolean) as string[])].sort(), [all]);
  const states = useMemo(() => [...new Set(all.flatMap(stateOf))].sort(), [all]);
  const list = useMemo(() => {
    const s = search.trim().toLowerCase();
    const out = all.filter(
      (c) =>
        (!s || `${c.title} ${c.summary} ${c.slug} ${c.lattice?.kind ?? ''}`.toLowerCase().includes(s)) &&
        (!lattice || c.lattice?.kind === lattice) &&
        (!state || stateOf(c).includes(state)) &&
        (!track || (track === 'hardware' ? c.entries.hardware > 0 : track === 'classical' ? c.entries.classical > 0 : c.entries.hardware > 0 && c.entries.classical > 0)),
    );
    const f = sortValue[sort.key];
    return out.sort((a, b) => {
      const x = f(a), y = f(b);
      const r = x < y ? -1 : x > y ? 1 : 0;
      return sort.desc ? -r : r;
    });
  }, [all, search, lattice, state, track, sort]);

  if (q.isPending) return <PageLoading label="Loading the challenges…" />;
  if (q.isError) return <ErrorState error={q.error} retry={() => q.refetch()} />;
  if (!all.length)
    return (
      <EmptyState title="No challenges are published yet">
        Moderators publish challenges here; come back soon.
      </EmptyState>
    );

  const filtered = Boolean(search || lattice || state || track);
  return (
    <div className="space-y-4">
      <form role="search" className="grid grid-cols-2 gap-2 sm:grid-cols-[minmax(0,1fr)_auto_auto_auto]" onSubmit={(e) => e.preventDefault()}>
        <label className="col-span-2 sm:col-span-1">
          <span className="sr-only">Search challenges</span>
          <input type="search" value={search} onChange={(e) => set('q', e.target.value)} placeholder="Search title, lattice, slug…" className={inputClass(false, 'h-9 text-sm')} aria-label="Search challenges" />
        </label>
        <label className="text-sm">
          <span className="sr-only">Lattice</span>
          <select aria-label="Lattice" value={lattice} onChange={(e) => set('lattice', e.target.value)} className={inputClass(false, 'h-9 w-full pr-7 text-sm')}>
            <option value="">any lattice</option>
            {kinds.map((k) => <option key={k} value={k}>{k}</option>)}
          </select>
        </label>
        <label className="text-sm">
          <span className="sr-only">State</span>
          <select aria-label="State" value={state} onChange={(e) => set('state', e.target.value)} className={inputClass(false, 'h-9 w-full pr-7 text-sm')}>
            <option value="">any state</option>
            {states.map((k) => <option key={k} value={k}>{STATE_OPTION[k] ?? k}</option>)}
          </select>
        </label>
        <label className="col-span-2 text-sm sm:col-span-1">
          <span className="sr-only">Entries from</span>
          <select aria-label="Entries from" value={track} onChange={(e) => set('track', e.target.value)} className={inputClass(false, 'h-9 w-full pr-7 text-sm')}>
            <option value="">entries from any track</option>
            <option value="hardware">with hardware entries</option>
            <option value="classical">with classical entries</option>
            <option value="both">with entries from both</option>
          </select>
        </label>
      </form>
      <p className="num text-sm text-ink-soft" aria-live="polite">
        {list.length} of {all.length} challenges
        {filtered && (
          <button type="button" className="ml-2 underline decoration-rule-strong hover:decoration-ink" onClick={() => setParams(new URLSearchParams(), { replace: true })}>clear filters</button>
        )}
      </p>
      {list.length === 0 ? (
        <EmptyState title="No challenge matches">Try a shorter search or clear the filters.</EmptyState>
      ) : (
        <>
          {layout === 'auto' && <CatalogueTable list={list} sort={sort} setSort={setSort} />}
          <ul className={cx('divide-y divide-rule border-y border-rule', layout === 'auto' && 'md:hidden')} data-testid="challenge-list">
            {list.map((c) => <ChallengeCard key={c.slug} c={c} />)}
          </ul>
        </>
      )}
    </div>
  );
}

function CatalogueTable({ list, sort, setSort }: { list: ChallengeSummary[]; sort: { key: SortKey; desc: boolean }; setSort: (s: { key: SortKey; desc: boolean }) => void }) {
  const head = (key: SortKey | null, label: string, num = false) => {
    const on = key && sort.key === key;
    return (
      <th scope="col" aria-sort={on ? (sort.desc ? 'descending' : 'ascending') : undefined} className={cx('border-b border-rule-strong px-2 py-2 text-xs font-semibold text-ink-soft first:pl-0 last:pr-0', num ? 'text-right' : 'text-left')}>
        {key ? (
          <button type="button" onClick={() => setSort({ key, desc: on ? !sort.desc : key !== 'title' })} className="inline-flex items-center gap-1 hover:text-ink">
            {label}
            <span aria-hidden="true" className="w-2 text-ink">{on ? (sort.desc ? '↓' : '↑') : ''}</span>
          </button>
        ) : label}
      </th>
    );
  };
  return (
    <div className="hidden md:block">
      <table className="w-full border-collapse text-sm" data-testid="challenge-table">
        <caption className="sr-only">Published challenges; the column buttons sort the table</caption>
        <thead>
          <tr>
            {head('title', 'Challenge')}
            {head(null, 'Lattice')}
            {head('qubits', 'Qubits', true)}
            {head('depth', 'Steps', true)}
            {head('targets', 'Targets', true)}
            {head('exact', 'Exact')}
            {head('entries', 'Entries')}
            {head('lastActivity', 'Last activity', true)}
            {head(null, 'State')}
          </tr>
        </thead>
        <tbody>
          {list.map((c) => (
            <tr key={c.slug} className="hover:bg-paper-sunk/60">
              <td className="border-b border-rule py-2.5 pr-2 align-top">
                <Link to={`/challenges/${encodeURIComponent(c.slug)}`} className="font-medium no-underline hover:underline">{c.title}</Link>
                <div className="text-xs text-ink-faint"><code>{c.slug}</code>{c.version !== null && <> · v{c.version}</>}</div>
              </td>
              <td className="border-b border-rule px-2 py-2.5 align-top whitespace-nowrap">{describeLattice(c.lattice)}</td>
              <td className="num border-b border-rule px-2 py-2.5 text-right align-top">{c.qubits ?? '—'}</td>
              <td className="num border-b border-rule px-2 py-2.5 text-right align-top whitespace-nowrap">{c.steps ? `${c.steps.min}–${c.steps.max}` : '—'}</td>
              <td className="num border-b border-rule px-2 py-2.5 text-right align-top">{c.targets}</td>
              <td className="border-b border-rule px-2 py-2.5 align-top"><ExactShare exact={c.exactTargets} total={c.targets} /></td>
              <td className="border-b border-rule px-2 py-2.5 align-top"><EntryCounts e={c.entries} /></td>
              <td className="num border-b border-rule px-2 py-2.5 text-right align-top whitespace-nowrap" title={formatDate(c.lastActivity)}>{formatRelative(c.lastActivity)}</td>
              <td className="border-b border-rule py-2.5 pl-2 align-top"><StateBadge c={c} /></td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

function ChallengeCard({ c }: { c: ChallengeSummary }) {
  return (
    <li className="py-4">
      <div className="flex flex-wrap items-baseline justify-between gap-x-3 gap-y-1">
        <h3 className="text-lg font-medium">
          <Link to={`/challenges/${encodeURIComponent(c.slug)}`} className="no-underline hover:underline">{c.title}</Link>
        </h3>
        <StateBadge c={c} />
      </div>
      <p className="mt-1 line-clamp-3 text-sm text-ink-soft">{c.summary}</p>
      <dl className="mt-2 grid grid-cols-2 gap-x-4 gap-y-1 text-sm sm:grid-cols-4">
        <div><dt className="text-xs text-ink-faint">Lattice</dt><dd>{describeLattice(c.lattice)} <span className="num text-ink-soft">· {c.qubits ?? '—'} q</span></dd></div>
        <div><dt className="text-xs text-ink-faint">Steps · targets</dt><dd className="num">{c.steps ? `${c.steps.min}–${c.steps.max}` : '—'} · {c.targets}</dd></div>
        <div><dt className="text-xs text-ink-faint">Exact references</dt><dd><ExactShare exact={c.exactTargets} total={c.targets} /></dd></div>
        <div><dt className="text-xs text-ink-faint">Entries · {formatRelative(c.lastActivity)}</dt><dd><EntryCounts e={c.entries} /></dd></div>
      </dl>
    </li>
  );
}
