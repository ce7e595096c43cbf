import { useMemo, useState } from 'react';
import { Link } from 'react-router';
import type { ChallengeDetail } from '@/features/challenges/api/get-challenge';
import { useStandings } from '@/features/standings/api/get-standings';
import { accuracyCostFront } from '@shared/scoring/ranking';
import { formatHours, formatMetric } from '@/lib/format';
import { Badge, ChartTableToggle, EmptyState, ErrorState, PageLoading, Panel, TrackMark } from '@/components/ui';
import CostChart, { type CostPoint } from '@/features/challenges/charts/cost-chart';
import { Legend, LegendMark } from './chart-bits';
import type { Track } from '@shared/vocabulary';

export default function CostSection({ c }: { c: ChallengeDetail }) {
  const s = useStandings(c.slug, { track: 'all' });
  const [showTable, setShowTable] = useState(false);
  // QPU time and classical compute are different resources: each track gets its own axis and its
  // own front (shared/scoring/ranking.ts), never a sum of core-hours and QPU hours
  const model = useMemo(() => {
    const es = s.data?.entries ?? [];
    const anyVerifiable = es.some((e) => e.metrics.rmseVerifiable !== null);
    // accuracy is the overall proper score the standings rank by (scoring rules; /scoring)
    const acc = (e: (typeof es)[number]) => e.metrics.scoreOverall;
    const classicalCost = (e: (typeof es)[number]) => {
      const parts = [e.cost.cpuCoreHours, e.cost.gpuHours].filter((x): x is number => typeof x === 'number');
      return parts.length ? parts.reduce((a, b) => a + b, 0) : null;
    };
    const qpuCost = (e: (typeof es)[number]) => (typeof e.cost.qpuSeconds === 'number' ? e.cost.qpuSeconds / 3600 : null);
    const panel = (track: Track) => {
      const cost = track === 'hardware' ? qpuCost : classicalCost;
      const mine = es.filter((e) => e.track === track);
      const plotted = mine.filter((e) => (cost(e) ?? 0) > 0 && (acc(e) ?? 0) > 0);
      const front = new Set(accuracyCostFront(plotted.map((e) => ({ id: e.id, error: acc(e), cost: cost(e) }))).front.map((p) => p.id));
      const points: CostPoint[] = plotted.map((e) => ({ x: cost(e)!, y: acc(e)!, label: e.label, mark: e.isBaseline ? 'baseline' : e.track, onFront: front.has(e.id), id: e.id }));
      return { points, apart: mine.filter((e) => !plotted.includes(e)), cost };
    };
    const hw = panel('hardware'), cl = panel('classical');
    return { hw, cl, apart: [...cl.apart, ...hw.apart], anyVerifiable, acc, classicalCost, qpuCost };
  }, [s.data]);

  if (s.isPending) return <PageLoading label="Loading the standings…" />;
  if (s.isError) return <ErrorState error={s.error} retry={() => s.refetch()} />;
  const yLabel = 'score on every ranked target (log)';
  return (
    <Panel
      title="Accuracy against cost"
      id="cost"
      description={`Declared resources against the overall score (the proper score the standings rank by); lower left is better. Classical compute (CPU core-hours + GPU hours) and QPU time are different resources, so each track has its own plot and its own non-dominated front (dashed step line).`}
      actions={<ChartTableToggle shown={showTable} onToggle={() => setShowTable(!showTable)} controls="cost-table" />}
    >
      {s.data!.status === 'pending' ? (
        <EmptyState title="The standings are being computed">This plot appears when they are ready.</EmptyState>
      ) : model.hw.points.length + model.cl.points.length === 0 ? (
        <EmptyState title="No entry with a declared cost and a score">Entries that state their compute appear here.</EmptyState>
      ) : (
        <>
          <div className="grid grid-cols-1 gap-6 xl:grid-cols-2">
            {model.cl.points.length > 0 && (
              <div>
                <h3 className="text-base font-semibold">Classical compute</h3>
                <CostChart points={model.cl.points} yLabel={yLabel} xLabel="CPU core-hours + GPU hours (log scale)" label={`Accuracy against classical compute for ${model.cl.points.length} classical entries`} />
              </div>
            )}
            {model.hw.points.length > 0 && (
              <div>
                <h3 className="text-base font-semibold">QPU time</h3>
                <CostChart points={model.hw.points} yLabel={yLabel} xLabel="QPU time (log scale)" label={`Accuracy against QPU time for ${model.hw.points.length} hardware entries`} />
              </div>
            )}
          </div>
          <Legend>
            <LegendMark kind="hardware">hardware</LegendMark>
            <LegendMark kind="classical">classical</LegendMark>
            <LegendMark kind="baseline">house baseline</LegendMark>
            <span className="inline-flex items-center gap-1.5"><span className="inline-block w-4 border-t-2 border-dashed border-ok" aria-hidden="true" />front (ringed entries)</span>
          </Legend>
        </>
      )}
      {model.apart.length > 0 && (
        <div className="mt-5">
          <h3 className="mb-1 text-base font-semibold">Not on the plot</h3>
          <ul className="space-y-1 text-sm">
            {model.apart.map((e) => (
              <li key={e.id} className="flex flex-wrap items-center gap-2">
                <TrackMark track={e.track} />
                <Link to={`/entries/${encodeURIComponent(e.id)}`}>{e.label}</Link>
                <span className="text-ink-soft">{(e.track === 'hardware' ? model.qpuCost(e) : model.classicalCost(e)) === null ? (e.track === 'hardware' ? 'no declared QPU time' : 'no declared classical compute') : 'no score to plot'}</span>
              </li>
            ))}
          </ul>
        </div>
      )}
      {showTable && (
        <div id="cost-table" className="mt-5 overflow-x-auto">
          <table className="w-full border-collapse text-sm" data-testid="cost-table">
            <caption className="mb-2 text-left font-semibold">The data behind the plot</caption>
            <thead>
              <tr>
                <th scope="col" className="border-b border-rule-strong py-1 pr-2 text-left text-xs text-ink-soft">Entry</th>
                <th scope="col" className="border-b border-rule-strong px-2 py-1 text-right text-xs text-ink-soft">Classical compute</th>
                <th scope="col" className="border-b border-rule-strong px-2 py-1 text-right text-xs text-ink-soft">QPU time</th>
                <th scope="col" className="border-b border-rule-strong px-2 py-1 text-right text-xs text-ink-soft">Score</th>
                <th scope="col" className="border-b border-rule-strong py-1 pl-2 text-left text-xs text-ink-soft">Front</th>
              </tr>
            </thead>
            <tbody>
              {s.data!.entries.map((e) => (
                <tr key={e.id}>
                  <th scope="row" className="border-b border-rule py-1 pr-2 text-left font-normal"><span className="inline-flex items-center gap-1.5"><TrackMark track={e.track} />{e.label}</span></th>
                  <td className="num border-b border-rule px-2 py-1 text-right">{formatHours(model.classicalCost(e))}</td>
                  <td className="num border-b border-rule px-2 py-1 text-right">{formatHours(model.qpuCost(e))}</td>
                  <td className="num border-b border-rule px-2 py-1 text-right">{formatMetric(model.acc(e))}</td>
                  <td className="border-b border-rule py-1 pl-2">{(e.track === 'hardware' ? model.hw : model.cl).points.find((p) => p.id === e.id)?.onFront ? <Badge tone="ok">on the front of its track</Badge> : ''}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <p className="mt-1 text-xs text-ink-soft">Classical compute is CPU core-hours plus GPU hours; QPU time is the device time the team declared.</p>
        </div>
      )}
    </Panel>
  );
}
