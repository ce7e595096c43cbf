import { useMemo, useState } from 'react';
import { Link } from 'react-router';
import type { ChallengeDetail } from '@/features/challenges/api/get-challenge';
import { useStandings } from '@/features/standings/api/get-standings';
import { CostCell } from '@/features/standings/components/standings-table';
import { formatHours, formatMetric } from '@/lib/format';
import { Badge, ChartTableToggle, EmptyState, ErrorState, PageLoading, Panel, TrackMark } from '@/components/ui';
import CostChart, { type CostPoint } from '@/features/challenges/charts/cost-chart';
import { Legend, LegendMark } from './chart-bits';

export default function CostSection({ c }: { c: ChallengeDetail }) {
  const s = useStandings(c.slug, { track: 'all' });
  const [showTable, setShowTable] = useState(false);
  const model = useMemo(() => {
    const es = s.data?.entries ?? [];
    const anyVerifiable = es.some((e) => e.metrics.rmseVerifiable !== null);
    // the front is computed on the overall proper score (scoring rules): plot that
    const acc = (e: (typeof es)[number]) => e.metrics.scoreOverall;
    const plotted = es.filter((e) => e.metrics.costHours !== null && e.metrics.costHours > 0 && (acc(e) ?? 0) > 0);
    const apart = es.filter((e) => !plotted.includes(e));
    const points: CostPoint[] = plotted.map((e) => ({ x: e.metrics.costHours!, y: acc(e)!, label: e.label, mark: e.isBaseline ? 'baseline' : e.track, onFront: e.onFront, id: e.id }));
    return { points, apart, anyVerifiable, plotted, acc };
  }, [s.data]);

  if (s.isPending) return <PageLoading label="Loading the standings…" />;
  if (s.isError) return <ErrorState error={s.error} retry={() => s.refetch()} />;
  const yLabel = 'score on every ranked target (log)';
  return (
    <Panel
      title="Accuracy against cost"
      id="cost"
      description={`Declared compute (CPU core-hours + GPU hours + QPU seconds / 3600) against the overall score (the proper score the standings rank by); lower left is better. The dashed step line is the non-dominated front.`}
      actions={<ChartTableToggle shown={showTable} onToggle={() => setShowTable(!showTable)} controls="cost-table" />}
    >
      {s.data!.status === 'pending' ? (
        <EmptyState title="The standings are being computed">This plot appears when they are ready.</EmptyState>
      ) : model.points.length === 0 ? (
        <EmptyState title="No entry with a declared cost and a score">Entries that state their compute appear here.</EmptyState>
      ) : (
        <>
          <CostChart points={model.points} yLabel={yLabel} />
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
                <span className="text-ink-soft">{e.metrics.costHours === null ? 'no declared cost' : 'no score to plot'}</span>
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
                <th scope="col" className="border-b border-rule-strong px-2 py-1 text-right text-xs text-ink-soft">Cost</th>
                <th scope="col" className="border-b border-rule-strong px-2 py-1 text-right text-xs text-ink-soft">Score</th>
                <th scope="col" className="border-b border-rule-strong py-1 pl-2 text-left text-xs text-ink-soft">Front</th>
              </tr>
            </thead>
            <tbody>
              {s.data!.entries.map((e) => (
                <tr key={e.id}>
                  <th scope="row" className="border-b border-rule py-1 pr-2 text-left font-normal"><span className="inline-flex items-center gap-1.5"><TrackMark track={e.track} />{e.label}</span></th>
                  <td className="border-b border-rule px-2 py-1 text-right"><CostCell e={e} /></td>
                  <td className="num border-b border-rule px-2 py-1 text-right">{formatMetric(model.acc(e))}</td>
                  <td className="border-b border-rule py-1 pl-2">{e.onFront ? <Badge tone="ok">on the front</Badge> : ''}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <p className="mt-1 text-xs text-ink-soft">Cost in hours: {formatHours(1)} = one CPU core-hour or one GPU hour or 3600 QPU seconds.</p>
        </div>
      )}
    </Panel>
  );
}
