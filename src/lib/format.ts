import type { ConsensusEstimator } from '@shared/scoring/consensus';
import { resolveMetric, type PrimaryMetric } from '@shared/scoring/standings';

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

const SUPERSCRIPT: Record<string, string> = { '-': '\u207B', '0': '\u2070', '1': '\u00B9', '2': '\u00B2', '3': '\u00B3', '4': '\u2074', '5': '\u2075', '6': '\u2076', '7': '\u2077', '8': '\u2078', '9': '\u2079' };

/** "·10⁻⁵": a power of ten as a reader writes it, never "e-5" */
export function powerOfTen(e: number): string {
  return `\u00B710${String(e).split('').map((ch) => SUPERSCRIPT[ch] ?? ch).join('')}`;
}

/** the decimal exponent of |x| (x ≠ 0) */
const exponentOf = (x: number) => Math.floor(Math.log10(Math.abs(x)));

/** a plain number to `sig` significant digits; very large or small magnitudes as m·10ⁿ */
export function formatSig(x: number | null | undefined, sig = 3): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  if (x === 0) return '0';
  const ax = Math.abs(x);
  if (ax >= 1e6 || ax < 1e-4) {
    // toExponential rounds the mantissa and may carry into the exponent (9.99e-5 → 1.00e-4)
    const [m, e] = x.toExponential(sig - 1).split('e');
    return sign(m) + powerOfTen(Number(e));
  }
  const d = Math.max(0, Math.min(12, sig - 1 - Math.floor(Math.log10(ax))));
  return sign(x.toFixed(d));
}

export interface FormattedMeasurement {
  value: string;
  /** null when no uncertainty was given */
  u: string | null;
  /** a common power of ten for value and u ("·10⁻⁵"), or '' */
  scale: string;
  /** "0.1234 ± 0.0012", "(6.29 ± 0.12)·10⁻⁵" */
  text: string;
}

/**
 * value ± u with the significant digits that follow u. When that would need more than six
 * decimals, or the value reaches a million, both are written over one power of ten:
 * (6.29 ± 0.12)·10⁻⁵, never 6.29e-5.
 */
export function formatMeasurement(value: number | null | undefined, u?: number | null): FormattedMeasurement {
  if (value === null || value === undefined || !Number.isFinite(value)) return { value: '—', u: null, scale: '', text: '—' };
  if (u === null || u === undefined || !Number.isFinite(u)) {
    const v = formatSig(value, 4);
    return { value: v, u: null, scale: '', text: v };
  }
  if (u === 0) {
    const v = formatSig(Math.abs(value) < 1e-12 ? 0 : value, 6);
    return { value: v, u: '0', scale: '', text: `${v} (exact)` };
  }
  const d = decimalsFor(u);
  const big = Math.abs(value) >= 1e6;
  if (big || d > 6) {
    const e = value !== 0 && Math.abs(value) >= u ? exponentOf(value) : exponentOf(u);
    const dd = Math.max(0, Math.min(15, 1 - exponentOf(u) + e)); // u's second significant digit, over 10^e
    const mv = value / 10 ** e, mu = u / 10 ** e;
    const v = sign((Math.abs(mv) < 0.5 * 10 ** -dd ? 0 : mv).toFixed(dd));
    const s = mu.toFixed(dd);
    const scale = e === 0 ? '' : powerOfTen(e);
    return { value: v, u: s, scale, text: scale ? `(${v} ± ${s})${scale}` : `${v} ± ${s}` };
  }
  const v = sign((Math.abs(value) < 0.5 * 10 ** -d ? 0 : value).toFixed(d));
  const s = u.toFixed(d);
  return { value: v, u: s, scale: '', text: `${v} ± ${s}` };
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

/**
 * Natural order for keys that mix text and numbers: t1, t2, t12 (not t1, t12, t2); "t4-h0.785398:z9"
 * before "t4-h0.785398:z10". Case-insensitive; ties keep a stable, plain comparison.
 */
const collator = new Intl.Collator('en', { numeric: true, sensitivity: 'base' });
export function naturalCompare(a: string, b: string): number {
  return collator.compare(a, b) || (a < b ? -1 : a > b ? 1 : 0);
}

/** the consensus estimators in words (shared/scoring/consensus.ts names them by id) */
const ESTIMATOR_NAMES: Record<ConsensusEstimator, string> = {
  'weighted-mean': 'weighted mean',
  'random-effects-dl': 'random-effects mean (DerSimonian–Laird)',
  'random-effects-pm': 'random-effects mean (Paule–Mandel)',
  'largest-consistent-subset': 'weighted mean of the largest consistent subset',
  median: 'median',
};
export const estimatorName = (id: string | null | undefined) => (id ? ESTIMATOR_NAMES[id as ConsensusEstimator] ?? id.replace(/-/g, ' ') : '—');

/** the ranking metrics in words */
const METRIC_NAMES: Record<PrimaryMetric, string> = {
  overall: 'proper score on every ranked target',
  'crps-verifiable': 'CRPS on targets with an exact reference',
  agreement: 'proper score against the consensus',
};
/** older metric names (rmse-verifiable, ...) are named by the metric they now rank by (scoring rules) */
export const metricName = (id: string | null | undefined) => (id ? METRIC_NAMES[resolveMetric(id) ?? (id as PrimaryMetric)] ?? id.replace(/-/g, ' ') : '—');

/** chi-squared per degree of freedom: "χ²/ν = 12.3/4" */
export const chiSquaredText = (chi2: number | null | undefined, nu: number | null | undefined) =>
  chi2 === null || chi2 === undefined || !nu ? '—' : `${formatSig(chi2, 3)}/${nu}`;

/** the zero-noise extrapolation models (shared/scoring/zne.ts) in words */
const ZNE_MODEL_NAMES: Record<string, string> = { richardson: 'Richardson', linear: 'linear fit', 'polynomial-2': 'quadratic fit', exponential: 'exponential (asymptote 0)', 'exponential-free-asymptote': 'exponential (free asymptote)' };
export const zneModelName = (id: string) => ZNE_MODEL_NAMES[id] ?? id.replace(/-/g, ' ');

/** a duration in milliseconds as a reader says it: 840 ms, 3.2 s, 6.5 min */
export function formatMs(ms: number | null | undefined): string {
  if (ms === null || ms === undefined || !Number.isFinite(ms)) return '—';
  if (ms < 1000) return `${Math.round(ms)} ms`;
  if (ms < 60_000) return `${Number((ms / 1000).toPrecision(2))} s`;
  return formatHours(ms / 3_600_000);
}
