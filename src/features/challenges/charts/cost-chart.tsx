import { ResponsiveScatterPlot, type ScatterPlotLayerProps, type ScatterPlotNodeProps } from '@nivo/scatterplot';
import { formatHours, formatSig } from '@/lib/format';
import { COLORS, chartTheme, markPath, type MarkKind } from './theme';

export interface CostPoint { x: number; y: number; label: string; mark: MarkKind; onFront: boolean; id: string }

type Scale = (v: number) => number;

function Node({ node }: ScatterPlotNodeProps<CostPoint>) {
  const p = markPath(node.data.mark, node.x, node.y, 10);
  return (
    <g>
      {node.data.onFront && <circle cx={node.x} cy={node.y} r={10} fill="none" stroke={COLORS.ok} strokeWidth={1.2} />}
      <path d={p.d} fill={p.fill} stroke={p.stroke} strokeWidth={p.strokeWidth} />
    </g>
  );
}

const decades = (lo: number, hi: number) => {
  const out: number[] = [];
  for (let e = Math.floor(Math.log10(lo)); e <= Math.ceil(Math.log10(hi)); e++) out.push(10 ** e);
  return out;
};

export default function CostChart({ points, yLabel, xLabel = 'declared cost (log scale)', label, height = 320 }: { points: CostPoint[]; yLabel: string; xLabel?: string; label?: string; height?: number }) {
  const xs = points.map((p) => p.x), ys = points.map((p) => p.y);
  const xMin = Math.min(...xs) / 2, xMax = Math.max(...xs) * 2, yMin = Math.min(...ys) / 2, yMax = Math.max(...ys) * 2;
  const front = points.filter((p) => p.onFront).sort((a, b) => a.x - b.x);
  const frontLayer = ({ xScale, yScale }: ScatterPlotLayerProps<CostPoint>) => {
    const sx = xScale as unknown as Scale, sy = yScale as unknown as Scale;
    if (front.length < 1) return null;
    // a step line: cheaper-to-dearer, each step down to the better accuracy the extra cost buys
    let d = `M${sx(front[0].x)},${sy(front[0].y)}`;
    for (let i = 1; i < front.length; i++) d += `H${sx(front[i].x)}V${sy(front[i].y)}`;
    d += `H${sx(xMax)}`;
    return <path d={d} fill="none" stroke={COLORS.ok} strokeWidth={1.6} strokeDasharray="5 3" />;
  };
  return (
    <div style={{ height }} role="img" aria-label={label ?? `${yLabel} against ${xLabel}`}>
      <ResponsiveScatterPlot<CostPoint>
        data={[{ id: 'entries', data: points }]}
        animate={false}
        margin={{ top: 12, right: 30, bottom: 46, left: 62 }}
        xScale={{ type: 'log', base: 10, min: xMin, max: xMax }}
        yScale={{ type: 'log', base: 10, min: yMin, max: yMax }}
        theme={chartTheme}
        gridXValues={decades(xMin, xMax)}
        gridYValues={decades(yMin, yMax)}
        axisBottom={{ legend: xLabel, legendOffset: 36, legendPosition: 'middle', tickValues: decades(xMin, xMax), format: (v) => formatHours(Number(v)) }}
        axisLeft={{ legend: yLabel, legendOffset: -52, legendPosition: 'middle', tickValues: decades(yMin, yMax), format: (v) => formatSig(Number(v), 1) }}
        nodeComponent={Node}
        layers={['grid', 'axes', frontLayer, 'nodes', 'mesh']}
        useMesh
        tooltip={({ node }) => (
          <div className="rounded border border-rule-strong bg-paper-raised px-2 py-1 text-xs shadow">
            <div className="font-medium">{node.data.label}</div>
            <div className="num">{formatHours(node.data.x)} · {formatSig(node.data.y, 3)}</div>
            {node.data.onFront && <div className="text-ok-ink">on the front</div>}
          </div>
        )}
      />
    </div>
  );
}
