import { ResponsiveHeatMap } from '@nivo/heatmap';
import { formatSig } from '@/lib/format';
import { chartTheme } from './theme';

export interface HeatCell { x: string; y: number | null; n?: number }
export type HeatRow = { id: string; data: HeatCell[] };

/** |d|/U: paper at 0, violet towards 1 (the edge of agreement), magenta beyond 2 */
function ratioColor(v: number | null): string {
  if (v === null || !Number.isFinite(v)) return '#f1efe9';
  const stops: [number, [number, number, number]][] = [[0, [250, 249, 246]], [1, [183, 173, 216]], [2, [161, 53, 110]], [4, [90, 20, 55]]];
  const x = Math.min(v, 4);
  for (let i = 1; i < stops.length; i++) {
    const [a, ca] = stops[i - 1], [b, cb] = stops[i];
    if (x <= b) {
      const t = (x - a) / (b - a);
      const c = ca.map((q, k) => Math.round(q + (cb[k] - q) * t));
      return `rgb(${c[0]},${c[1]},${c[2]})`;
    }
  }
  return 'rgb(90,20,55)';
}

export default function AgreementHeatmap({ rows, height }: { rows: HeatRow[]; height: number }) {
  const n = rows.length;
  return (
    <div style={{ height }}>
      <ResponsiveHeatMap<HeatCell, Record<string, unknown>>
        data={rows}
        animate={false}
        margin={{ top: 24, right: 4, bottom: 4, left: 28 }}
        theme={chartTheme}
        axisTop={{ tickSize: 0, tickPadding: 6 }}
        axisRight={null}
        axisBottom={null}
        axisLeft={{ tickSize: 0, tickPadding: 6 }}
        colors={(cell) => ratioColor(cell.value)}
        emptyColor="#f1efe9"
        borderColor="#ffffff"
        borderWidth={1}
        enableLabels={n <= 9}
        labelTextColor={(cell) => ((cell.value ?? 0) > 1.6 ? '#ffffff' : '#1b2130')}
        valueFormat={(v) => formatSig(v, 2)}
        hoverTarget="rowColumn"
        tooltip={({ cell }) => (
          <div className="rounded border border-rule-strong bg-paper-raised px-2 py-1 text-xs shadow">
            <div>entry {cell.serieId} vs {cell.data.x}</div>
            <div className="num">|d|/U = {cell.value === null ? '—' : formatSig(cell.value, 3)}{cell.data.n !== undefined ? ` over ${cell.data.n} targets` : ''}</div>
          </div>
        )}
      />
    </div>
  );
}
export { ratioColor };
