import { useMemo, useState } from 'react';
import { Link, useNavigate, useSearchParams } from 'react-router';
import { useEntry, type Entry } from '@/features/entries/api/get-entry';
import { useTargets } from '@/features/challenges/api/get-targets';
import { useCompareChoices } from '@/features/compare/api/use-compare-choices';
import { compareRows, summarise, type CompareRow, type Valued } from '@/features/compare/lib/compare';
import { Badge, EmptyState, ErrorState, Measured, PageHeader, PageLoading, Panel, Table, Td, Th, buttonClass, inputClass } from '@/components/ui';
import { chiSquaredText, estimatorName, formatSig, naturalCompare } from '@/lib/format';
import { useDocumentTitle } from '@/lib/use-document-title';

const PAGE = 60;
const CONSENSUS = 'consensus';

/** /compare?a=<entry>&b=<entry or "consensus">: two sets of estimates target by target */
export function Component() {
  const [params] = useSearchParams();
  const a = params.get('a') ?? '';
  const b = params.get('b') ?? CONSENSUS;
  const qa = useEntry(a);
  const qb = useEntry(b === CONSENSUS ? '' : b);
  useDocumentTitle(qa.data ? `Compare ${qa.data.label}` : 'Compare');
  if (!a) return <EmptyState title="Nothing to compare">Open an entry and choose &ldquo;Compare with&rdquo;.</EmptyState>;
  if (qa.isPending || (b !== CONSENSUS && qb.isPending)) return <PageLoading label="Loading the two entries…" />;
  if (qa.isError) return <ErrorState error={qa.error} retry={() => qa.refetch()} />;
  if (b !== CONSENSUS && qb.isError) return <ErrorState error={qb.error} retry={() => qb.refetch()} />;
  return <Comparison a={qa.data} b={b === CONSENSUS ? null : qb.data ?? null} />;
}

function valuesOf(e: Entry): Map<string, Valued> {
  return new Map((e.document?.estimates ?? []).map((x) => [x.target, { value: x.value, uncertainty: x.uncertainty }]));
}

function Comparison({ a, b }: { a: Entry; b: Entry | null }) {
  const slug = a.challenge.slug;
  const tq = useTargets(slug);
  const [all, setAll] = useState(false);
  const [filter, setFilter] = useState('');
  const rows = useMemo((): CompareRow[] => {
    if (b) return compareRows(valuesOf(a), valuesOf(b));
    // against the consensus: the degree of equivalence the server computed for each estimate
    // (u(d) accounts for the entry being part of the consensus or not)
    const cons = new Map((tq.data?.targets ?? []).map((t) => [t.key, t.consensus]));
    const score = new Map((a.scores ?? []).map((s) => [s.target, s.consensus]));
    return [...valuesOf(a)].sort((x, y) => naturalCompare(x[0], y[0])).map(([target, v]) => {
      const c = cons.get(target), s = score.get(target);
      const bv = c && c.value !== null && c.uncertainty !== null ? { value: c.value, uncertainty: c.uncertainty } : null;
      return { target, a: v, b: bv, d: s ? s.d : null, u: s ? s.U / 2 : null, U: s ? s.U : null };
    });
  }, [a, b, tq.data]);
  const sum = useMemo(() => summarise(rows), [rows]);
  const shown = rows.filter((r) => !filter || r.target.includes(filter));
  const page = all ? shown : shown.slice(0, PAGE);
  const bName = b ? b.label : 'the consensus';
  return (
    <div className="space-y-6">
      <PageHeader kicker={<><Link to={`/challenges/${encodeURIComponent(slug)}`}>{slug}</Link> · comparison</>} title={<>{a.label} <span className="text-ink-soft">vs</span> {bName}</>}>
        <p className="text-sm">d = <Link to={`/entries/${a.id}`}>{a.label}</Link> − {b ? <Link to={`/entries/${b.id}`}>{b.label}</Link> : <>the consensus{tq.data?.estimator ? ` (${estimatorName(tq.data.estimator)})` : ''}</>}, target by target.</p>
      </PageHeader>
      <Pickers slug={slug} a={a.id} b={b?.id ?? CONSENSUS} />
      <Panel title="Summary" id="compare-summary" description={b ? <>Differences of two independent methods: u(d)² = u<sub>a</sub>² + u<sub>b</sub>², U = 2u(d).</> : "Degrees of equivalence with the consensus, as on the entry's page: U = 2u(d)."}>
        <dl className="grid grid-cols-2 gap-x-6 gap-y-3 text-sm sm:grid-cols-4" data-testid="compare-summary">
          <div><dt className="text-xs text-ink-soft">Targets both answered</dt><dd className="num text-lg">{sum.common}</dd></div>
          <div><dt className="text-xs text-ink-soft">χ² of the differences per degree of freedom</dt><dd className="num text-lg">{chiSquaredText(sum.chi2, sum.nu)}</dd></div>
          <div><dt className="text-xs text-ink-soft">p-value</dt><dd className="num text-lg">{formatSig(sum.p, 2)}</dd></div>
          <div><dt className="text-xs text-ink-soft">|d| above U</dt><dd className="num text-lg">{sum.outside} of {sum.common}</dd></div>
          <div><dt className="text-xs text-ink-soft">Mean difference</dt><dd className="num text-lg">{formatSig(sum.meanD, 2)}</dd></div>
          <div><dt className="text-xs text-ink-soft">Root-mean-square difference</dt><dd className="num text-lg">{formatSig(sum.rmsD, 2)}</dd></div>
          <div><dt className="text-xs text-ink-soft">Only in {a.label}</dt><dd className="num text-lg">{sum.onlyA}</dd></div>
          <div><dt className="text-xs text-ink-soft">Only in {bName}</dt><dd className="num text-lg">{sum.onlyB}</dd></div>
        </dl>
        <p className="mt-3 text-xs text-ink-soft">If both sets of uncertainties are honest and the methods agree, χ² is close to its number of degrees of freedom and about 5 % of the differences exceed U.</p>
      </Panel>
      <Panel title="Target by target" id="compare-rows" description={<span className="num">{shown.length} targets</span>}>
        <label className="mb-3 block">
          <span className="sr-only">Filter targets</span>
          <input type="search" placeholder="Filter targets, e.g. t4- or :z3" value={filter} onChange={(e) => setFilter(e.target.value)} className={inputClass(false, 'w-full sm:w-64', true)} aria-label="Filter targets" />
        </label>
        <p className="mb-2 text-xs text-ink-soft sm:hidden">A = {a.label}; B = {bName}.</p>
        <Table aria-label={`${a.label} and ${bName}, target by target`} data-testid="compare-table">
          <thead><tr><Th>Target</Th><Th num><span className="sm:hidden" aria-hidden="true">A</span><span className="sr-only sm:not-sr-only">{a.label}</span></Th><Th num><span className="sm:hidden" aria-hidden="true">B</span><span className="sr-only sm:not-sr-only">{bName}</span></Th><Th num>d</Th><Th num className="hidden sm:table-cell">U</Th><Th num>|d|/U</Th></tr></thead>
          <tbody>
            {page.map((r) => {
              const ratio = r.d !== null && r.U ? Math.abs(r.d) / r.U : null;
              return (
                <tr key={r.target}>
                  <Td><Link to={`/challenges/${encodeURIComponent(slug)}/targets/${encodeURIComponent(r.target)}`}><code className="text-[11px] break-all sm:text-xs sm:break-normal sm:whitespace-nowrap">{r.target}</code></Link></Td>
                  <Td num>{r.a ? <Measured value={r.a.value} u={r.a.uncertainty} /> : '—'}</Td>
                  <Td num>{r.b ? <Measured value={r.b.value} u={r.b.uncertainty} /> : '—'}</Td>
                  <Td num>{r.d === null ? '—' : formatSig(r.d, 2)}</Td>
                  <Td num className="hidden sm:table-cell">{r.U === null ? '—' : formatSig(r.U, 2)}</Td>
                  <Td num>{ratio === null ? '—' : ratio > 1 ? <Badge tone="danger">{formatSig(ratio, 2)}</Badge> : formatSig(ratio, 2)}</Td>
                </tr>
              );
            })}
          </tbody>
        </Table>
        {shown.length > PAGE && <button type="button" className={buttonClass('ghost', 'sm', 'mt-2')} onClick={() => setAll(!all)} aria-expanded={all}>{all ? 'Show fewer' : `Show all ${shown.length} targets`}</button>}
      </Panel>
    </div>
  );
}

function Pickers({ slug, a, b }: { slug: string; a: string; b: string }) {
  const choices = useCompareChoices(slug);
  const navigate = useNavigate();
  const go = (na: string, nb: string) => navigate(`/compare?a=${encodeURIComponent(na)}&b=${encodeURIComponent(nb)}`);
  return (
    <div className="flex flex-wrap items-end gap-3 text-sm">
      <label><span className="block text-xs text-ink-soft">Entry</span>
        <select value={a} onChange={(e) => go(e.target.value, b)} className={inputClass(false, 'w-64 max-w-full', true)}>
          {!choices.some((x) => x.id === a) && <option value={a}>this entry</option>}
          {choices.map((x) => <option key={x.id} value={x.id}>{x.label} ({x.teamName})</option>)}
        </select>
      </label>
      <label><span className="block text-xs text-ink-soft">Compared with</span>
        <select value={b} onChange={(e) => go(a, e.target.value)} className={inputClass(false, 'w-64 max-w-full', true)}>
          <option value={CONSENSUS}>the consensus</option>
          {choices.filter((x) => x.id !== a).map((x) => <option key={x.id} value={x.id}>{x.label} ({x.teamName})</option>)}
        </select>
      </label>
    </div>
  );
}
