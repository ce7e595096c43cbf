/**
 * Storing a checked entry as a draft of a team: the metadata row and its estimates in one
 * transaction (estimates inserted in batches through jsonb_to_recordset, which keeps 100,000
 * estimates well under the 3-second budget). Nothing is stored unless the whole document is valid:
 * callers pass the result of checkEntry.
 */
import { randomUUID } from 'node:crypto';
import { sql } from 'drizzle-orm';
import type { Db, DbOrTx } from '../db/client';
import { entries } from '../db/schema';
import { recordAudit, type AuditActor } from './record-audit';
import type { EntryCheck, EntryDocument, EntryEstimate } from './validate-entry';

export const ESTIMATE_BATCH = 2000;

/** The document without its estimates: what entries.document holds. */
export function entryMetadata(doc: EntryDocument): Omit<EntryDocument, 'estimates'> {
  const { estimates: _drop, ...meta } = doc;
  void _drop;
  return meta;
}

export function rawOf(e: EntryEstimate): Record<string, unknown> | null {
  const raw: Record<string, unknown> = {};
  if (e.unmitigated !== undefined) raw.unmitigated = e.unmitigated;
  if (e.noiseScaled !== undefined) raw.noiseScaled = e.noiseScaled;
  if (e.convergence !== undefined) raw.convergence = e.convergence;
  return Object.keys(raw).length ? raw : null;
}

export async function insertEstimates(tx: DbOrTx, entryId: string, ests: EntryEstimate[]): Promise<void> {
  for (let i = 0; i < ests.length; i += ESTIMATE_BATCH) {
    const batch = ests.slice(i, i + ESTIMATE_BATCH).map((e) => ({ t: e.target, v: e.value, u: e.uncertainty, k: e.uncertaintyKind, r: rawOf(e) }));
    await tx.execute(sql`insert into estimates (entry_id, target_key, value, uncertainty, kind, raw)
      select ${entryId}::uuid, x.t, x.v, x.u, x.k, x.r
      from rows from (jsonb_to_recordset(${JSON.stringify(batch)}::jsonb) as (t text, v float8, u float8, k text, r jsonb)) with ordinality as x(t, v, u, k, r, o)
      order by x.o`);
  }
}

export async function createEntry(db: Db, p: { check: EntryCheck; teamId: string; actor: AuditActor; now: Date }) {
  const { check } = p;
  const doc = check.document;
  return db.transaction(async (tx) => {
    const id = randomUUID();
    await tx.insert(entries).values({
      id, lineageId: id, challengeSlug: check.version.slug, versionId: check.version.versionId, teamId: p.teamId,
      createdBy: p.actor.kind === 'user' ? p.actor.user.id : null, state: 'draft', track: doc.track, methodFamily: doc.method.family,
      label: doc.label, document: entryMetadata(doc), createdAt: p.now, updatedAt: p.now,
    });
    await insertEstimates(tx, id, doc.estimates);
    await recordAudit(tx, { actor: p.actor, action: 'entry.create', subjectType: 'entry', subjectId: id, details: { teamId: p.teamId, versionId: check.version.versionId, estimates: doc.estimates.length, coverage: check.coverage, warnings: check.warnings.slice(0, 20) } });
    return { id, state: 'draft' as const };
  });
}
