/**
 * A new revision of a published entry: a draft copy (metadata and estimates) in the same lineage,
 * revision + 1, that supersedes the published one once it is published in turn (publishEntry).
 * One open revision per lineage at a time. A revision is a new submission in effect, so the
 * challenge settings refuse it as they refuse a submission: challenge closed, outside the submission
 * window (before it opens too, although a new draft is taken then), or the entry's track closed (409;
 * see REFUSES in validate-entry.ts). The published entry stays as it is.
 */
import { randomUUID } from 'node:crypto';
import { and, eq, inArray, max, sql } from 'drizzle-orm';
import type { Db } from '../db/client';
import { entries } from '../db/schema';
import { conflict, notFound } from '../errors';
import { recordAudit, type AuditActor } from './record-audit';
import { gateProblems, loadGate, refuse } from './validate-entry';

export async function reviseEntry(db: Db, p: { entryId: string; actor: AuditActor; now: Date }) {
  return db.transaction(async (tx) => {
    const [e] = await tx.select().from(entries).where(eq(entries.id, p.entryId)).for('update');
    if (!e) throw notFound('The entry');
    if (e.state !== 'published') throw conflict(`This entry is ${e.state}; only a published entry is revised (a draft or returned entry is edited with PUT /api/entries/${e.id}).`);
    refuse(gateProblems(await loadGate(tx, e.challengeSlug), e.track, p.now, 'revise'));
    const lineage = e.lineageId ?? e.id;
    const [open] = await tx.select({ id: entries.id, revision: entries.revision, state: entries.state }).from(entries)
      .where(and(eq(entries.lineageId, lineage), inArray(entries.state, ['draft', 'in-review', 'returned']))).limit(1);
    if (open) throw conflict(`Revision ${open.revision} of this entry is already open (${open.state}, id ${open.id}): edit or withdraw it first.`);
    const [{ top }] = await tx.select({ top: max(entries.revision) }).from(entries).where(eq(entries.lineageId, lineage));
    const id = randomUUID();
    const revision = (top ?? e.revision) + 1;
    await tx.insert(entries).values({
      id, lineageId: lineage, supersedesId: e.id, revision, challengeSlug: e.challengeSlug, versionId: e.versionId, teamId: e.teamId,
      createdBy: p.actor.kind === 'user' ? p.actor.user.id : null, state: 'draft', track: e.track, methodFamily: e.methodFamily, label: e.label,
      document: e.document, createdAt: p.now, updatedAt: p.now,
    });
    await tx.execute(sql`insert into estimates (entry_id, target_key, value, uncertainty, kind, raw)
      select ${id}::uuid, target_key, value, uncertainty, kind, raw from estimates where entry_id = ${e.id}::uuid order by id`);
    await recordAudit(tx, { actor: p.actor, action: 'entry.revise', subjectType: 'entry', subjectId: id, at: p.now, details: { supersedes: e.id, lineageId: lineage, revision } });
    return { id, state: 'draft' as const, revision, lineageId: lineage, supersedesId: e.id };
  });
}
