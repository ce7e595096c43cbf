import { ResponsiveScatterPlot, type ScatterPlotLayerProps, type ScatterPlotNodeProps } from '@nivo/scatterplot';
import { formatAngle, formatMeasurement } from '@/lib/format';
import { COLORS, chartTheme, markPath, type MarkKind } from './theme';

export interface SweepPoint { x: number; y: number; u: number; theta: number; entryId: string; label: string; mark: MarkKind; target: string; verifiable: boolean; disputed: boolean }
export interface SweepSeries { id: string; data: SweepPoint[] }
export interface SweepTargetLine { theta: number; target: string; exact: number | null; consensus: { value: number; uncertainty: number } | null; disputed: boolean }

type Scale = (v: number) => number;

function Node({ node }: ScatterPlotNodeProps<SweepPoint>) {
  const p = markPath(node.data.mark, node.x, node.y, 9);
  // a disputed target is drawn open: every mark on it loses its fill
  return <path d={p.d} fill={node.data.disputed ? COLORS.paper : p.fill} stroke={p.stroke} strokeWidth={p.strokeWidth} strokeDasharray={node.data.disputed ? '2 1.5' : undefined} />;
}

function errorBars({ nodes, yScale, innerHeight }: ScatterPlotLayerProps<SweepPoint>) {
  const ys = yScale as unknown as Scale;
  const clamp = (y: number) => Math.max(0, Math.min(innerHeight, y));
  return (
    <g>
      {nodes.map((n) => {
        if (!(n.data.u > 0)) return null;
        const top = ys(n.data.y + n.data.u), bottom = ys(n.data.y - n.data.u);
        const y1 = clamp(top), y2 = clamp(bottom);
        const c = n.data.mark === 'hardware' ? COLORS.hardware : n.data.mark === 'classical' ? COLORS.classical : COLORS.exact;
        // an interval wider than the plot runs off the edge: an arrowhead says so
        return (
          <g key={n.id} stroke={c} strokeWidth={1.2} opacity={0.85}>
            <line x1={n.x} x2={n.x} y1={y1} y2={y2} />
            {top >= 0 ? <line x1={n.x - 3} x2={n.x + 3} y1={y1} y2={y1} /> : <path d={`M${n.x - 3.5} ${y1 + 5}L${n.x} ${y1}L${n.x + 3.5} ${y1 + 5}`} fill="none" />}
            {bottom <= innerHeight ? <line x1={n.x - 3} x2={n.x + 3} y1={y2} y2={y2} /> : <path d={`M${n.x - 3.5} ${y2 - 5}L${n.x} ${y2}L${n.x + 3.5} ${y2 - 5}`} fill="none" />}
          </g>
        );
      })}
    </g>
  );
}

export default function SweepChart({ series, lines, yLabel, height = 380, xMin, xMax, bound = 1 }: { series: SweepSeries[]; lines: SweepTargetLine[]; yLabel: string; height?: number; xMin: number; xMax: number; bound?: number }) {
  // the y range follows the values and the informative intervals; an interval far wider than
  // the others (a loose bound) would flatten everything else, so it runs off the edge instead
  const us = series.flatMap((s) => s.data.map((p) => p.u)).filter((u) => u > 0).sort((a, b) => a - b);
  const medianU = us.length ? us[Math.floor(us.length / 2)] : 0;
  const ys: number[] = [];
  for (const s of series) for (const p of s.data) {
    ys.push(p.y);
    if (p.u <= Math.max(10 * medianU, 0.02 * bound)) ys.push(p.y - p.u, p.y + p.u);
  }
  for (const l of lines) {
    if (l.exact !== null) ys.push(l.exact);
    if (l.consensus) ys.push(l.consensus.value - l.consensus.uncertainty, l.consensus.value + l.consensus.uncertainty);
  }
  const lim = bound * 1.05;
  const lo = Math.max(-lim, ys.length ? Math.min(...ys) : -1), hi = Math.min(lim, ys.length ? Math.max(...ys) : 1);
  const pad = Math.max((hi - lo) * 0.08, 0.01);
  const pad2 = (xMax - xMin) * 0.04 || 0.1;
  const sorted = [...lines].sort((a, b) => a.theta - b.theta);

  const bands = ({ xScale, yScale, innerHeight }: ScatterPlotLayerProps<SweepPoint>) => {
    const xs = xScale as unknown as Scale, y0 = yScale as unknown as Scale;
    const yy = (v: number) => Math.max(0, Math.min(innerHeight, y0(v)));
    const w = 14;
    return (
      <g>
        {sorted.filter((l) => l.exact === null && l.consensus).map((l) => {
          const c = l.consensus!;
          const x = xs(l.theta);
          const y1 = yy(c.value + c.uncertainty), y2 = yy(c.value - c.uncertainty);
          return l.disputed ? (
            <g key={l.target}>
              <rect x={x - w} y={y1} width={2 * w} height={Math.max(2, y2 - y1)} fill="none" stroke={COLORS.disputed} strokeDasharray="3 2" strokeWidth={1.3} />
              <line x1={x - w} x2={x + w} y1={yy(c.value)} y2={yy(c.value)} stroke={COLORS.disputed} strokeDasharray="3 2" />
            </g>
          ) : (
            <g key={l.target}>
              <rect x={x - w} y={y1} width={2 * w} height={Math.max(2, y2 - y1)} fill={COLORS.consensusSoft} fillOpacity={0.9} stroke={COLORS.consensus} strokeOpacity={0.6} />
              <line x1={x - w} x2={x + w} y1={yy(c.value)} y2={yy(c.value)} stroke={COLORS.consensus} strokeOpacity={0.7} />
            </g>
          );
        })}
      </g>
    );
  };
  const exact = ({ xScale, yScale }: ScatterPlotLayerProps<SweepPoint>) => {
    const xs = xScale as unknown as Scale, yy = yScale as unknown as Scale;
    const pts = sorted.filter((l) => l.exact !== null);
    // the firm line runs through consecutive exact points only; a gap (no exact value) breaks it
    const runs: SweepTargetLine[][] = [];
    let cur: SweepTargetLine[] = [];
    for (const l of sorted) {
      if (l.exact !== null) cur.push(l);
      else if (cur.length) { runs.push(cur); cur = []; }
    }
    if (cur.length) runs.push(cur);
    return (
      <g>
        {runs.map((r, i) => (
          <polyline key={i} points={r.map((l) => `${xs(l.theta)},${yy(l.exact!)}`).join(' ')} fill="none" stroke={COLORS.exact} strokeWidth={1.6} />
        ))}
        {pts.map((l) => {
          const x = xs(l.theta), y = yy(l.exact!);
          return <rect key={l.target} x={x - 2.5} y={y - 2.5} width={5} height={5} transform={`rotate(45 ${x} ${y})`} fill={l.disputed ? COLORS.paper : COLORS.exact} stroke={l.disputed ? COLORS.disputed : COLORS.exact} />;
        })}
      </g>
    );
  };

  return (
    <div style={{ height }}>
      <ResponsiveScatterPlot<SweepPoint>
        data={series}
        animate={false}
        margin={{ top: 12, right: 16, bottom: 46, left: 58 }}
        xScale={{ type: 'linear', min: xMin - pad2, max: xMax + pad2 }}
        yScale={{ type: 'linear', min: lo - pad, max: hi + pad }}
        theme={chartTheme}
        axisBottom={{ legend: 'θh (rad)', legendOffset: 36, legendPosition: 'middle', tickValues: 6, format: (v) => formatAngle(Number(v)) }}
        axisLeft={{ legend: yLabel, legendOffset: -48, legendPosition: 'middle', tickValues: 6 }}
        nodeSize={9}
        nodeComponent={Node}
        layers={['grid', 'axes', bands, exact, errorBars, 'nodes', 'mesh']}
        useMesh
        tooltip={({ node }) => (
          <div className="rounded border border-rule-strong bg-paper-raised px-2 py-1 text-xs shadow">
            <div className="font-medium">{node.data.label}</div>
            <div className="num">{formatMeasurement(node.data.y, node.data.u).text}</div>
            <div className="text-ink-soft"><code>{node.data.target}</code>{node.data.verifiable ? ' · verifiable' : ''}{node.data.disputed ? ' · disputed' : ''}</div>
          </div>
        )}
      />
    </div>
  );
}

export interface ResidualPoint { x: number; y: number; theta: number; label: string; mark: MarkKind; target: string; clipped: boolean; z: number }

function ResidualNode({ node }: ScatterPlotNodeProps<ResidualPoint>) {
  const p = markPath(node.data.mark, node.x, node.y, 8);
  return <path d={p.d} fill={p.fill} stroke={p.stroke} strokeWidth={p.strokeWidth} />;
}

export function ResidualChart({ series, height = 220, xMin, xMax, limit }: { series: { id: string; data: ResidualPoint[] }[]; height?: number; xMin: number; xMax: number; limit: number }) {
  const pad2 = (xMax - xMin) * 0.04 || 0.1;
  const guides = ({ yScale, innerWidth }: ScatterPlotLayerProps<ResidualPoint>) => {
    const yy = yScale as unknown as Scale;
    return (
      <g>
        <rect x={0} width={innerWidth} y={yy(2)} height={yy(-2) - yy(2)} fill={COLORS.ok} opacity={0.06} />
        {[2, -2].map((v) => <line key={v} x1={0} x2={innerWidth} y1={yy(v)} y2={yy(v)} stroke={COLORS.ok} strokeDasharray="4 3" />)}
        <line x1={0} x2={innerWidth} y1={yy(0)} y2={yy(0)} stroke={COLORS.exact} strokeWidth={1.2} />
        <text x={innerWidth - 4} y={yy(2) - 4} textAnchor="end" fontSize={10} fill={COLORS.ok}>+2</text>
        <text x={innerWidth - 4} y={yy(-2) + 12} textAnchor="end" fontSize={10} fill={COLORS.ok}>−2</text>
      </g>
    );
  };
  return (
    <div style={{ height }}>
      <ResponsiveScatterPlot<ResidualPoint>
        data={series}
        animate={false}
        margin={{ top: 10, right: 16, bottom: 40, left: 58 }}
        xScale={{ type: 'linear', min: xMin - pad2, max: xMax + pad2 }}
        yScale={{ type: 'linear', min: -limit, max: limit }}
        theme={chartTheme}
        axisBottom={{ legend: 'θh (rad)', legendOffset: 32, legendPosition: 'middle', tickValues: 6, format: (v) => formatAngle(Number(v)) }}
        axisLeft={{ legend: '(x − r) / u', legendOffset: -44, legendPosition: 'middle', tickValues: [-limit, -2, 0, 2, limit] }}
        gridYValues={[-limit, -2, 0, 2, limit]}
        nodeComponent={ResidualNode}
        layers={['grid', guides, 'axes', 'nodes', 'mesh']}
        useMesh
        tooltip={({ node }) => (
          <div className="rounded border border-rule-strong bg-paper-raised px-2 py-1 text-xs shadow">
            <div className="font-medium">{node.data.label}</div>
            <div className="num">z = {Number.isFinite(node.data.z) ? node.data.z.toFixed(2) : '∞'}{node.data.clipped ? ' (off the scale)' : ''}</div>
            <div className="text-ink-soft"><code>{node.data.target}</code></div>
          </div>
        )}
      />
    </div>
  );
}
