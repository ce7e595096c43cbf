import type { Track } from '@shared/vocabulary';
/** The charts' look, from the design tokens in tailwind.config.ts (nivo needs literal colours). */
export const COLORS = {
  ink: '#1b2130', inkSoft: '#4b5466', inkFaint: '#646c7d', rule: '#dedad1', ruleStrong: '#c3bdb0', paper: '#ffffff',
  hardware: '#c25a12', classical: '#2766a3', exact: '#111621', consensus: '#7667a8', consensusSoft: '#ebe8f4', disputed: '#a1356e', ok: '#2b7a4b',
};

export const chartTheme = {
  text: { fontFamily: '"Fira Sans", system-ui, sans-serif', fontSize: 11, fill: COLORS.inkSoft },
  axis: {
    domain: { line: { stroke: COLORS.ruleStrong, strokeWidth: 1 } },
    ticks: { line: { stroke: COLORS.ruleStrong, strokeWidth: 1 }, text: { fontSize: 11, fill: COLORS.inkSoft, fontFamily: '"Fira Sans", system-ui, sans-serif', fontVariantNumeric: 'tabular-nums' } },
    legend: { text: { fontSize: 12, fill: COLORS.ink, fontFamily: '"Fira Sans", system-ui, sans-serif' } },
  },
  grid: { line: { stroke: COLORS.rule, strokeWidth: 1 } },
  tooltip: { container: { fontFamily: '"Fira Sans", system-ui, sans-serif', fontSize: 12, borderRadius: 4, boxShadow: '0 2px 8px rgba(0,0,0,.12)' } },
};

export type MarkKind = Track | 'baseline';
export const markColor = (k: MarkKind) => (k === 'hardware' ? COLORS.hardware : k === 'classical' ? COLORS.classical : COLORS.exact);

/** the track marks in SVG: hardware a filled diamond, classical a hollow circle, the house baseline a hollow square */
export function markPath(k: MarkKind, x: number, y: number, s: number): { d: string; fill: string; stroke: string; strokeWidth: number } {
  const h = s / 2;
  const c = markColor(k);
  if (k === 'hardware') return { d: `M${x} ${y - h - 1}L${x + h + 1} ${y}L${x} ${y + h + 1}L${x - h - 1} ${y}Z`, fill: c, stroke: c, strokeWidth: 1 };
  if (k === 'classical') return { d: `M${x - h} ${y}a${h} ${h} 0 1 0 ${2 * h} 0a${h} ${h} 0 1 0 ${-2 * h} 0`, fill: COLORS.paper, stroke: c, strokeWidth: 1.8 };
  return { d: `M${x - h} ${y - h}h${2 * h}v${2 * h}h${-2 * h}Z`, fill: COLORS.paper, stroke: c, strokeWidth: 1.6 };
}
