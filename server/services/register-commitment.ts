/**
 * Commitments for blind rounds: before the reveal a team registers the SHA-256 of its entry's
 * estimates; at the reveal the server hashes the stored estimates the same way and records match
 * or mismatch.
 *
 * The canonical string (commitmentString): the JSON array of [target, value, uncertainty] triples,
 * one per estimate, sorted by target key (plain code-unit order; target keys are ASCII), written
 * without any whitespace, numbers as JavaScript's JSON.stringify writes them (the shortest form
 * that reads back to the same double: 0.5, -0.12, 1e-7), no trailing newline, UTF-8. The
 * commitment is its SHA-256 in lowercase hex. E.g. for two estimates:
 *   printf '%s' '[["t1-h0.300000:z2",0.4,0.01],["t2-h0.300000:z2",-0.125,0.02]]' | sha256sum
 * or from the entry document:
 *   node -e 'const d=require("./entry.json");const a=d.estimates.map(e=>[e.target,e.value,e.uncertainty]).sort((x,y)=>x[0]<y[0]?-1:1);process.stdout.write(JSON.stringify(a))' | sha256sum
 */
import { createHash } from 'node:crypto';
import { eq } from 'drizzle-orm';
import type { Db, DbOrTx } from '../db/client';
import { entries, entryCommitments, estimates, referenceSeals } from '../db/schema';
import { conflict, notFound } from '../errors';
import { recordAudit, type AuditActor } from './record-audit';
import { isSealInForce } from '../queries/visibility';

export const COMMITMENT_RECIPE = 'sha256 (lowercase hex) of the JSON array [[target, value, uncertainty], ...] of the entry\'s estimates sorted by target, no whitespace, numbers as JSON.stringify writes them, no trailing newline; e.g. printf \'%s\' \'[["t1-h0.300000:z2",0.4,0.01]]\' | sha256sum';

export function commitmentString(ests: readonly { target: string; value: number; uncertainty: number }[]): string {
  const rows = ests.map((e) => [e.target, e.value, e.uncertainty] as const).sort((a, b) => (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0));
  return JSON.stringify(rows);
}

export function commitmentHash(ests: readonly { target: string; value: number; uncertainty: number }[]): string {
  return createHash('sha256').update(commitmentString(ests), 'utf8').digest('hex');
}

/** The hash of an entry's stored estimates. */
export async function storedEstimatesHash(db: DbOrTx, entryId: string): Promise<string> {
  const rows = await db.select({ target: estimates.targetKey, value: estimates.value, uncertainty: estimates.uncertainty }).from(estimates).where(eq(estimates.entryId, entryId));
  return commitmentHash(rows);
}

export async function registerCommitment(db: Db, p: { entryId: string; sha256: string; actor: AuditActor; now: Date }) {
  const [e] = await db.select().from(entries).where(eq(entries.id, p.entryId));
  if (!e) throw notFound('The entry');
  const sha = p.sha256.toLowerCase();
  const by = p.actor.kind === 'user' ? `user ${p.actor.user.id}` : p.actor.kind === 'api-key' ? `api-key ${p.actor.keyId}` : 'system';
  return db.transaction(async (tx) => {
    // the seal rows are share-locked: a reveal (which locks its seal for update) either ran before
    // (no open seal: 409) or runs after this commit (and checks this commitment)
    const seals = await tx.select().from(referenceSeals).where(eq(referenceSeals.versionId, e.versionId)).for('share');
    const open = seals.filter((s) => isSealInForce(s, p.now));
    if (!open.length) throw conflict('This entry\'s challenge version has no sealed round open: a commitment is registered before a reveal, while reference values are sealed.');
    const [have] = await tx.select().from(entryCommitments).where(eq(entryCommitments.entryId, e.id)).for('update');
    if (have && have.result !== 'pending') throw conflict(`This commitment was already checked at the reveal (${have.result}); it cannot change.`);
    await tx.insert(entryCommitments).values({ entryId: e.id, sha256: sha, registeredAt: p.now, registeredBy: by })
      .onConflictDoUpdate({ target: entryCommitments.entryId, set: { sha256: sha, registeredAt: p.now, registeredBy: by } });
    await recordAudit(tx, { actor: p.actor, action: 'entry.commitment', subjectType: 'entry', subjectId: e.id, at: p.now, details: { sha256: sha, replaces: have?.sha256 ?? null } });
    const revealAt = open.map((s) => s.sealedUntil).sort((a, b) => b.getTime() - a.getTime())[0];
    return { entryId: e.id, sha256: sha, registeredAt: p.now, result: 'pending' as const, revealAt, recipe: COMMITMENT_RECIPE };
  });
}
