/**
 * Banning or unbanning a user (admins). A ban ends their sessions, deletes the API keys they made
 * (a team key keeps working without a session otherwise) and their team memberships, at once, in
 * one transaction with the audit line 'user.ban' / 'user.unban'. An unban restores neither keys
 * nor memberships: a lead invites them again. Nobody bans themselves.
 */
import { eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { apikey, member, session, user } from '../db/schema';
import { badRequest, notFound } from '../errors';
import { recordAudit, type AuditActor } from './record-audit';

export async function banUser(db: Db, p: { userId: string; banned: boolean; reason?: string; actor: AuditActor; now: Date }) {
  if (p.actor.kind === 'user' && p.actor.user.id === p.userId) throw badRequest('You cannot ban yourself.');
  return db.transaction(async (tx) => {
    const [u] = await tx.select({ id: user.id }).from(user).where(eq(user.id, p.userId)).limit(1);
    if (!u) throw notFound('The user');
    await tx.update(user).set({ banned: p.banned, banReason: p.banned ? p.reason ?? null : null, updatedAt: p.now }).where(eq(user.id, p.userId));
    let keysRevoked: string[] = [];
    let teamsLeft: string[] = [];
    if (p.banned) {
      await tx.delete(session).where(eq(session.userId, p.userId));
      keysRevoked = (await tx.delete(apikey).where(eq(apikey.createdBy, p.userId)).returning({ id: apikey.id })).map((k) => k.id);
      teamsLeft = (await tx.delete(member).where(eq(member.userId, p.userId)).returning({ teamId: member.organizationId })).map((m) => m.teamId);
    }
    await recordAudit(tx, { actor: p.actor, action: p.banned ? 'user.ban' : 'user.unban', subjectType: 'user', subjectId: p.userId, at: p.now, details: { reason: p.reason ?? null, ...(p.banned ? { keysRevoked, teamsLeft } : {}) } });
    return { id: p.userId, banned: p.banned, ...(p.banned ? { keysRevoked: keysRevoked.length, teamsLeft: teamsLeft.length } : {}) };
  });
}
