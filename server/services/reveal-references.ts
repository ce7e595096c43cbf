/**
 * The reveal of a seal once its date has passed (run by the 'reveal' job): the seal is marked
 * revealed (so the trigger no longer seals new rows), every pending commitment of the version is
 * checked against the entry's stored estimates (match / mismatch), audit 'references.unseal'.
 * The values themselves become public by the date alone (every read asks isVisibleNow,
 * server/queries/visibility.ts, on the injected clock); the job then recomputes the standings. Effects
 * (server/effects.ts, applied after the job): a mail to the members of every team with an entry in the
 * version (with their commitments' results), and one to the challenge's followers.
 * Idempotent: the seal row is locked and a revealed seal is skipped.
 */
import { and, eq, inArray, isNull } from 'drizzle-orm';
import type { Db } from '../db/client';
import { entries, entryCommitments, referenceSeals, references, targets } from '../db/schema';
import { recordAudit } from './record-audit';
import { isSealInForce, isVisibleNow, PUBLIC_VIEWER } from '../queries/visibility';
import { storedEstimatesHash } from './register-commitment';
import type { Effect, WithEffects } from '../effects';
import { challengeLink } from './notify-followers';

export interface RevealOutcome {
  revealed: boolean;
  skipped?: string;
  sealId: string;
  versionId?: string;
  slug?: string;
  targets?: number;
  commitments?: { entryId: string; teamId: string; label: string; result: 'match' | 'mismatch' }[];
  teamIds?: string[];
}

export async function revealSeal(db: Db, sealId: string, now: Date): Promise<WithEffects<RevealOutcome>> {
  const result = await db.transaction(async (tx): Promise<RevealOutcome> => {
    const [s] = await tx.select().from(referenceSeals).where(eq(referenceSeals.id, sealId)).for('update');
    if (!s) return { revealed: false, skipped: 'no such seal', sealId };
    if (s.revealedAt) return { revealed: false, skipped: 'already revealed', sealId };
    if (isSealInForce(s, now)) return { revealed: false, skipped: 'not due', sealId };
    await tx.update(referenceSeals).set({ revealedAt: now }).where(eq(referenceSeals.id, s.id));
    const tg = await tx.select({ key: targets.key, until: references.sealedUntil }).from(targets).leftJoin(references, eq(references.targetId, targets.id)).where(eq(targets.versionId, s.versionId));
    const keys = new Set(s.allTargets ? tg.map((t) => t.key) : (s.targetKeys as string[]));
    const covered = tg.filter((t) => keys.has(t.key));
    const nowPublic = covered.filter((t) => isVisibleNow({ sealedUntil: t.until }, PUBLIC_VIEWER, now)).length;
    // a later seal of the same targets moved the date: nothing is revealed by this one
    if (covered.length && !nowPublic) return { revealed: false, skipped: 'superseded by a later seal', sealId };
    const later = await tx.select({ id: referenceSeals.id }).from(referenceSeals).where(and(eq(referenceSeals.versionId, s.versionId), isNull(referenceSeals.revealedAt)));
    const commitments: NonNullable<RevealOutcome['commitments']> = [];
    if (!later.length) {
      // the last open seal of the version: the commitments are checked now
      const pending = await tx.select({ c: entryCommitments, teamId: entries.teamId, label: entries.label }).from(entryCommitments)
        .innerJoin(entries, eq(entries.id, entryCommitments.entryId)).where(and(eq(entries.versionId, s.versionId), eq(entryCommitments.result, 'pending')));
      for (const p of pending) {
        const got = await storedEstimatesHash(tx, p.c.entryId);
        const result = got === p.c.sha256 ? 'match' as const : 'mismatch' as const;
        await tx.update(entryCommitments).set({ result, computedSha256: got, checkedAt: now }).where(eq(entryCommitments.entryId, p.c.entryId));
        await recordAudit(tx, { actor: { kind: 'system', label: 'reveal' }, action: 'entry.commitment.check', subjectType: 'entry', subjectId: p.c.entryId, at: now, details: { result, registered: p.c.sha256, computed: got, sealId: s.id } });
        commitments.push({ entryId: p.c.entryId, teamId: p.teamId, label: p.label, result });
      }
    }
    const teams = await tx.selectDistinct({ teamId: entries.teamId }).from(entries)
      .where(and(eq(entries.versionId, s.versionId), eq(entries.isBaseline, false), inArray(entries.state, ['in-review', 'published', 'superseded', 'returned', 'draft'])));
    await recordAudit(tx, {
      actor: { kind: 'system', label: 'reveal' }, action: 'references.unseal', subjectType: 'challenge', subjectId: s.challengeSlug, at: now,
      details: { sealId: s.id, versionId: s.versionId, targets: covered.length, sealedUntil: s.sealedUntil.toISOString(), commitments: { match: commitments.filter((c) => c.result === 'match').length, mismatch: commitments.filter((c) => c.result === 'mismatch').length }, reason: `${covered.length} reference value(s) revealed (sealed until ${s.sealedUntil.toISOString()})` },
    });
    return { revealed: true, sealId: s.id, versionId: s.versionId, slug: s.challengeSlug, targets: covered.length, commitments, teamIds: teams.map((t) => t.teamId) };
  });
  return { result, effects: result.revealed ? revealEffects(result, now) : [] };
}

/** The mails of a reveal: each team with an entry in the version (its own commitments' results), then the followers. */
function revealEffects(out: RevealOutcome, now: Date): Effect[] {
  const slug = out.slug!;
  const effects: Effect[] = (out.teamIds ?? []).map((teamId) => {
    const mine = (out.commitments ?? []).filter((c) => c.teamId === teamId);
    return {
      kind: 'mail-team', teamIds: [teamId], event: 'references.unseal', subject: `Parallax: reference values of ${slug} revealed`,
      lines: [
        `The sealed reference values of ${slug} (${out.targets} target(s)) are now public.`,
        '',
        ...(mine.length ? ['Your commitments:', ...mine.map((c) => [`- "${c.label}": ${c.result === 'match' ? 'matches its estimates' : 'does NOT match its estimates'} (`, { path: `/entries/${c.entryId}` }, ')']), ''] : []),
        ['The standings: ', challengeLink(slug)],
      ],
    };
  });
  effects.push({ kind: 'notify-followers', slug, event: 'references.revealed', subject: `Parallax: reference values of ${slug} revealed`,
    lines: [`The sealed reference values of ${slug} (${out.targets} target(s)) became public at ${now.toISOString()}; the standings were rescored with them.`, '', ['The standings: ', challengeLink(slug)]] });
  return effects;
}
