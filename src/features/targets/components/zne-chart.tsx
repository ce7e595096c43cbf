import { ResponsiveScatterPlot, type ScatterPlotLayerProps, type ScatterPlotNodeProps } from '@nivo/scatterplot';
import { formatMeasurement, formatSig } from '@/lib/format';
import { COLORS, chartTheme } from '@/features/challenges/charts/theme';
import type { ZneFit } from '../api/get-target';

interface P { x: number; y: number; u: number; kind: 'data' | 'fit' | 'team'; label: string }
type Scale = (v: number) => number;

function Node({ node }: ScatterPlotNodeProps<P>) {
  const { x, y } = node;
  if (node.data.kind === 'data') return <path d={`M${x} ${y - 6}L${x + 6} ${y}L${x} ${y + 6}L${x - 6} ${y}Z`} fill={COLORS.hardware} />;
  if (node.data.kind === 'team') return <path d={`M${x} ${y - 6}L${x + 6} ${y}L${x} ${y + 6}L${x - 6} ${y}Z`} fill={COLORS.paper} stroke={COLORS.hardware} strokeWidth={1.8} />;
  return <circle cx={x} cy={y} r={4} fill={COLORS.paper} stroke={COLORS.inkSoft} strokeWidth={1.4} />;
}

/**
 * A hardware entry's values at each noise-scale factor c (filled diamonds, ±u), the team's own
 * extrapolated value at c = 0 (hollow diamond) and the server's re-analysis with each model (open
 * circles at c = 0, slightly apart), against the exact reference when it is public.
 */
export default function ZneChart({ points, fits, team, reference, label }: {
  points: { scale: number; value: number; uncertainty: number }[]; fits: ZneFit[]; team: { value: number; uncertainty: number }; reference: number | null; label: string;
}) {
  const ok = fits.filter((f) => f.ok && f.value !== null);
  const data: P[] = [
    ...points.map((p) => ({ x: p.scale, y: p.value, u: p.uncertainty, kind: 'data' as const, label: `c = ${p.scale}` })),
    { x: 0, y: team.value, u: team.uncertainty, kind: 'team' as const, label: "the team's value" },
    ...ok.map((f, i) => ({ x: -0.06 * (i + 1) * Math.max(...points.map((p) => p.scale), 1) / 3, y: f.value!, u: f.uncertainty ?? 0, kind: 'fit' as const, label: f.model })),
  ];
  const ys = data.flatMap((d) => [d.y - d.u, d.y + d.u]);
  if (reference !== null) ys.push(reference);
  const lo = Math.min(...ys), hi = Math.max(...ys), pad = Math.max((hi - lo) * 0.1, 1e-6);
  const xMax = Math.max(...points.map((p) => p.scale), 1) * 1.1;
  const refLayer = ({ yScale, innerWidth }: ScatterPlotLayerProps<P>) => {
    if (reference === null) return null;
    const y = (yScale as unknown as Scale)(reference);
    return <line x1={0} x2={innerWidth} y1={y} y2={y} stroke={COLORS.exact} strokeWidth={1.5} />;
  };
  const bars = ({ nodes, yScale }: ScatterPlotLayerProps<P>) => {
    const sy = yScale as unknown as Scale;
    return <g>{nodes.filter((n) => n.data.u > 0).map((n) => <line key={n.id} x1={n.x} x2={n.x} y1={sy(n.data.y - n.data.u)} y2={sy(n.data.y + n.data.u)} stroke={n.data.kind === 'fit' ? COLORS.inkSoft : COLORS.hardware} strokeWidth={1.2} />)}</g>;
  };
  return (
    <div role="img" aria-label={label} style={{ height: 240 }} className="w-full">
      <ResponsiveScatterPlot<P>
        data={[{ id: 'zne', data }]}
        animate={false}
        margin={{ top: 10, right: 16, bottom: 42, left: 58 }}
        xScale={{ type: 'linear', min: -0.25 * xMax / 1.1, max: xMax }}
        yScale={{ type: 'linear', min: lo - pad, max: hi + pad }}
        theme={chartTheme}
        axisBottom={{ legend: 'noise-scale factor c', legendOffset: 32, legendPosition: 'middle', tickValues: [0, ...points.map((p) => p.scale)] }}
        axisLeft={{ tickValues: 5, format: (v) => formatSig(Number(v), 3) }}
        nodeComponent={Node}
        layers={['grid', refLayer, 'axes', bars, 'nodes', 'mesh']}
        useMesh
        tooltip={({ node }) => (
          <div className="rounded border border-rule-strong bg-paper-raised px-2 py-1 text-xs shadow">
            <div className="font-medium">{node.data.label}</div>
            <div className="num">{formatMeasurement(node.data.y, node.data.u).text}</div>
          </div>
        )}
      />
    </div>
  );
}
