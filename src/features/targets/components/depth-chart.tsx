import { ResponsiveScatterPlot, type ScatterPlotLayerProps, type ScatterPlotNodeProps } from '@nivo/scatterplot';
import { formatMeasurement, formatSig } from '@/lib/format';
import { COLORS, chartTheme, markColor, markPath, type MarkKind } from '@/features/challenges/charts/theme';

export interface DepthPoint { x: number; steps: number; y: number; u: number; label: string; mark: MarkKind; open: boolean; target: string }
export interface DepthSeries { id: string; data: DepthPoint[] }
export interface DepthGuide { steps: number; exact: number | null; consensus: { value: number; uncertainty: number } | null }

type Scale = (v: number) => number;

function Node({ node }: ScatterPlotNodeProps<DepthPoint>) {
  const p = markPath(node.data.mark, node.x, node.y, 9);
  return <path d={p.d} fill={node.data.open ? COLORS.paper : p.fill} stroke={p.stroke} strokeWidth={p.strokeWidth} />;
}

/**
 * Values (or differences) against the number of Trotter steps, one line per entry with ±u bars;
 * `guides` draws the exact reference at each depth (a firm tick) or the consensus (a band).
 */
export default function DepthChart({ series, guides, yLabel, label, height = 320, zeroLine = false }: {
  series: DepthSeries[]; guides: DepthGuide[]; yLabel: string; label: string; height?: number; zeroLine?: boolean;
}) {
  const pts = series.flatMap((s) => s.data);
  const us = pts.map((p) => p.u).filter((u) => u > 0).sort((a, b) => a - b);
  const medianU = us.length ? us[Math.floor(us.length / 2)] : 0;
  const ys: number[] = zeroLine ? [0] : [];
  for (const p of pts) { ys.push(p.y); if (p.u <= 10 * Math.max(medianU, 1e-12)) ys.push(p.y - p.u, p.y + p.u); }
  for (const g of guides) { if (g.exact !== null) ys.push(g.exact); if (g.consensus) ys.push(g.consensus.value - g.consensus.uncertainty, g.consensus.value + g.consensus.uncertainty); }
  const lo = ys.length ? Math.min(...ys) : -1, hi = ys.length ? Math.max(...ys) : 1;
  const pad = Math.max((hi - lo) * 0.08, 1e-6);
  const steps = [...new Set([...pts.map((p) => p.steps), ...guides.map((g) => g.steps)])].sort((a, b) => a - b);
  const xMin = (steps[0] ?? 0) - 0.6, xMax = (steps[steps.length - 1] ?? 1) + 0.6;

  const under = ({ xScale, yScale, innerWidth, innerHeight }: ScatterPlotLayerProps<DepthPoint>) => {
    const sx = xScale as unknown as Scale, sy = yScale as unknown as Scale;
    const yy = (v: number) => Math.max(0, Math.min(innerHeight, sy(v)));
    return (
      <g>
        {zeroLine && <line x1={0} x2={innerWidth} y1={sy(0)} y2={sy(0)} stroke={COLORS.exact} strokeWidth={1.2} />}
        {guides.map((g) => {
          const x = sx(g.steps);
          if (g.exact !== null) return <line key={g.steps} x1={x - 16} x2={x + 16} y1={sy(g.exact)} y2={sy(g.exact)} stroke={COLORS.exact} strokeWidth={2} />;
          if (g.consensus) {
            const c = g.consensus;
            return <rect key={g.steps} x={x - 16} width={32} y={yy(c.value + c.uncertainty)} height={Math.max(2, yy(c.value - c.uncertainty) - yy(c.value + c.uncertainty))} fill={COLORS.consensusSoft} stroke={COLORS.consensus} strokeOpacity={0.6} />;
          }
          return null;
        })}
        {series.map((s) => {
          const d = [...s.data].sort((a, b) => a.x - b.x).map((p, i) => `${i ? 'L' : 'M'}${sx(p.x)} ${sy(p.y)}`).join('');
          return d ? <path key={s.id} d={d} fill="none" stroke={markColor(s.data[0].mark)} strokeOpacity={0.45} strokeWidth={1.2} /> : null;
        })}
      </g>
    );
  };
  const bars = ({ nodes, yScale, innerHeight }: ScatterPlotLayerProps<DepthPoint>) => {
    const sy = yScale as unknown as Scale;
    const clamp = (y: number) => Math.max(0, Math.min(innerHeight, y));
    // an interval that runs off both edges says little: drawn faint and dashed, so that it does not hide the others
    return <g>{nodes.filter((n) => n.data.u > 0).map((n) => {
      const top = sy(n.data.y + n.data.u), bottom = sy(n.data.y - n.data.u);
      const wide = top < 0 && bottom > innerHeight;
      return <line key={n.id} x1={n.x} x2={n.x} y1={clamp(top)} y2={clamp(bottom)} stroke={markColor(n.data.mark)} strokeWidth={1.2} strokeOpacity={wide ? 0.3 : 1} strokeDasharray={wide ? '3 3' : undefined} />;
    })}</g>;
  };
  return (
    <div role="img" aria-label={label} style={{ height }} className="w-full">
      <ResponsiveScatterPlot<DepthPoint>
        data={series}
        animate={false}
        margin={{ top: 12, right: 16, bottom: 44, left: 62 }}
        xScale={{ type: 'linear', min: xMin, max: xMax }}
        yScale={{ type: 'linear', min: lo - pad, max: hi + pad }}
        theme={chartTheme}
        gridXValues={steps}
        axisBottom={{ legend: 'Trotter steps', legendOffset: 34, legendPosition: 'middle', tickValues: steps }}
        axisLeft={{ legend: yLabel, legendOffset: -52, legendPosition: 'middle', tickValues: 5, format: (v) => formatSig(Number(v), 2) }}
        nodeComponent={Node}
        layers={['grid', under, 'axes', bars, 'nodes', 'mesh']}
        useMesh
        tooltip={({ node }) => (
          <div className="rounded border border-rule-strong bg-paper-raised px-2 py-1 text-xs shadow">
            <div className="font-medium">{node.data.label}</div>
            <div className="num">{node.data.steps} steps · {formatMeasurement(node.data.y, node.data.u).text}</div>
          </div>
        )}
      />
    </div>
  );
}
