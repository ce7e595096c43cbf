import { useMemo, useState } from 'react';
import { useSearchParams } from 'react-router';
import type { ChallengeDetail } from '@/features/challenges/api/get-challenge';
import { useEstimates } from '@/features/challenges/api/get-estimates';
import { describeSize, useTargets, type Target } from '@/features/challenges/api/get-targets';
import { formatAngle, formatDateTime, formatMeasurement } from '@/lib/format';
import { ChartTableToggle, EmptyState, ErrorState, Measured, PageLoading, Panel, Provenance, ProvenanceList, Segmented, Spinner, inputClass } from '@/components/ui';
import SweepChart, { ResidualChart, type ResidualPoint, type SweepPoint, type SweepSeries, type SweepTargetLine } from '@/features/challenges/charts/sweep-chart';
import type { MarkKind } from '@/features/challenges/charts/theme';
import { Legend, LegendMark } from './chart-bits';
import { observableLabel } from './spec-section';

const RESIDUAL_LIMIT = 6;

export default function SweepSection({ c }: { c: ChallengeDetail }) {
  const [params, setParams] = useSearchParams();
  const steps = useMemo(() => [...new Set(c.instances.map((i) => i.params.steps ?? 0))].sort((a, b) => a - b), [c.instances]);
  const obs = params.get('observable') ?? c.observables[0]?.key ?? '';
  const step = Number(params.get('steps') ?? steps[Math.min(3, steps.length - 1)] ?? 1);
  const set = (k: string, v: string) => setParams((p) => { const n = new URLSearchParams(p); n.set(k, v); return n; }, { replace: true });
  const [showTable, setShowTable] = useState(false);
  const est = useEstimates(c.slug, { observable: obs, steps: step });
  const tq = useTargets(c.slug);

  const model = useMemo(() => {
    if (!est.data || !tq.data) return null;
    const targets = tq.data.targets.filter((t) => t.observable === obs && t.params.steps === step);
    const byKey = new Map(targets.map((t) => [t.key, t]));
    const lines: (SweepTargetLine & { ref: Target['reference'] })[] = targets.map((t) => ({
      theta: t.params.thetaH ?? 0,
      target: t.key,
      exact: t.reference.status === 'exact' ? t.reference.value : null,
      consensus: t.consensus && t.consensus.value !== null && t.consensus.uncertainty !== null ? { value: t.consensus.value, uncertainty: t.consensus.uncertainty } : null,
      disputed: t.disputed,
      ref: t.reference,
    }));
    const thetas = lines.map((l) => l.theta);
    const xMin = thetas.length ? Math.min(...thetas) : 0, xMax = thetas.length ? Math.max(...thetas) : 1;
    const entries = est.data.entries;
    const jitter = (xMax - xMin || 1) * 0.012;
    const series: SweepSeries[] = [];
    const residuals: { id: string; data: ResidualPoint[] }[] = [];
    entries.forEach((e, i) => {
      const mark: MarkKind = e.isBaseline ? 'baseline' : e.track;
      const dx = (i - (entries.length - 1) / 2) * jitter;
      const pts: SweepPoint[] = [];
      const res: ResidualPoint[] = [];
      for (const m of est.data.estimates) {
        if (m.entryId !== e.id) continue;
        const t = byKey.get(m.target);
        if (!t) continue;
        const theta = t.params.thetaH ?? 0;
        const verifiable = t.reference.status === 'exact';
        pts.push({ x: theta + dx, y: m.value, u: m.uncertainty, theta, entryId: e.id, label: e.label, mark, target: m.target, verifiable, disputed: t.disputed });
        if (t.reference.status === 'exact' && m.uncertainty > 0) {
          const z = (m.value - t.reference.value) / m.uncertainty;
          const clipped = Math.abs(z) > RESIDUAL_LIMIT;
          res.push({ x: theta + dx, y: clipped ? Math.sign(z) * RESIDUAL_LIMIT : z, theta, label: e.label, mark, target: m.target, clipped, z });
        }
      }
      if (pts.length) series.push({ id: e.id, data: pts });
      if (res.length) residuals.push({ id: e.id, data: res });
    });
    return { lines, series, residuals, entries, xMin, xMax, targets };
  }, [est.data, tq.data, obs, step]);

  const o = c.observables.find((x) => x.key === obs);
  const loading = est.isPending || tq.isPending;
  const error = est.error ?? tq.error;
  return (
    <div className="space-y-6">
      <Panel
        title="Estimates along the sweep"
        id="sweep"
        description="Each entry's value with its ±u interval against θh; the exact reference is the firm line, the consensus a soft band where no exact value exists."
        actions={est.isFetching && !loading ? <Spinner size="sm" label="" /> : undefined}
      >
        <div className="mb-4 flex flex-wrap items-end gap-x-5 gap-y-3 text-sm">
          <div>
            <span className="mb-1 block text-xs text-ink-soft">Observable</span>
            <Segmented label="Observable" value={obs} onChange={(v) => set('observable', v)} options={c.observables.map((x) => ({ value: x.key, label: x.key }))} />
          </div>
          <label>
            <span className="mb-1 block text-xs text-ink-soft">Trotter steps</span>
            <select aria-label="Trotter steps" value={step} onChange={(e) => set('steps', e.target.value)} className={inputClass(false, 'pr-7', true)}>
              {steps.map((s) => <option key={s} value={s}>{s}</option>)}
            </select>
          </label>
          <span className="text-xs text-ink-soft">{o && <code>{observableLabel(o)}</code>}</span>
          <span className="ml-auto"><ChartTableToggle shown={showTable} onToggle={() => setShowTable(!showTable)} controls="sweep-table" /></span>
        </div>
        {loading ? (
          <PageLoading label="Loading the estimates…" />
        ) : error ? (
          <ErrorState error={error} retry={() => { void est.refetch(); void tq.refetch(); }} />
        ) : !model || model.targets.length === 0 ? (
          <EmptyState title="No targets at this point">This observable has no target at {step} steps.</EmptyState>
        ) : (
          <>
            {model.series.length === 0 && <p className="mb-2 text-sm text-ink-soft">No entry has answered these targets yet; the references are shown alone.</p>}
            <SweepChart series={model.series} lines={model.lines} yLabel={`⟨${obs}⟩`} xMin={model.xMin} xMax={model.xMax} bound={o?.bound ?? 1} />
            <Legend>
              <LegendMark kind="hardware">hardware</LegendMark>
              <LegendMark kind="classical">classical</LegendMark>
              <LegendMark kind="baseline">house baseline</LegendMark>
              <LegendMark kind="exact">exact reference</LegendMark>
              <LegendMark kind="verifiable">verifiable point</LegendMark>
              <LegendMark kind="consensus">consensus ± u</LegendMark>
              <LegendMark kind="disputed">disputed (open)</LegendMark>
              <span>points are spread sideways a little so that the bars do not overlap; an arrow marks an interval that runs off the plot</span>
            </Legend>
            <h3 className="mt-6 mb-1 text-base font-semibold">Residuals on verifiable targets</h3>
            <p className="mb-2 text-sm text-ink-soft">(estimate − reference) / u for every target with an exact reference; honest error bars stay inside ±2 about 95 % of the time. Points beyond ±{RESIDUAL_LIMIT} sit on the edge.</p>
            {model.residuals.length ? (
              <ResidualChart series={model.residuals} xMin={model.xMin} xMax={model.xMax} limit={RESIDUAL_LIMIT} />
            ) : (
              <EmptyState title="No residuals to draw">No exact reference here, or no entry with a non-zero uncertainty.</EmptyState>
            )}
            {showTable && <SweepTable id="sweep-table" model={model} estimates={est.data!.estimates} />}
          </>
        )}
      </Panel>
    </div>
  );
}

function SweepTable({ id, model, estimates }: { id: string; model: { lines: (SweepTargetLine & { ref: Target['reference'] })[]; entries: { id: string; label: string }[] }; estimates: { entryId: string; target: string; value: number; uncertainty: number }[] }) {
  const lines = [...model.lines].sort((a, b) => a.theta - b.theta);
  return (
    <div id={id} className="mt-6 overflow-x-auto">
      <table className="w-full border-collapse text-sm" data-testid="sweep-table">
        <caption className="mb-2 text-left text-sm font-semibold">The data behind the plot</caption>
        <thead>
          <tr>
            <th scope="col" className="border-b border-rule-strong py-1 pr-2 text-left text-xs text-ink-soft">θh</th>
            <th scope="col" className="border-b border-rule-strong px-2 py-1 text-right text-xs text-ink-soft">Exact</th>
            <th scope="col" className="border-b border-rule-strong px-2 py-1 text-right text-xs text-ink-soft">Consensus</th>
            {model.entries.map((e) => <th key={e.id} scope="col" title={e.label} className="max-w-[9rem] truncate border-b border-rule-strong px-2 py-1 text-right text-xs font-medium text-ink-soft">{e.label}</th>)}
          </tr>
        </thead>
        <tbody>
          {lines.map((l) => (
            <tr key={l.target}>
              <th scope="row" className="border-b border-rule py-1 pr-2 text-left font-normal"><span className="num">{formatAngle(l.theta)}</span>{l.disputed && <span className="ml-1 text-xs text-disputed-ink">disputed</span>}</th>
              <td className="border-b border-rule px-2 py-1 text-right">
                <span className="inline-flex items-baseline">
                  <Measured value={l.exact} u={l.exact === null ? null : 0} exactLabel={false} />
                  {l.ref.status === 'exact' ? (
                    <Provenance label={`Provenance of the reference of ${l.target}`}>
                      <ProvenanceList items={[['Method', l.ref.method], ['Size', describeSize(l.ref.size) || '—'], ['Engine', l.ref.engineVersion ?? '—'], ['Computed', formatDateTime(l.ref.createdAt)]]} />
                    </Provenance>
                  ) : <span className="text-xs text-ink-faint">{l.ref.status}</span>}
                </span>
              </td>
              <td className="border-b border-rule px-2 py-1 text-right">{l.consensus ? <Measured value={l.consensus.value} u={l.consensus.uncertainty} /> : '—'}</td>
              {model.entries.map((e) => {
                const m = estimates.find((x) => x.entryId === e.id && x.target === l.target);
                return <td key={e.id} className="border-b border-rule px-2 py-1 text-right" title={m ? formatMeasurement(m.value, m.uncertainty).text : undefined}>{m ? <Measured value={m.value} u={m.uncertainty} /> : '—'}</td>;
              })}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

