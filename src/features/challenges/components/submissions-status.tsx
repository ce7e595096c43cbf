/**
 * Whether a challenge takes entries now, as the server says (submissions in GET
 * /api/challenges/:slug and the catalogue; the same answer as the enforcement): a badge for the
 * catalogue, and on the challenge page a status line with the window, the open tracks and the
 * submit button. Before the window opens drafts can already be prepared (acceptsDraftsNow) while
 * submissions wait for opensAt. Dates are shown in UTC, the reader's local time in the tooltip.
 */
import { useEffect, useState } from 'react';
import type { SubmissionsStatus } from '@/features/challenges/api/get-challenge';
import { formatFromNow, formatLocalDateTime, formatUtcDate, formatUtcDateTime } from '@/lib/format-time';
import { Badge, ButtonLink, TrackMark, buttonClass, cx, type BadgeTone } from '@/components/ui';
import { TRACKS } from '@shared/vocabulary';


/** a moment in UTC, with the reader's local time in the tooltip */
export function UtcTime({ at, date = false, className }: { at: string; date?: boolean; className?: string }) {
  return (
    <time dateTime={at} title={`Your local time: ${formatLocalDateTime(at)}`} className={cx('num whitespace-nowrap underline decoration-rule-strong decoration-dotted underline-offset-2', className)}>
      {date ? formatUtcDate(at) : formatUtcDateTime(at)}
    </time>
  );
}

/** the server's clock now: the status's asOf, moved on by the time since it arrived; ticks every 30 s */
export function useServerNow(s: SubmissionsStatus, receivedAt: number): number {
  const [now, setNow] = useState(() => Date.now());
  useEffect(() => {
    const id = setInterval(() => setNow(Date.now()), 30_000);
    return () => clearInterval(id);
  }, []);
  const skew = receivedAt ? Date.parse(s.asOf) - receivedAt : 0;
  return now + skew;
}

export type EntryStatusKey = 'open' | 'upcoming' | 'closed' | 'draft';

/** what the badge says: open (taking submissions now), upcoming (the window opens later; drafts may be prepared), closed, draft */
export function entryStatus(state: string, s: SubmissionsStatus): { key: EntryStatusKey; label: string; tone: BadgeTone; title: string } {
  if (state === 'draft') return { key: 'draft', label: 'draft', tone: 'disputed', title: 'Not published yet' };
  if (s.acceptsEntriesNow) {
    const only = TRACKS.filter((t) => s.tracks[t].acceptsEntriesNow);
    const until = s.window.closesAt ? ` until ${formatUtcDateTime(s.window.closesAt)}` : '';
    return { key: 'open', label: only.length === 1 ? `open, ${only[0]} only` : 'open', tone: 'ok', title: `Takes entries${only.length === 1 ? ` in the ${only[0]} track` : ''}${until}` };
  }
  const opens = s.window.opensAt;
  if (state === 'open' && opens && Date.parse(opens) > Date.parse(s.asOf))
    return { key: 'upcoming', label: `opens ${formatUtcDate(opens)}`, tone: 'neutral', title: `Takes submissions from ${formatUtcDateTime(opens)}${s.acceptsDraftsNow ? '; drafts can be prepared now' : ''}` };
  return { key: 'closed', label: 'closed', tone: 'neutral', title: `Takes no new entries: ${shortReason(state, s)}` };
}

export function EntryStatusBadge({ state, s }: { state: string; s: SubmissionsStatus }) {
  const st = entryStatus(state, s);
  return <span title={st.title}><Badge tone={st.tone}>{st.label}</Badge></span>;
}

/** the first sentence of the status line: open until / opens on / closed since */
export function Headline({ state, s, now }: { state: string; s: SubmissionsStatus; now: number }) {
  const { opensAt, closesAt } = s.window;
  const rel = (at: string) => <span className="text-ink-soft"> ({formatFromNow(at, now)})</span>;
  if (s.acceptsEntriesNow)
    return closesAt
      ? <>Open for entries until <UtcTime at={closesAt} />{rel(closesAt)}</>
      : <>Open for entries, with no closing date</>;
  if (state === 'draft') return <>Not open for entries: not published yet</>;
  if (state === 'closed') return <>Closed for entries: a moderator closed submissions</>;
  if (opensAt && Date.parse(opensAt) > Date.parse(s.asOf))
    return <>Opens for submissions on <UtcTime at={opensAt} />{rel(opensAt)}{closesAt && <>, until <UtcTime at={closesAt} /></>}{s.acceptsDraftsNow && <>; drafts can be prepared now</>}</>;
  if (closesAt && Date.parse(closesAt) <= Date.parse(s.asOf))
    return <>Closed for entries since <UtcTime at={closesAt} />{rel(closesAt)}</>;
  return <>Closed for entries: {s.reason ?? 'no track open'}</>;
}

/**
 * The challenge page's status line: open until / opens on / closed, the open tracks, and what
 * stays possible when it takes no entries (drafts, returned entries).
 */
export function SubmissionsStatusLine({ state, s, receivedAt }: { state: string; s: SubmissionsStatus; receivedAt: number }) {
  const now = useServerNow(s, receivedAt);
  const st = entryStatus(state, s);
  return (
    <div className="mt-3 space-y-1 text-sm text-ink" data-testid="submissions-status">
      <p>
        <Badge tone={st.tone} className="mr-2 align-[1px]">{st.key === 'upcoming' ? 'not yet open' : st.key === 'open' ? 'open' : st.label}</Badge>
        <Headline state={state} s={s} now={now} />
      </p>
      <p className="flex flex-wrap items-center gap-x-3 gap-y-1 text-ink-soft" data-testid="submissions-tracks">
        <span>{s.acceptsEntriesNow ? 'Tracks:' : 'Tracks when open:'}</span>
        {TRACKS.map((t) => {
          const open = s.openTracks.includes(t);
          return (
            <span key={t} className={cx('inline-flex items-center gap-1', !open && 'text-ink-faint')} title={s.tracks[t].reason ? `The ${t} track takes no new entries now: ${s.tracks[t].reason}` : `The ${t} track takes entries now`}>
              <TrackMark track={t} size={10} className={cx(!open && 'opacity-50')} />
              {t} {open ? 'open' : 'closed'}
            </span>
          );
        })}
      </p>
      {!s.acceptsEntriesNow && s.acceptsDraftsNow && s.window.opensAt && (
        <p className="text-ink-soft">A draft saved now can be submitted for review from <UtcTime at={s.window.opensAt} />.</p>
      )}
      {!s.acceptsEntriesNow && !s.acceptsDraftsNow && state !== 'draft' && (
        <p className="text-ink-soft">Drafts already saved stay editable from My entries, and a returned entry can be fixed and sent back to review.</p>
      )}
    </div>
  );
}

/** why it takes no entries, briefly, with the dates as this page writes them */
export function shortReason(state: string, s: SubmissionsStatus): string {
  const { opensAt, closesAt } = s.window;
  const asOf = Date.parse(s.asOf);
  if (state === 'closed') return 'submissions closed';
  if (state === 'open' && opensAt && Date.parse(opensAt) > asOf) return `opens ${formatUtcDateTime(opensAt)}`;
  if (state === 'open' && closesAt && Date.parse(closesAt) <= asOf) return `closed ${formatUtcDateTime(closesAt)}`;
  return s.reason ?? 'closed';
}

/**
 * "Submit an entry"; before the window opens the same link to the form, where a draft can be saved
 * (submitting waits for opensAt, said beside it); otherwise the button disabled with the reason
 */
export function SubmitEntryButton({ slug, state, s }: { slug: string; state: string; s: SubmissionsStatus }) {
  const to = `/challenges/${encodeURIComponent(slug)}/submit`;
  if (s.acceptsEntriesNow) return <ButtonLink variant="primary" size="sm" to={to}>Submit an entry</ButtonLink>;
  if (s.acceptsDraftsNow)
    return (
      <span className="inline-flex flex-wrap items-center gap-2">
        <ButtonLink variant="primary" size="sm" to={to} aria-describedby="submit-drafts-only">Submit an entry</ButtonLink>
        <span id="submit-drafts-only" className="text-xs text-ink-soft">Drafts only: submissions open {s.window.opensAt ? formatUtcDateTime(s.window.opensAt) : 'later'}</span>
      </span>
    );
  return (
    <span className="inline-flex flex-wrap items-center gap-2">
      <button type="button" disabled className={buttonClass('primary', 'sm')} aria-describedby="submit-closed-reason">Submit an entry</button>
      <span id="submit-closed-reason" className="text-xs text-ink-soft">Not taking entries: {shortReason(state, s)}</span>
    </span>
  );
}
