/**
 * Before the form: whether the challenge takes this entry now (the server's submissions status,
 * the same answer as the enforcement), and what stays possible when it does not: checking always,
 * saving an existing draft, sending a returned entry back to review.
 */
import type { ChallengeDetail } from '@/features/challenges/api/get-challenge';
import { Headline, useServerNow } from '@/features/challenges/components/submissions-status';
import { FormMessage, isTrack } from '@/components/ui';

const TRACKS = ['hardware', 'classical'] as const;

/** whether this entry (new or a draft, in this track) can be stored as new or submitted now */
export function takesEntry(c: ChallengeDetail, track: string): boolean {
  const s = c.submissions;
  return isTrack(track) ? s.tracks[track].acceptsEntriesNow : s.acceptsEntriesNow;
}

export function SubmissionsNotice({ challenge: c, track, entryState, receivedAt }: { challenge: ChallengeDetail; track: string; entryState: string | null; receivedAt: number }) {
  const s = c.submissions;
  const now = useServerNow(s, receivedAt);
  if (entryState && entryState !== 'draft' && entryState !== 'returned') return null;
  if (takesEntry(c, track)) {
    // this entry's track is open: say so when the other is not, before the form
    const closed = TRACKS.filter((t) => !s.tracks[t].acceptsEntriesNow);
    if (!closed.length) return null;
    return (
      <div className="mb-4" data-testid="submissions-notice">
        <FormMessage tone="info">Only the {TRACKS.filter((t) => !closed.includes(t)).join(' and ')} track takes new entries now; the {closed.join(' and ')} track is closed.</FormMessage>
      </div>
    );
  }
  const trackOnly = s.acceptsEntriesNow && isTrack(track);
  const asOf = Date.parse(s.asOf);
  const until = trackOnly ? 'while its track is closed'
    : c.state === 'closed' ? 'until a moderator opens the challenge again'
    : s.window.opensAt && Date.parse(s.window.opensAt) > asOf ? 'until the submission window opens'
    : s.window.closesAt && Date.parse(s.window.closesAt) <= asOf ? 'unless a moderator extends the submission window'
    : 'until the challenge takes entries';
  const why = trackOnly
    ? <>The {track} track of this challenge takes no new entries now; open track{s.openTracks.length === 1 ? '' : 's'}: {s.openTracks.join(', ')}.</>
    : <><Headline state={c.state} s={s} now={now} />.</>;
  return (
    <div className="mb-4" data-testid="submissions-notice">
      <FormMessage tone="info">
        <p><strong>{why}</strong></p>
        {entryState === 'returned' ? (
          <p className="mt-1">This entry was returned by a moderator: it can still be fixed and sent back to review.</p>
        ) : entryState === 'draft' ? (
          <p className="mt-1">This draft stays editable and can be saved; it cannot be submitted for review {until}.</p>
        ) : (
          <p className="mt-1">
            You can still check an entry here (Check validates it and previews the scores), but a new {trackOnly ? `${track} ` : ''}entry cannot be saved or submitted {until}.
            Drafts already saved stay editable and can be saved from My entries.
          </p>
        )}
      </FormMessage>
    </div>
  );
}
