const dateFmt = new Intl.DateTimeFormat('en-GB', { year: 'numeric', month: 'short', day: '2-digit' });
const dateTimeFmt = new Intl.DateTimeFormat('en-GB', { year: 'numeric', month: 'short', day: '2-digit', hour: '2-digit', minute: '2-digit' });

export const formatDate = (d: string | Date | null | undefined) => (d ? dateFmt.format(new Date(d)) : '—');
export const formatDateTime = (d: string | Date | null | undefined) => (d ? dateTimeFmt.format(new Date(d)) : '—');

/*
 * Numbers with their uncertainty. One rule everywhere: the standard uncertainty is shown to two
 * significant digits and the value is rounded to the same decimal place, so the digits shown are
 * the digits that mean something. Minus signs are true minus signs (U+2212), figures are tabular
 * (see styles/index.css), and an exact value (u = 0) keeps six significant digits.
 */
const MINUS = '\u2212';
const sign = (s: string) => (s.startsWith('-') ? MINUS + s.slice(1) : s);

/** decimal places that put the last shown digit of u at its second significant digit (0..12) */
export function decimalsFor(u: number, sig = 2): number {
  if (!Number.isFinite(u) || u <= 0) return 6;
  const exp = Math.floor(Math.log10(u));
  return Math.max(0, Math.min(12, sig - 1 - exp));
}

/** a plain number to `sig` significant digits, without exponent for ordinary magnitudes */
export function formatSig(x: number | null | undefined, sig = 3): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  if (x === 0) return '0';
  const ax = Math.abs(x);
  if (ax >= 1e6 || ax < 1e-4) return sign(x.toExponential(sig - 1).replace('e+', 'e'));
  const d = Math.max(0, Math.min(12, sig - 1 - Math.floor(Math.log10(ax))));
  return sign(x.toFixed(d));
}

export interface FormattedMeasurement {
  value: string;
  /** null when no uncertainty was given */
  u: string | null;
  /** "0.1234 ± 0.0012" */
  text: string;
}

/** value ± u with the significant digits that follow u */
export function formatMeasurement(value: number | null | undefined, u?: number | null): FormattedMeasurement {
  if (value === null || value === undefined || !Number.isFinite(value)) return { value: '—', u: null, text: '—' };
  if (u === null || u === undefined || !Number.isFinite(u)) {
    const v = formatSig(value, 4);
    return { value: v, u: null, text: v };
  }
  if (u === 0) {
    const v = formatSig(Math.abs(value) < 1e-12 ? 0 : value, 6);
    return { value: v, u: '0', text: `${v} (exact)` };
  }
  const d = decimalsFor(u);
  if (Math.abs(value) >= 1e6 || u < 1e-10) {
    const v = sign(value.toExponential(3)), s = u.toExponential(1);
    return { value: v, u: s, text: `${v} ± ${s}` };
  }
  const v = sign((Math.abs(value) < 0.5 * 10 ** -d ? 0 : value).toFixed(d));
  const s = u.toFixed(d);
  return { value: v, u: s, text: `${v} ± ${s}` };
}

/** a metric (error, ratio, …) to three significant digits; null reads as a dash */
export const formatMetric = (x: number | null | undefined, sig = 3) => formatSig(x, sig);

/** a share as a percentage: 0.934 → "93 %" */
export const formatPercent = (x: number | null | undefined, digits = 0) =>
  x === null || x === undefined || !Number.isFinite(x) ? '—' : `${(x * 100).toFixed(digits)} %`;

/** an angle in radians, named when it is a simple multiple of pi */
export function formatAngle(x: number): string {
  const r = x / Math.PI;
  const named: [number, string][] = [[0, '0'], [0.25, 'π/4'], [0.5, 'π/2'], [0.75, '3π/4'], [1, 'π'], [-0.5, '−π/2'], [-0.25, '−π/4']];
  for (const [f, s] of named) if (Math.abs(r - f) < 1e-9) return s;
  return sign(String(Number(x.toFixed(4))));
}

/** compute time from hours, in the unit that reads best: 3.2 s, 6 min, 1.5 h, 310 h, 12,000 h */
export function formatHours(h: number | null | undefined): string {
  if (h === null || h === undefined || !Number.isFinite(h)) return '—';
  if (h === 0) return '0 h';
  const p = (x: number) => Number(x.toPrecision(x >= 100 ? 4 : 2)).toLocaleString('en-GB');
  if (h < 1 / 60) return `${p(h * 3600)} s`;
  if (h < 1) return `${p(h * 60)} min`;
  return `${p(h)} h`;
}

/** a relative time for "last activity": today, 3 days ago, else the date */
export function formatRelative(d: string | Date | null | undefined, now = Date.now()): string {
  if (!d) return '—';
  const t = new Date(d).getTime();
  const days = Math.floor((now - t) / 86_400_000);
  if (days <= 0) return 'today';
  if (days === 1) return 'yesterday';
  if (days < 30) return `${days} days ago`;
  return formatDate(d);
}
