/*
 * Moments that rules depend on (a submission window opening or closing): shown in UTC, the same
 * for every reader and the way the server enforces them, with the reader's local time for a
 * tooltip and a relative phrase ("in 3 days", "2 hours ago"). Same style as formatDateTime in
 * format.ts ("24 Dec 2026, 00:00").
 */
const utcDateTime = new Intl.DateTimeFormat('en-GB', { year: 'numeric', month: 'short', day: '2-digit', hour: '2-digit', minute: '2-digit', timeZone: 'UTC' });
const utcDate = new Intl.DateTimeFormat('en-GB', { year: 'numeric', month: 'short', day: '2-digit', timeZone: 'UTC' });
const localDateTime = new Intl.DateTimeFormat('en-GB', { year: 'numeric', month: 'short', day: '2-digit', hour: '2-digit', minute: '2-digit', timeZoneName: 'short' });

/** "24 Dec 2026, 00:00 UTC" */
export const formatUtcDateTime = (d: string | Date | null | undefined) => (d ? `${utcDateTime.format(new Date(d))} UTC` : '—');
/** "24 Dec 2026" (the UTC date) */
export const formatUtcDate = (d: string | Date | null | undefined) => (d ? utcDate.format(new Date(d)) : '—');
/** the reader's local time with its zone, for a tooltip: "24 Dec 2026, 01:00 CET" */
export const formatLocalDateTime = (d: string | Date | null | undefined) => (d ? localDateTime.format(new Date(d)) : '—');

/** a moment relative to now, either way: "in 3 days", "in 5 hours", "in under a minute", "2 days ago" */
export function formatFromNow(d: string | Date | null | undefined, now = Date.now()): string {
  if (!d) return '—';
  const ms = new Date(d).getTime() - now;
  const a = Math.abs(ms);
  const unit = (n: number, w: string) => `${n} ${w}${n === 1 ? '' : 's'}`;
  const span = a < 60_000 ? null
    : a < 3_570_000 ? unit(Math.round(a / 60_000), 'minute')
    : a < 84_600_000 ? unit(Math.round(a / 3_600_000), 'hour')
    : unit(Math.round(a / 86_400_000), 'day'); // rounded: 47.9 hours is "in 2 days", not "in 1 day"
  if (!span) return ms >= 0 ? 'in under a minute' : 'just now';
  return ms >= 0 ? `in ${span}` : `${span} ago`;
}

/**
 * "As of 2026-12-04" as the reader means it: the end of that day in their own time zone, as an
 * instant (ISO). A full ISO instant passes through unchanged; anything else is returned as given
 * (the server names the problem).
 */
export function endOfLocalDay(date: string): string {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(date);
  if (!m) return date;
  return new Date(Number(m[1]), Number(m[2]) - 1, Number(m[3]), 23, 59, 59, 999).toISOString();
}
