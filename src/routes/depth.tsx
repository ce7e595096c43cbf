import { lazy, Suspense, useMemo, useState } from 'react';
import { Link, useParams, useSearchParams } from 'react-router';
import { useChallenge, type ChallengeDetail } from '@/features/challenges/api/get-challenge';
import { useEstimates, type EstimatesResponse } from '@/features/challenges/api/get-estimates';
import { useTargets, type Target } from '@/features/challenges/api/get-targets';
import { observableLabel } from '@/features/challenges/components/spec-section';
import { Legend, LegendMark } from '@/features/challenges/components/chart-bits';
import type { MarkKind } from '@/features/challenges/charts/theme';
import type { DepthGuide, DepthSeries } from '@/features/targets/components/depth-chart';
import { breakCell, gridAxes, type BreakCell } from '@/features/targets/lib/depth';
import { ChartTableToggle, EmptyState, ErrorState, PageHeader, PageLoading, Panel, Table, Td, Th, TrackMark, cx, inputClass } from '@/components/ui';
import { formatAngle, formatMeasurement } from '@/lib/format';
import { useDocumentTitle } from '@/lib/use-document-title';

const DepthChart = lazy(() => import('@/features/targets/components/depth-chart'));

/** /challenges/:slug/depth?observable=&theta=: where each method breaks as the circuit deepens */
export function Component() {
  const { slug = '' } = useParams();
  const q = useChallenge(slug);
  useDocumentTitle(q.data ? `Depth view of ${q.data.title}` : 'Depth view');
  if (q.isPending) return <PageLoading label="Loading the challenge…" />;
  if (q.isError) return <ErrorState error={q.error} retry={() => q.refetch()}><Link to="/challenges">See all challenges</Link></ErrorState>;
  return <DepthView c={q.data} />;
}

function DepthView({ c }: { c: ChallengeDetail }) {
  const [params, setParams] = useSearchParams();
  const obs = params.get('observable') ?? c.observables[0]?.key ?? '';
  const thetas = useMemo(() => [...new Set(c.instances.map((i) => i.params.thetaH ?? 0))].sort((a, b) => a - b), [c.instances]);
  const thetaParam = params.get('theta');
  const theta = thetaParam !== null && thetas.some((t) => t.toFixed(6) === thetaParam) ? thetas.find((t) => t.toFixed(6) === thetaParam)! : thetas[Math.floor(thetas.length / 2)] ?? 0;
  const set = (k: string, v: string) => setParams((p) => { const n = new URLSearchParams(p); n.set(k, v); return n; }, { replace: true });
  const est = useEstimates(c.slug, { observable: obs, raw: 0 }, Boolean(obs));
  const tq = useTargets(c.slug);
  const base = `/challenges/${encodeURIComponent(c.slug)}`;
  return (
    <div className="space-y-6">
      <PageHeader kicker={<><Link to={base}>{c.title}</Link> · depth view</>} title="Where each method breaks as the circuit deepens">
        <p className="text-sm">For one observable: every method&rsquo;s value and error against the number of Trotter steps at one angle, and over the whole grid where its error exceeds the uncertainty it stated.</p>
      </PageHeader>
      <div className="flex flex-wrap items-end gap-3 text-sm">
        <label><span className="block text-xs text-ink-soft">Observable</span>
          <select value={obs} onChange={(e) => set('observable', e.target.value)} className={inputClass(false, 'w-72 max-w-full', true)} data-testid="depth-observable">
            {c.observables.map((o) => <option key={o.key} value={o.key}>{observableLabel(o)}</option>)}
          </select>
        </label>
        <label><span className="block text-xs text-ink-soft">θ<sub>h</sub> for the plots</span>
          <select value={theta.toFixed(6)} onChange={(e) => set('theta', e.target.value)} className={inputClass(false, 'w-32', true)}>
            {thetas.map((t) => <option key={t} value={t.toFixed(6)}>{formatAngle(t)}</option>)}
          </select>
        </label>
      </div>
      {est.isPending || tq.isPending ? <PageLoading label="Loading the estimates…" /> : est.isError ? <ErrorState error={est.error} retry={() => est.refetch()} /> : tq.isError ? <ErrorState error={tq.error} retry={() => tq.refetch()} /> : (
        <DepthBody slug={c.slug} obs={obs} theta={theta} est={est.data} targets={tq.data.targets.filter((t) => t.observable === obs)} />
      )}
    </div>
  );
}

const markOf = (e: EstimatesResponse['entries'][number]): MarkKind => (e.isBaseline ? 'baseline' : e.track);
const exactOf = (t: Target | undefined) => (t?.reference.status === 'exact' ? t.reference.value : null);

function DepthBody({ slug, obs, theta, est, targets }: { slug: string; obs: string; theta: number; est: EstimatesResponse; targets: Target[] }) {
  const [table, setTable] = useState(false);
  const byKey = useMemo(() => new Map(targets.map((t) => [t.key, t])), [targets]);
  const at = useMemo(() => targets.filter((t) => Math.abs((t.params.thetaH ?? 0) - theta) < 1e-9).sort((a, b) => (a.params.steps ?? 0) - (b.params.steps ?? 0)), [targets, theta]);
  const atKeys = new Set(at.map((t) => t.key));
  const { valueSeries, errorSeries, guides } = useMemo(() => {
    const valueSeries: DepthSeries[] = [], errorSeries: DepthSeries[] = [];
    const n = est.entries.length;
    est.entries.forEach((e, i) => {
      const dx = (i - (n - 1) / 2) * 0.07;
      const mine = est.estimates.filter((m) => m.entryId === e.id && atKeys.has(m.target));
      const v = mine.map((m) => { const t = byKey.get(m.target)!; return { x: (t.params.steps ?? 0) + dx, steps: t.params.steps ?? 0, y: m.value, u: m.uncertainty, label: e.label, mark: markOf(e), open: false, target: m.target }; });
      const er = mine.flatMap((m) => {
        const t = byKey.get(m.target)!;
        const ex = exactOf(t);
        const c = t.consensus && t.consensus.value !== null ? t.consensus.value : null;
        const ref = ex ?? c;
        return ref === null ? [] : [{ x: (t.params.steps ?? 0) + dx, steps: t.params.steps ?? 0, y: m.value - ref, u: m.uncertainty, label: `${e.label}${ex === null ? ' (against the consensus)' : ''}`, mark: markOf(e), open: ex === null, target: m.target }];
      });
      if (v.length) valueSeries.push({ id: e.id, data: v });
      if (er.length) errorSeries.push({ id: e.id, data: er });
    });
    const guides: DepthGuide[] = at.map((t) => ({ steps: t.params.steps ?? 0, exact: exactOf(t), consensus: t.consensus && t.consensus.value !== null && t.consensus.uncertainty !== null ? { value: t.consensus.value, uncertainty: t.consensus.uncertainty } : null }));
    return { valueSeries, errorSeries, guides };
  }, [est, at, byKey]);
  if (!est.entries.length) return <EmptyState title="No published estimates yet" />;
  return (
    <>
      <Panel title={<>Value against depth at θ<sub>h</sub> = {formatAngle(theta)}</>} id="depth-value"
        actions={<ChartTableToggle shown={table} onToggle={() => setTable(!table)} controls="depth-table" />}
        description="Each line is one entry (±u bars); black ticks are exact references, violet bands the consensus where no exact value exists.">
        <Legend>
          <LegendMark kind="hardware">hardware</LegendMark><LegendMark kind="classical">classical</LegendMark><LegendMark kind="baseline">house baseline</LegendMark>
          <LegendMark kind="exact">exact reference</LegendMark><LegendMark kind="consensus">consensus ±u</LegendMark>
        </Legend>
        <Suspense fallback={<PageLoading label="Loading the chart…" />}>
          <DepthChart series={valueSeries} guides={guides} yLabel={`⟨${obs}⟩`} label={`Value of ${obs} against the number of Trotter steps at thetaH ${formatAngle(theta)}, one line per entry; "Show as a table" lists the numbers`} />
        </Suspense>
        {table && <DepthTable id="depth-table" slug={slug} at={at} est={est} />}
      </Panel>
      <Panel title="Error against depth" id="depth-error" description="Estimate minus the exact reference (filled marks), or minus the consensus where no exact value exists (open marks), with the stated ±u.">
        <Suspense fallback={<PageLoading label="Loading the chart…" />}>
          {errorSeries.length ? <DepthChart series={errorSeries} guides={[]} zeroLine yLabel="estimate − reference" label={`Error of each entry's ${obs} against the number of Trotter steps at thetaH ${formatAngle(theta)}; the table under the first chart lists the numbers`} height={280} /> : <EmptyState title="Nothing to compare with at this angle" />}
        </Suspense>
      </Panel>
      <BreakMaps slug={slug} est={est} targets={targets} />
    </>
  );
}

function DepthTable({ id, slug, at, est }: { id: string; slug: string; at: Target[]; est: EstimatesResponse }) {
  const val = new Map(est.estimates.map((m) => [`${m.entryId}|${m.target}`, m]));
  return (
    <div id={id} className="mt-3">
      <Table aria-label="Values against depth">
        <thead><tr><Th>Steps</Th><Th num>Reference</Th>{est.entries.map((e) => <Th key={e.id} num>{e.label}</Th>)}</tr></thead>
        <tbody>
          {at.map((t) => (
            <tr key={t.key}>
              <Td><Link to={`/challenges/${encodeURIComponent(slug)}/targets/${encodeURIComponent(t.key)}`}>{t.params.steps}</Link></Td>
              <Td num>{t.reference.status === 'exact' ? formatMeasurement(t.reference.value, t.reference.uncertainty).text : t.consensus?.value != null ? `${formatMeasurement(t.consensus.value, t.consensus.uncertainty).text} (consensus)` : '—'}</Td>
              {est.entries.map((e) => { const m = val.get(`${e.id}|${t.key}`); return <Td key={e.id} num>{m ? formatMeasurement(m.value, m.uncertainty).text : '—'}</Td>; })}
            </tr>
          ))}
        </tbody>
      </Table>
    </div>
  );
}

const CELL: Record<BreakCell, { cls: string; sym: string; text: string }> = {
  within: { cls: 'bg-ok-soft text-ok-ink', sym: '✓', text: '|error| ≤ u' },
  'beyond-u': { cls: 'bg-hardware-soft text-hardware-ink', sym: '!', text: 'u < |error| ≤ 2u' },
  'beyond-2u': { cls: 'bg-danger text-white', sym: '✗', text: '|error| > 2u' },
  'no-reference': { cls: 'bg-paper-sunk text-ink-soft', sym: '·', text: 'answered, no exact reference' },
  missing: { cls: 'bg-paper-raised text-ink-soft', sym: '', text: 'not answered' },
};
const REF_CELL: Record<Target['reference']['status'], { cls: string; sym: string; text: string }> = {
  exact: { cls: 'bg-exact text-white', sym: '■', text: 'exact reference' },
  none: { cls: 'bg-consensus-soft text-consensus-ink', sym: '○', text: 'no exact method: consensus' },
  sealed: { cls: 'bg-disputed-soft text-disputed-ink', sym: 'S', text: 'sealed until its date' },
  pending: { cls: 'bg-paper-sunk text-ink-soft', sym: '…', text: 'being computed' },
};

function GridMap({ title, steps, thetas, cell, caption }: { title: React.ReactNode; steps: number[]; thetas: number[]; cell: (s: number, t: number) => { cls: string; sym: string; text: string; href?: string }; caption: string }) {
  return (
    <figure className="min-w-0">
      <figcaption className="mb-1 text-sm font-medium">{title}</figcaption>
      <div className="overflow-x-auto">
        <table className="border-collapse text-xs" aria-label={caption}>
          <thead><tr><th scope="col" className="px-1 text-left font-normal text-ink-soft">t \ θ<sub>h</sub></th>{thetas.map((t) => <th key={t} scope="col" className="num px-0.5 font-normal text-ink-soft">{formatAngle(t)}</th>)}</tr></thead>
          <tbody>
            {steps.map((s) => (
              <tr key={s}>
                <th scope="row" className="num pr-1 text-right font-normal text-ink-soft">{s}</th>
                {thetas.map((t) => {
                  const c = cell(s, t);
                  return <td key={t} className={cx('h-6 w-7 border border-paper text-center', c.cls)} title={`${s} steps, θh ${formatAngle(t)}: ${c.text}`}><span aria-hidden="true">{c.sym}</span><span className="sr-only">{c.text}</span></td>;
                })}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </figure>
  );
}

function BreakMaps({ slug, est, targets }: { slug: string; est: EstimatesResponse; targets: Target[] }) {
  const { steps, thetas } = gridAxes(targets);
  const tAt = new Map(targets.map((t) => [`${t.params.steps}|${(t.params.thetaH ?? 0).toFixed(6)}`, t]));
  const val = new Map(est.estimates.map((m) => [`${m.entryId}|${m.target}`, m]));
  const find = (s: number, th: number) => tAt.get(`${s}|${th.toFixed(6)}`);
  const counts = (id: string) => {
    const k: Record<BreakCell, number> = { within: 0, 'beyond-u': 0, 'beyond-2u': 0, 'no-reference': 0, missing: 0 };
    for (const t of targets) k[breakCell(val.get(`${id}|${t.key}`), exactOf(t))]++;
    return k;
  };
  return (
    <Panel title="Where each method breaks" id="depth-maps" description={<>Over the whole grid of this observable (rows: steps; columns: θ<sub>h</sub>): each entry&rsquo;s error against the exact reference compared with the uncertainty it stated, beside the map of targets that have an exact reference.</>}>
      <Legend>
        {(['within', 'beyond-u', 'beyond-2u', 'no-reference'] as BreakCell[]).map((k) => <span key={k} className="inline-flex items-center gap-1"><span className={cx('inline-flex h-4 w-5 items-center justify-center text-[10px]', CELL[k].cls)} aria-hidden="true">{CELL[k].sym}</span>{CELL[k].text}</span>)}
      </Legend>
      <div className="mt-4 grid grid-cols-1 gap-6 sm:grid-cols-2 xl:grid-cols-3" data-testid="break-maps">
        <GridMap title="Exact references" steps={steps} thetas={thetas} caption="Which targets have an exact reference"
          cell={(s, t) => { const x = find(s, t); return x ? REF_CELL[x.reference.status] : { cls: '', sym: '', text: 'not in the grid' }; }} />
        {est.entries.map((e) => {
          const k = counts(e.id);
          return (
            <GridMap key={e.id} steps={steps} thetas={thetas} caption={`Where ${e.label} exceeds its stated uncertainty`}
              title={<span className="inline-flex flex-wrap items-center gap-1.5"><TrackMark track={e.track} size={10} /><Link to={`/entries/${e.id}`}>{e.label}</Link> <span className="num font-normal text-ink-soft">{k['beyond-2u']} beyond 2u of {k.within + k['beyond-u'] + k['beyond-2u']} checked</span></span>}
              cell={(s, t) => { const x = find(s, t); return x ? { ...CELL[breakCell(val.get(`${e.id}|${x.key}`), exactOf(x))] } : { cls: '', sym: '', text: 'not in the grid' }; }} />
          );
        })}
      </div>
      <p className="mt-3 text-xs text-ink-soft">Open a target from the <Link to={`/challenges/${encodeURIComponent(slug)}?view=verifiability`}>verifiability view</Link> or the table above for every estimate of it. <span className="num">{targets.length}</span> targets of this observable.</p>
    </Panel>
  );
}
