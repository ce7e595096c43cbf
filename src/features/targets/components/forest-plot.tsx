import { useEffect, useState } from 'react';
import { ResponsiveScatterPlot, type ScatterPlotLayerProps, type ScatterPlotNodeProps } from '@nivo/scatterplot';
import { formatMeasurement, formatSig } from '@/lib/format';
import { COLORS, chartTheme, markColor, markPath, type MarkKind } from '@/features/challenges/charts/theme';

export interface ForestRow { x: number; y: number; u: number; label: string; mark: MarkKind; id: string }

type Scale = (v: number) => number;

function Node({ node }: ScatterPlotNodeProps<ForestRow>) {
  const p = markPath(node.data.mark, node.x, node.y, 10);
  return <path d={p.d} fill={p.fill} stroke={p.stroke} strokeWidth={p.strokeWidth} />;
}

/**
 * The forest plot of one target: each estimate on its own row with its interval (thick: ±u,
 * thin: ±2u, the k = 2 interval of the scoring), against the exact reference (a firm line) or the
 * consensus (its ±u band). Intervals wider than the plot end in an arrow.
 */
export default function ForestPlot({ rows, reference, consensus, label, describedBy }: {
  rows: ForestRow[]; reference: number | null; consensus: { value: number; uncertainty: number } | null; label: string; describedBy?: string;
}) {
  const us = rows.map((r) => r.u).filter((u) => u > 0).sort((a, b) => a - b);
  const medianU = us.length ? us[Math.floor(us.length / 2)] : 0;
  const xs: number[] = [];
  for (const r of rows) { xs.push(r.x); if (r.u <= 20 * medianU) xs.push(r.x - 2 * r.u, r.x + 2 * r.u); }
  if (reference !== null) xs.push(reference);
  if (consensus) xs.push(consensus.value - consensus.uncertainty, consensus.value + consensus.uncertainty);
  const lo = Math.min(...xs), hi = Math.max(...xs);
  const pad = Math.max((hi - lo) * 0.08, 1e-9);
  const xMin = lo - pad, xMax = hi + pad;
  const n = rows.length;
  const height = 56 + Math.max(3, n) * 34;

  const guide = ({ xScale, innerHeight }: ScatterPlotLayerProps<ForestRow>) => {
    const sx = xScale as unknown as Scale;
    return (
      <g>
        {consensus && (
          <g>
            <rect x={sx(consensus.value - consensus.uncertainty)} y={0} width={Math.max(1, sx(consensus.value + consensus.uncertainty) - sx(consensus.value - consensus.uncertainty))} height={innerHeight} fill={COLORS.consensusSoft} stroke={COLORS.consensus} strokeOpacity={0.5} />
            <line x1={sx(consensus.value)} x2={sx(consensus.value)} y1={0} y2={innerHeight} stroke={COLORS.consensus} strokeWidth={1.4} strokeDasharray="4 3" />
          </g>
        )}
        {reference !== null && <line x1={sx(reference)} x2={sx(reference)} y1={0} y2={innerHeight} stroke={COLORS.exact} strokeWidth={1.8} />}
      </g>
    );
  };
  const bars = ({ nodes, xScale, innerWidth }: ScatterPlotLayerProps<ForestRow>) => {
    const sx = xScale as unknown as Scale;
    const clamp = (x: number) => Math.max(0, Math.min(innerWidth, x));
    return (
      <g>
        {nodes.map((nd) => {
          const r = nd.data;
          if (!(r.u > 0)) return null;
          const c = markColor(r.mark);
          const a2 = sx(r.x - 2 * r.u), b2 = sx(r.x + 2 * r.u);
          return (
            <g key={nd.id} stroke={c}>
              <line x1={clamp(a2)} x2={clamp(b2)} y1={nd.y} y2={nd.y} strokeWidth={1.1} />
              <line x1={clamp(sx(r.x - r.u))} x2={clamp(sx(r.x + r.u))} y1={nd.y} y2={nd.y} strokeWidth={3.2} strokeOpacity={0.55} />
              {a2 >= 0 ? <line x1={a2} x2={a2} y1={nd.y - 4} y2={nd.y + 4} strokeWidth={1.1} /> : <path d={`M5 ${nd.y - 4}L0 ${nd.y}L5 ${nd.y + 4}`} fill="none" />}
              {b2 <= innerWidth ? <line x1={b2} x2={b2} y1={nd.y - 4} y2={nd.y + 4} strokeWidth={1.1} /> : <path d={`M${innerWidth - 5} ${nd.y - 4}L${innerWidth} ${nd.y}L${innerWidth - 5} ${nd.y + 4}`} fill="none" />}
            </g>
          );
        })}
      </g>
    );
  };
  // a phone gives the labels less room: the plot keeps at least half the width
  const narrow = useNarrow();
  const max = narrow ? 13 : 24;
  const short = (s: string) => (s.length > max ? `${s.slice(0, max - 1)}…` : s);
  return (
    <div role="img" aria-label={label} aria-describedby={describedBy} style={{ height }} className="w-full" data-testid="forest-plot">
      <ResponsiveScatterPlot<ForestRow>
        data={[{ id: 'estimates', data: rows }]}
        animate={false}
        margin={{ top: 10, right: 16, bottom: 44, left: narrow ? 92 : 160 }}
        xScale={{ type: 'linear', min: xMin, max: xMax }}
        yScale={{ type: 'linear', min: -0.7, max: Math.max(n, 1) - 0.3, reverse: true }}
        theme={chartTheme}
        enableGridY={false}
        axisLeft={{ tickValues: rows.map((r) => r.y), tickSize: 0, tickPadding: 8, format: (v) => short(rows[Number(v)]?.label ?? '') }}
        axisBottom={{ legend: 'estimate', legendOffset: 34, legendPosition: 'middle', tickValues: narrow ? 3 : 5, format: (v) => formatSig(Number(v), 2) }}
        nodeComponent={Node}
        layers={['grid', guide, 'axes', bars, 'nodes', 'mesh']}
        useMesh
        tooltip={({ node }) => (
          <div className="rounded border border-rule-strong bg-paper-raised px-2 py-1 text-xs shadow">
            <div className="font-medium">{node.data.label}</div>
            <div className="num">{formatMeasurement(node.data.x, node.data.u).text}</div>
          </div>
        )}
      />
    </div>
  );
}

function useNarrow(): boolean {
  const q = '(max-width: 640px)';
  const [narrow, setNarrow] = useState(() => typeof window !== 'undefined' && window.matchMedia(q).matches);
  useEffect(() => {
    const m = window.matchMedia(q);
    const on = () => setNarrow(m.matches);
    m.addEventListener('change', on);
    return () => m.removeEventListener('change', on);
  }, []);
  return narrow;
}
