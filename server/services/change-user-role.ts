/**
 * Site roles: an admin grants or revokes the moderator (or admin) role; the demo seed gives its
 * accounts theirs. One transaction with the audit line 'user.role' (from, to). An admin cannot
 * remove their own admin role (another admin must), so the site never loses its last admin by a
 * slip.
 */
import { eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { user } from '../db/schema';
import { badRequest, notFound } from '../errors';
import { recordAudit, type AuditActor } from './record-audit';

export const SITE_ROLES = ['user', 'moderator', 'admin'] as const;
export type SiteRole = (typeof SITE_ROLES)[number];

export async function changeUserRole(db: Db, p: { userId: string; role: SiteRole; actor: AuditActor; now: Date }) {
  if (p.actor.kind === 'user' && p.actor.user.id === p.userId && p.role !== 'admin') throw badRequest('You cannot remove your own admin role; ask another admin.');
  return db.transaction(async (tx) => {
    const [before] = await tx.select({ role: user.role }).from(user).where(eq(user.id, p.userId)).limit(1).for('update');
    if (!before) throw notFound('The user');
    await tx.update(user).set({ role: p.role, updatedAt: p.now }).where(eq(user.id, p.userId));
    await recordAudit(tx, { actor: p.actor, action: 'user.role', subjectType: 'user', subjectId: p.userId, at: p.now, details: { from: before.role ?? 'user', to: p.role } });
    return { id: p.userId, role: p.role };
  });
}
