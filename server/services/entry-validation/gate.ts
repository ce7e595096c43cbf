/**
 * What a challenge's settings (state, open tracks, submission window) allow entries to do now: the
 * one rule set (gateReasons and REFUSES), its enforcement (gateProblems, refuse, loadGate) and the
 * public status (entryGateStatus).
 */
import { eq } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { challenges } from '../../db/schema';
import { AppError, notFound, type FieldProblem } from '../../errors';
import { MAX_PROBLEMS } from './types';
import { isTrack, TRACKS, type Track } from '@shared/vocabulary';

const isObject = (v: unknown): v is Record<string, unknown> => v !== null && typeof v === 'object' && !Array.isArray(v);

/*
 * What a moderator's settings (challenges.state, challenges.settings.tracks and
 * challenges.settings.submissionWindow, see update-challenge-settings.ts) mean for entries:
 *
 * - state "closed" (the "Submissions: closed" switch): no new entries, no submissions to review and
 *   no new revisions of published entries, until a moderator opens the challenge again.
 * - tracks: the tracks that take entries; a track not listed is closed. No "tracks" setting means
 *   both are open (the default of a new challenge).
 * - submissionWindow {opensAt, closesAt}: submissions are taken from opensAt (inclusive) until
 *   closesAt (exclusive); a missing end is unbounded. Before opensAt a team may already create and
 *   edit drafts (prepared in advance, e.g. for a blind round, and submitted the moment the window
 *   opens): the answers warn when submissions open, and the submission and new revisions are
 *   refused until then. After closesAt: no new entries, no submissions, no new revisions, as for a
 *   closed challenge.
 *
 * Drafts that exist when a track, the window or the challenge closes stay editable (PUT): editing
 * harms nobody and the draft is ready if a moderator reopens or extends; the gate is the
 * submission, which is refused (409) while the settings forbid it, and the PUT answer warns so.
 * A draft may keep a track that closed after it was created, but no edit moves an entry into a
 * closed track. A returned entry is the exception: it was submitted while the challenge took it
 * and a moderator sent it back for a fix, so its resubmission continues that review and is not
 * held back by the settings (the moderator who returned it reviews the result).
 *
 * A refusal by the settings is a 409 (the document is fine; the challenge's state conflicts with
 * it, and the request can succeed once that changes); the dry run reports the same problems as
 * warnings with acceptsDrafts / acceptsSubmissions, so a team learns them before posting and
 * still gets the score preview. The rules are gateReasons and REFUSES below, and nowhere else: the
 * enforcement (gateProblems) and the public status (entryGateStatus) both apply them. The clock is
 * always the request's (ctx.now()), never the process's.
 */
export { TRACKS };
export type GateAction = 'create' | 'submit' | 'revise';
/** A challenge as its settings see it. */
export interface ChallengeGate { slug: string; state: string; settings: unknown }

export function openTracks(settings: unknown): Track[] {
  const t = isObject(settings) ? settings.tracks : undefined;
  if (!Array.isArray(t)) return [...TRACKS];
  return TRACKS.filter((x) => t.includes(x));
}

export function submissionWindow(settings: unknown): { opensAt: Date | null; closesAt: Date | null } {
  const w = isObject(settings) ? settings.submissionWindow : undefined;
  const date = (v: unknown) => {
    if (typeof v !== 'string') return null;
    const ms = Date.parse(v);
    return Number.isFinite(ms) ? new Date(ms) : null;
  };
  return isObject(w) ? { opensAt: date(w.opensAt), closesAt: date(w.closesAt) } : { opensAt: null, closesAt: null };
}

const TAKES_NO: Record<GateAction, string> = { create: 'takes no new entries', submit: 'takes no submissions', revise: 'takes no new revisions' };

/** The problem with a closed track, or null when the track is open (or not a track at all: the schema says so). */
export function closedTrackProblem(c: ChallengeGate, track: unknown, action: GateAction | 'move', from?: string): FieldProblem | null {
  if (!isTrack(track)) return null;
  const open = openTracks(c.settings);
  if (open.includes(track)) return null;
  const fix = {
    create: ' (the track says how the values were obtained: change it only if it is wrong)',
    move: `: this entry is in the ${from ?? 'other'} track, and an edit cannot move it into a closed one`,
    submit: ': the draft cannot be submitted while its track is closed',
    revise: `: no new revision of a ${track} entry while its track is closed; the published entry stays as it is`,
  }[action];
  return { path: '/track', message: `the ${track} track of ${c.slug} is closed; open tracks: ${open.join(', ') || 'none'}${fix}` };
}

/** Why the settings hold something back now, in a form a page can phrase briefly. */
export type GateReason =
  | { kind: 'state'; state: string }
  | { kind: 'before-window'; at: Date }
  | { kind: 'after-window'; at: Date }
  | { kind: 'track-closed'; track: string };

/**
 * The one rule set: every reason the settings hold against an entry in this track now: the
 * challenge's state, the submission window (when a clock is given; the writing services always
 * give theirs) and the track. Which of them refuse which action is REFUSES'.
 */
export function gateReasons(c: ChallengeGate, track: unknown, now: Date | undefined): GateReason[] {
  const out: GateReason[] = [];
  if (c.state !== 'open') out.push({ kind: 'state', state: c.state });
  if (now) {
    const w = submissionWindow(c.settings);
    if (w.opensAt && now.getTime() < w.opensAt.getTime()) out.push({ kind: 'before-window', at: w.opensAt });
    else if (w.closesAt && now.getTime() >= w.closesAt.getTime()) out.push({ kind: 'after-window', at: w.closesAt });
  }
  if (isTrack(track) && !openTracks(c.settings).includes(track)) out.push({ kind: 'track-closed', track });
  return out;
}

/**
 * Which reasons refuse which action. Every reason refuses a submission and a revision; before the
 * window opens a new draft is still taken (a team prepares it and submits from opensAt on), so a
 * new entry is refused by every reason but that one.
 */
const REFUSES: Record<GateAction, (r: GateReason) => boolean> = {
  create: (r) => r.kind !== 'before-window',
  submit: () => true,
  revise: () => true,
};

function gateMessage(c: ChallengeGate, r: GateReason, action: GateAction): FieldProblem {
  const s = c.slug;
  const no = TAKES_NO[action];
  switch (r.kind) {
    case 'state':
      if (r.state !== 'closed') return { path: '/challenge/id', message: `${s} is not open (state "${r.state}") and ${no}` };
      return { path: '/challenge/id', message: `${s} is closed and ${no}${{
        create: '; a moderator can open it again',
        submit: '; the draft stays editable, and can be submitted if a moderator opens the challenge again',
        revise: '; the published entry stays as it is (a moderator can open the challenge again)',
      }[action]}` };
    case 'before-window':
      // never a refusal of a new entry (REFUSES): its warning is the submission's message
      return { path: '/challenge/id', message: `${s} ${no} before its submission window opens at ${r.at.toISOString()}${{
        create: '; a draft can be saved meanwhile',
        submit: '; a draft can be saved and edited meanwhile, and submitted from then on',
        revise: '',
      }[action]}` };
    case 'after-window':
      return { path: '/challenge/id', message: `${s} ${no} since its submission window closed at ${r.at.toISOString()}${{
        create: '; a moderator can extend the window',
        submit: '; the draft stays editable, and can be submitted if a moderator extends the window',
        revise: '; the published entry stays as it is (a moderator can extend the window)',
      }[action]}` };
    case 'track-closed':
      return closedTrackProblem(c, r.track, action)!;
  }
}

/** Every reason the settings refuse this action now (409), each naming its field. */
export function gateProblems(c: ChallengeGate, track: unknown, now: Date | undefined, action: GateAction): FieldProblem[] {
  return gateReasons(c, track, now).filter(REFUSES[action]).map((r) => gateMessage(c, r, action));
}

/**
 * What the settings let this action do now but would refuse of the draft's submission: for a new
 * entry before the window opens, that it cannot be submitted until then. Said as the submission's
 * refusal would say it; the answers carry these as warnings.
 */
export function gateWarnings(c: ChallengeGate, track: unknown, now: Date | undefined, action: GateAction): FieldProblem[] {
  return gateReasons(c, track, now).filter((r) => !REFUSES[action](r)).map((r) => gateMessage(c, r, 'submit'));
}

export interface EntryGateStatus {
  /** a new entry in at least one track would be submitted now (created and sent to review) */
  acceptsEntries: boolean;
  /** a new draft in at least one track would be stored now (before the window opens: yes, but not submitted) */
  acceptsDrafts: boolean;
  openTracks: Track[];
  window: { opensAt: Date | null; closesAt: Date | null };
  /** reasons: why a submission in this track is not taken now (empty when it is) */
  tracks: Record<(typeof TRACKS)[number], { acceptsEntries: boolean; acceptsDrafts: boolean; reasons: GateReason[] }>;
}

/**
 * Whether the challenge takes submissions and new drafts now, per track and in any track, for the
 * public pages: gateReasons and REFUSES on the clock given, as gateProblems applies them to a
 * submission ('submit') and a new entry ('create'), so a page and the enforcement cannot disagree.
 */
export function entryGateStatus(c: ChallengeGate, now: Date): EntryGateStatus {
  const one = (track: (typeof TRACKS)[number]) => {
    const reasons = gateReasons(c, track, now);
    return { acceptsEntries: !reasons.some(REFUSES.submit), acceptsDrafts: !reasons.some(REFUSES.create), reasons };
  };
  const tracks = Object.fromEntries(TRACKS.map((t) => [t, one(t)])) as Record<Track, ReturnType<typeof one>>;
  return {
    acceptsEntries: TRACKS.some((t) => tracks[t].acceptsEntries),
    acceptsDrafts: TRACKS.some((t) => tracks[t].acceptsDrafts),
    openTracks: openTracks(c.settings), window: submissionWindow(c.settings), tracks,
  };
}

/** A refusal by the challenge settings: 409, with the problems naming their fields. */
export function refuse(problems: FieldProblem[]): void {
  if (!problems.length) return;
  throw new AppError('conflict', `${problems[0].path}: ${problems[0].message}`, problems.slice(0, MAX_PROBLEMS));
}

/**
 * The challenge's state and settings inside a writing transaction, under a share lock: a moderator
 * changing the settings meanwhile (update-challenge-settings takes the row for update) waits for
 * this write, or this write sees the new settings.
 */
export async function loadGate(tx: DbOrTx, slug: string): Promise<ChallengeGate> {
  const [c] = await tx.select({ slug: challenges.slug, state: challenges.state, settings: challenges.settings }).from(challenges).where(eq(challenges.slug, slug)).for('share');
  if (!c) throw notFound(`The challenge "${slug}"`);
  return c;
}

