/**
 * Sending a draft (or a returned entry) to review: from then on it is frozen. A draft is sent only
 * while the challenge takes submissions: open, inside its submission window, in an open track (409
 * otherwise; see validate-entry.ts). A returned entry was submitted while the challenge took it and
 * a moderator asked for a fix, so its resubmission is not held back by the settings. Neither is sent
 * when the version it answers has been superseded meanwhile: the values answer a specification that
 * was corrected, so the team moves the entry to the current version first (409 naming the fix).
 */
import { and, eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { challengeVersions, entries } from '../db/schema';
import { AppError, conflict, notFound, type FieldProblem } from '../errors';
import { recordAudit, type AuditActor } from './record-audit';
import { gateProblems, loadGate, refuse } from './validate-entry';

export async function submitEntry(db: Db, p: { entryId: string; actor: AuditActor; now: Date }) {
  return db.transaction(async (tx) => {
    const [e] = await tx.select().from(entries).where(eq(entries.id, p.entryId)).for('update');
    if (!e) throw notFound('The entry');
    if (e.state !== 'draft' && e.state !== 'returned') throw conflict(`This entry is ${e.state}; only a draft or a returned entry can be submitted.`);
    const problems = Array.isArray(e.problems) ? (e.problems as FieldProblem[]) : [];
    if (problems.length) {
      throw new AppError('conflict', `This draft was saved with ${problems.length} problem(s) and cannot be submitted until a valid document replaces it (PUT /api/entries/${e.id}; check it first with POST /api/entries/validate).`, problems.slice(0, 50));
    }
    const [v] = await tx.select({ version: challengeVersions.version, state: challengeVersions.state, reason: challengeVersions.supersededReason }).from(challengeVersions).where(eq(challengeVersions.id, e.versionId));
    if (v?.state === 'superseded') {
      const [cur] = await tx.select({ version: challengeVersions.version, checksum: challengeVersions.checksum }).from(challengeVersions).where(and(eq(challengeVersions.challengeSlug, e.challengeSlug), eq(challengeVersions.state, 'published'))).limit(1);
      throw new AppError('conflict', `Version ${v.version} of ${e.challengeSlug}, which this entry answers, was superseded${v.reason ? ` (${v.reason})` : ''}${cur ? ` by version ${cur.version}` : ''}: check the values against the current version, then replace the document (PUT /api/entries/${e.id}) with "challenge": {"id": "${e.challengeSlug}", "version": ${cur?.version ?? 'N'}, "checksum": "${cur?.checksum ?? '...'}"} and submit again.`, [{ path: '/challenge/version', message: `version ${v.version} is superseded${cur ? `; the current version is ${cur.version}` : ''}` }]);
    }
    if (e.state === 'draft') refuse(gateProblems(await loadGate(tx, e.challengeSlug), e.track, p.now, 'submit'));
    await tx.update(entries).set({ state: 'in-review', submittedAt: p.now, updatedAt: p.now }).where(eq(entries.id, e.id));
    await recordAudit(tx, { actor: p.actor, action: 'entry.submit', subjectType: 'entry', subjectId: e.id, at: p.now, details: { from: e.state } });
    return { id: e.id, state: 'in-review' as const, submittedAt: p.now };
  });
}
