import type { DbOrTx } from '../db/client';
import { auditLog } from '../db/schema';
import type { Actor } from '../middleware/actor';

export type AuditActor = Actor | { kind: 'system'; label: string };

export function actorLabel(a: Actor): { actorId: string | null; actorLabel: string } {
  if (a.kind === 'user') return { actorId: a.user.id, actorLabel: `${a.user.name} (${a.user.role})` };
  if (a.kind === 'api-key') return { actorId: null, actorLabel: `api-key ${a.keyName ?? a.keyId} of team ${a.teamId}` };
  return { actorId: null, actorLabel: 'system' };
}

/**
 * Appends one line to the audit log (inside the caller's transaction when given one). `at` is the
 * injected clock's time, always: the public history and the feed order events by it, and the
 * database's own clock (the column's default) would disagree with a moved test clock.
 */
export async function recordAudit(
  db: DbOrTx,
  e: { actor: AuditActor; action: string; subjectType: string; subjectId: string; details?: Record<string, unknown>; at: Date },
): Promise<void> {
  const who = e.actor.kind === 'system' ? { actorId: null, actorLabel: e.actor.label } : actorLabel(e.actor);
  await db.insert(auditLog).values({ ...who, action: e.action, subjectType: e.subjectType, subjectId: e.subjectId, details: e.details ?? {}, at: e.at });
}
