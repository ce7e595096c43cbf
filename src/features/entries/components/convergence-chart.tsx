import { ResponsiveLine } from '@nivo/line';
import type { ConvergencePoint } from '@/features/entries/api/get-entry';
import { formatSig } from '@/lib/format';
import { COLORS, chartTheme } from '@/features/challenges/charts/theme';

/** value against the control parameter (bond dimension, truncation …), with the reference as a line */
export default function ConvergenceChart({ trace, reference, color, height = 240 }: { trace: ConvergencePoint[]; reference: number | null; color: string; height?: number }) {
  const pts = [...trace].sort((a, b) => a.parameter - b.parameter);
  const vals = [...pts.map((p) => p.value), ...(reference !== null ? [reference] : [])];
  const lo = Math.min(...vals), hi = Math.max(...vals), pad = (hi - lo) * 0.08 || Math.abs(hi) * 0.01 || 0.01;
  const log = pts.length > 2 && pts[0].parameter > 0 && pts[pts.length - 1].parameter / pts[0].parameter >= 8;
  return (
    <div style={{ height }}>
      <ResponsiveLine
        data={[{ id: 'value', data: pts.map((p) => ({ x: p.parameter, y: p.value })) }]}
        animate={false}
        margin={{ top: 10, right: 16, bottom: 40, left: 60 }}
        xScale={log ? { type: 'log', base: 2, min: 'auto', max: 'auto' } : { type: 'linear', min: 'auto', max: 'auto' }}
        yScale={{ type: 'linear', min: lo - pad, max: hi + pad }}
        gridXValues={pts.map((p) => p.parameter)}
        theme={chartTheme}
        colors={[color]}
        pointSize={8}
        pointColor="#ffffff"
        pointBorderWidth={2}
        pointBorderColor={{ from: 'seriesColor' }}
        axisBottom={{ legend: 'control parameter', legendOffset: 32, legendPosition: 'middle', tickValues: pts.map((p) => p.parameter) }}
        axisLeft={{ legend: 'value', legendOffset: -50, legendPosition: 'middle', tickValues: 5, format: (v) => formatSig(Number(v), 4) }}
        gridYValues={5}
        markers={reference !== null ? [{ axis: 'y', value: reference, lineStyle: { stroke: COLORS.exact, strokeWidth: 1.5 }, legend: 'exact', legendPosition: 'top-right', textStyle: { fontSize: 10, fill: COLORS.exact } }] : []}
        useMesh
        tooltip={({ point }) => (
          <div className="rounded border border-rule-strong bg-paper-raised px-2 py-1 text-xs shadow">
            <span className="num">{String(point.data.x)} → {formatSig(Number(point.data.y), 5)}</span>
          </div>
        )}
      />
    </div>
  );
}
