/**
 * Replacing the document of a draft (or returned) entry: metadata and every estimate, in one
 * transaction. A submitted entry is frozen; a published one changes only through a revision. The
 * estimates of an entry whose commitment was checked at a reveal are frozen too (409 on a change).
 * A draft is editable before the submission window opens, and stays editable when its track, the
 * submission window or the challenge closes (its submission is what the settings refuse, see
 * validate-entry.ts), but an edit never moves an entry into a closed track (409).
 */
import { eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { entries, entryCommitments, estimates } from '../db/schema';
import { AppError, conflict, invalid, notFound } from '../errors';
import { recordAudit, type AuditActor } from './record-audit';
import { entryMetadata, incompleteFields, insertEstimates } from './create-entry';
import type { FieldProblem } from '../errors';
import { closedTrackProblem, loadGate, refuse, type EntryCheck } from './validate-entry';
import { commitmentHash } from './register-commitment';

export const EDITABLE_STATES = ['draft', 'returned'];

export async function updateEntry(db: Db, p: { entryId: string; check: EntryCheck; actor: AuditActor; now: Date }) {
  const doc = p.check.document;
  return db.transaction(async (tx) => {
    const [e] = await tx.select().from(entries).where(eq(entries.id, p.entryId)).for('update');
    if (!e) throw notFound('The entry');
    if (!EDITABLE_STATES.includes(e.state)) {
      throw conflict(e.state === 'published'
        ? 'This entry is published and is never edited in place: POST /api/entries/' + e.id + '/revise creates a new draft revision.'
        : `This entry is ${e.state} and frozen: only a draft or a returned entry can be edited.`);
    }
    if (e.challengeSlug !== p.check.version.slug) {
      throw invalid([{ path: '/challenge/id', message: `this entry answers ${e.challengeSlug}; an entry for ${p.check.version.slug} is a new entry (POST /api/challenges/${p.check.version.slug}/entries)` }]);
    }
    // a commitment checked at the reveal freezes the estimates it was checked against: otherwise a
    // team could copy the revealed values into a "matching" entry (metadata may still change)
    const [cm] = await tx.select({ result: entryCommitments.result, checked: entryCommitments.computedSha256, at: entryCommitments.checkedAt }).from(entryCommitments).where(eq(entryCommitments.entryId, e.id));
    if (cm && cm.result !== 'pending' && commitmentHash(doc.estimates) !== cm.checked) {
      throw new AppError('conflict', `This entry's estimates were checked against its commitment at the reveal (${cm.result}${cm.at ? `, ${cm.at.toISOString()}` : ''}) and are frozen: change the metadata only, or withdraw it and create a new entry (which has no commitment).`, [{ path: '/estimates', message: 'frozen since the commitment check at the reveal: send the same estimates (target, value, uncertainty)' }]);
    }
    if (doc.track !== e.track) {
      const move = closedTrackProblem(await loadGate(tx, e.challengeSlug), doc.track, 'move', e.track);
      if (move) refuse([move]);
    }
    await tx.delete(estimates).where(eq(estimates.entryId, e.id));
    await insertEstimates(tx, e.id, doc.estimates);
    await tx.update(entries).set({ versionId: p.check.version.versionId, track: doc.track, methodFamily: doc.method.family, label: doc.label, document: entryMetadata(doc), problems: null, updatedAt: p.now }).where(eq(entries.id, e.id));
    await recordAudit(tx, { actor: p.actor, action: 'entry.update', subjectType: 'entry', subjectId: e.id, at: p.now, details: { estimates: doc.estimates.length, coverage: p.check.coverage, warnings: p.check.warnings.slice(0, 20) } });
    return { id: e.id, state: e.state };
  });
}

/** Replaces a draft's document by one with problems (?incomplete=1): kept as sent, not submittable. */
export async function updateIncompleteEntry(db: Db, p: { entryId: string; raw: unknown; problems: FieldProblem[]; actor: AuditActor; now: Date }) {
  return db.transaction(async (tx) => {
    const [e] = await tx.select().from(entries).where(eq(entries.id, p.entryId)).for('update');
    if (!e) throw notFound('The entry');
    if (e.state !== 'draft') throw conflict(`This entry is ${e.state}: only a draft can be saved with problems; fix them and send a valid document.`);
    const f = incompleteFields(p.raw, e.track);
    if (f.track !== e.track) {
      const move = closedTrackProblem(await loadGate(tx, e.challengeSlug), f.track, 'move', e.track);
      if (move) refuse([move]);
    }
    await tx.delete(estimates).where(eq(estimates.entryId, e.id));
    await tx.update(entries).set({ track: f.track, methodFamily: f.methodFamily, label: f.label, document: f.document, problems: p.problems, updatedAt: p.now }).where(eq(entries.id, e.id));
    await recordAudit(tx, { actor: p.actor, action: 'entry.update', subjectType: 'entry', subjectId: e.id, at: p.now, details: { incomplete: true, problems: p.problems.length } });
    return { id: e.id, state: e.state };
  });
}
