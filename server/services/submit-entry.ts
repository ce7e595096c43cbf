/** Sending a draft (or a returned entry) to review: from then on it is frozen. */
import { eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { entries } from '../db/schema';
import { conflict, notFound } from '../errors';
import { recordAudit, type AuditActor } from './record-audit';

export async function submitEntry(db: Db, p: { entryId: string; actor: AuditActor; now: Date }) {
  return db.transaction(async (tx) => {
    const [e] = await tx.select().from(entries).where(eq(entries.id, p.entryId)).for('update');
    if (!e) throw notFound('The entry');
    if (e.state !== 'draft' && e.state !== 'returned') throw conflict(`This entry is ${e.state}; only a draft or a returned entry can be submitted.`);
    await tx.update(entries).set({ state: 'in-review', submittedAt: p.now, updatedAt: p.now }).where(eq(entries.id, e.id));
    await recordAudit(tx, { actor: p.actor, action: 'entry.submit', subjectType: 'entry', subjectId: e.id, details: { from: e.state } });
    return { id: e.id, state: 'in-review' as const, submittedAt: p.now };
  });
}
