/**
 * A moderator's decision on an entry in review: publish, return (the team may edit and resubmit)
 * or reject. One transaction: the entry row is locked (SELECT ... FOR UPDATE), its state checked,
 * the transition written (publishing through publishEntry, which also queues the standings), a
 * reviews row and an audit line ('entry.review', with the reason) appended. Of two moderators
 * deciding at once, the second waits for the lock, then finds the entry decided and gets 409.
 * The e-mail to the team and to the followers are effects (decisionEffects), sent after the commit.
 */
import { desc, eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { entries, reviews, user } from '../db/schema';
import { conflict, notFound } from '../errors';
import { kickJobs, type Effect, type WithEffects } from '../effects';
import { publishEntry } from './publish-entry';
import { recordAudit, type AuditActor } from './record-audit';
import { refuseOwnTeamEntry } from './own-team-guard';

export type Decision = 'publish' | 'return' | 'reject';
export const DECISIONS: readonly Decision[] = ['publish', 'return', 'reject'];
const TO_STATE: Record<Decision, 'published' | 'returned' | 'rejected'> = { publish: 'published', return: 'returned', reject: 'rejected' };

export interface DecisionResult {
  entryId: string; decision: Decision; fromState: string; state: string; reviewId: string; decidedAt: Date;
  jobIds: string[]; superseded: string[];
  teamId: string; label: string; challengeSlug: string;
}

export async function decideEntry(db: Db, p: { entryId: string; decision: Decision; reason: string; actor: AuditActor; now: Date }): Promise<WithEffects<DecisionResult>> {
  const result = await db.transaction(async (tx): Promise<DecisionResult> => {
    const [e] = await tx.select().from(entries).where(eq(entries.id, p.entryId)).for('update');
    if (!e) throw notFound('The entry');
    await refuseOwnTeamEntry(tx, p.actor, e.teamId, 'decide on');
    if (e.state !== 'in-review') {
      const [last] = await tx.select({ toState: reviews.toState, at: reviews.createdAt, moderator: user.name }).from(reviews)
        .leftJoin(user, eq(user.id, reviews.moderatorId)).where(eq(reviews.entryId, e.id)).orderBy(desc(reviews.createdAt)).limit(1);
      if (last && e.submittedAt && last.at >= e.submittedAt) {
        throw conflict(`This entry was already decided (${last.toState} by ${last.moderator ?? 'a moderator'} at ${last.at.toISOString()}); reload the queue.`);
      }
      throw conflict(`This entry is ${e.state}, not in review, so there is nothing to decide; reload the queue.`);
    }
    const to = TO_STATE[p.decision];
    let jobIds: string[] = [];
    let superseded: string[] = [];
    if (p.decision === 'publish') {
      const r = await publishEntry(tx, e.id, p.actor, p.now);
      jobIds = r.jobIds;
      superseded = r.superseded;
    } else {
      await tx.update(entries).set({ state: to, updatedAt: p.now }).where(eq(entries.id, e.id));
    }
    const moderatorId = p.actor.kind === 'user' ? p.actor.user.id : null;
    const [rv] = await tx.insert(reviews).values({ entryId: e.id, moderatorId, decision: p.decision, reason: p.reason, fromState: e.state, toState: to, createdAt: p.now }).returning({ id: reviews.id });
    await recordAudit(tx, {
      actor: p.actor, action: 'entry.review', subjectType: 'entry', subjectId: e.id, at: p.now,
      details: { decision: p.decision, reason: p.reason, from: e.state, to, reviewId: rv.id, challenge: e.challengeSlug, versionId: e.versionId },
    });
    return { entryId: e.id, decision: p.decision, fromState: e.state, state: to, reviewId: rv.id, decidedAt: p.now, jobIds, superseded, teamId: e.teamId, label: e.label, challengeSlug: e.challengeSlug };
  });
  const moderatorName = p.actor.kind === 'user' ? p.actor.user.name : 'a moderator';
  return { result, effects: decisionEffects(result, p.reason, moderatorName) };
}

const WHAT: Record<Decision, string> = {
  publish: 'was published: it is now in the public standings',
  return: 'was returned to your team: edit it and submit it again',
  reject: 'was rejected',
};

/**
 * The after-commit effects of a decision: the worker kicked when a standings job was queued, the
 * decision mailed to every member of the entry's team, and on a publication the followers of the
 * challenge and of the team told.
 */
export function decisionEffects(d: DecisionResult, reason: string, moderatorName: string): Effect[] {
  const effects: Effect[] = [];
  if (d.jobIds.length) effects.push(kickJobs());
  effects.push({
    kind: 'mail-team', teamIds: [d.teamId], event: 'entry.review',
    subject: `Parallax: your entry "${d.label.slice(0, 120)}" ${d.decision === 'publish' ? 'was published' : d.decision === 'return' ? 'was returned' : 'was rejected'}`,
    lines: [
      `Your entry "${d.label}" for the challenge ${d.challengeSlug} ${WHAT[d.decision]}.`,
      '',
      `Moderator: ${moderatorName}`,
      `Decided at: ${d.decidedAt.toISOString()}`,
      'Reason:',
      reason,
      '',
      ['The entry: ', { path: `/entries/${d.entryId}` }],
    ],
  });
  if (d.decision === 'publish') {
    effects.push({
      kind: 'notify-followers', slug: d.challengeSlug, teamId: d.teamId, event: 'entry.published', subject: `Parallax: new entry on ${d.challengeSlug}: ${d.label.slice(0, 120)}`,
      lines: [`The entry "${d.label}" was published on the challenge ${d.challengeSlug} at ${d.decidedAt.toISOString()}.`, '', ['The entry: ', { path: `/entries/${d.entryId}` }], ['The standings (recomputed shortly): ', { path: `/challenges/${d.challengeSlug}` }]],
    });
  }
  return effects;
}
