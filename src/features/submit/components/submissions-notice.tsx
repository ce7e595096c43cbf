/**
 * Before the form: whether the challenge takes this entry now (the server's submissions status,
 * the same answer as the enforcement), and what stays possible when it does not: checking always,
 * saving a draft before the submission window opens, saving an existing draft, sending a returned
 * entry back to review.
 */
import type { ChallengeDetail } from '@/features/challenges/api/get-challenge';
import { Headline, UtcTime, useServerNow } from '@/features/challenges/components/submissions-status';
import { FormMessage, isTrack } from '@/components/ui';
import { TRACKS } from '@shared/vocabulary';


/** whether this entry (new or a draft, in this track) can be submitted for review now */
export function takesSubmission(c: ChallengeDetail, track: string): boolean {
  const s = c.submissions;
  return isTrack(track) ? s.tracks[track].acceptsEntriesNow : s.acceptsEntriesNow;
}

/** whether a new entry in this track can be stored as a draft now (also before the window opens) */
export function takesDraft(c: ChallengeDetail, track: string): boolean {
  const s = c.submissions;
  return isTrack(track) ? s.tracks[track].acceptsDraftsNow : s.acceptsDraftsNow;
}

export function SubmissionsNotice({ challenge: c, track, entryState, receivedAt }: { challenge: ChallengeDetail; track: string; entryState: string | null; receivedAt: number }) {
  const s = c.submissions;
  const now = useServerNow(s, receivedAt);
  if (entryState && entryState !== 'draft' && entryState !== 'returned') return null;
  if (takesSubmission(c, track)) {
    // this entry's track is open: say so when the other is not, before the form
    const closed = TRACKS.filter((t) => !s.tracks[t].acceptsEntriesNow);
    if (!closed.length) return null;
    return (
      <div className="mb-4" data-testid="submissions-notice">
        <FormMessage tone="info">Only the {TRACKS.filter((t) => !closed.includes(t)).join(' and ')} track takes new entries now; the {closed.join(' and ')} track is closed.</FormMessage>
      </div>
    );
  }
  if (takesDraft(c, track) && entryState !== 'returned') {
    // before the window opens: a draft is saved now, its submission waits for opensAt
    const opens = s.window.opensAt;
    const from = opens ? <>from <UtcTime at={opens} /></> : 'once the submission window opens';
    return (
      <div className="mb-4" data-testid="submissions-notice">
        <FormMessage tone="info">
          <p><strong><Headline state={c.state} s={s} now={now} />.</strong></p>
          <p className="mt-1">
            {entryState === 'draft' ? 'This draft can be edited and saved now' : 'You can prepare this entry and save it as a draft now'} (Save draft); Submit for review is possible {from}.
          </p>
        </FormMessage>
      </div>
    );
  }
  // the challenge takes something in the other track, but this track is closed
  const trackOnly = isTrack(track) && s.acceptsDraftsNow && !s.tracks[track].acceptsDraftsNow;
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
