/**
 * A moderator's decision on an entry in review: publish, return (the team may edit and resubmit)
 * or reject. One transaction: the entry row is locked (SELECT ... FOR UPDATE), its state checked,
 * the transition written (publishing through publishEntry, which also queues the standings), a
 * reviews row and an audit line ('entry.review', with the reason) appended. Of two moderators
 * deciding at once, the second waits for the lock, then finds the entry decided and gets 409.
 * The e-mail to the team goes out after the commit (notifyDecision), never inside it.
 */
import { desc, eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { entries, member, reviews, user } from '../db/schema';
import { conflict, notFound } from '../errors';
import type { Mailer } from '../mail/mailer';
import type { Logger } from '../log';
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

export async function decideEntry(db: Db, p: { entryId: string; decision: Decision; reason: string; actor: AuditActor; now: Date }): Promise<DecisionResult> {
  return db.transaction(async (tx) => {
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
}

/** Addresses of a team's members (a Parallax team is a better-auth organization). */
export async function teamEmails(db: Db, teamIds: string[]): Promise<{ email: string; name: string; teamId: string }[]> {
  const out: { email: string; name: string; teamId: string }[] = [];
  for (const teamId of [...new Set(teamIds)]) {
    const rows = await db.select({ email: user.email, name: user.name }).from(member).innerJoin(user, eq(user.id, member.userId)).where(eq(member.organizationId, teamId));
    for (const r of rows) out.push({ ...r, teamId });
  }
  return out;
}

/** Sends one message to each address; a failed send is logged and does not undo anything. */
export async function sendAll(mailer: Mailer, log: Logger, to: string[], subject: string, text: string, event: string): Promise<number> {
  let sent = 0;
  await Promise.all([...new Set(to)].map(async (addr) => {
    try {
      await mailer.send({ to: addr, subject, text });
      sent++;
    } catch (err) {
      log.error('mail.failed', { event, error: String((err as Error).message ?? err) });
    }
  }));
  return sent;
}

const WHAT: Record<Decision, string> = {
  publish: 'was published: it is now in the public standings',
  return: 'was returned to your team: edit it and submit it again',
  reject: 'was rejected',
};

/** The decision e-mail to every member of the entry's team (after the commit). */
export async function notifyDecision(db: Db, mailer: Mailer, log: Logger, baseUrl: string, d: DecisionResult, reason: string, moderatorName: string): Promise<number> {
  const to = (await teamEmails(db, [d.teamId])).map((r) => r.email);
  const subject = `Parallax: your entry "${d.label.slice(0, 120)}" ${d.decision === 'publish' ? 'was published' : d.decision === 'return' ? 'was returned' : 'was rejected'}`;
  const text = [
    `Your entry "${d.label}" for the challenge ${d.challengeSlug} ${WHAT[d.decision]}.`,
    '',
    `Moderator: ${moderatorName}`,
    `Decided at: ${d.decidedAt.toISOString()}`,
    'Reason:',
    reason,
    '',
    `The entry: ${baseUrl.replace(/\/$/, '')}/entries/${d.entryId}`,
  ].join('\n');
  return sendAll(mailer, log, to, subject, text, 'entry.review');
}
