/**
 * Whether a value is visible to a caller now: the one place the sealed-reference rule lives.
 *
 * A reference sealed until a date (reference_seals, applied to references.sealed_until by the
 * trigger in drizzle/0003) is hidden until that date on the injected clock (ctx.now(), a `now`
 * argument), never the wall clock or SQL now(). A house-baseline estimate of a sealed target is as
 * sealed as the reference itself: the baseline is exact on small circuits, so its estimate is the
 * sealed value.
 *
 * Who sees a sealed value before its date: a moderator (or admin) who is a member of no team. The
 * product lets moderators seal values for blind rounds (PRODUCT.md: users and their jobs); it says
 * nothing of moderators who also compete, and any team may enter any open challenge, so a
 * moderator in any team is a competitor for this purpose and sees what the public sees (issue 12
 * item 10). Team members, API keys and visitors see sealed values only after the date.
 *
 * Every route, presenter, export, job and the review queue decides through isVisibleNow (directly
 * or through the helpers below); nothing else compares sealed_until with a clock.
 */
import { and, eq, inArray } from 'drizzle-orm';
import type { DbOrTx } from '../db/client';
import { member, references, targets } from '../db/schema';
import type { Actor } from '../middleware/actor';

/** The caller as far as sealed values are concerned. */
export type Viewer = { kind: 'public' } | { kind: 'moderator'; userId: string };
/** Visitors, teams, API keys, moderators in a team, and every job that writes public data. */
export const PUBLIC_VIEWER: Viewer = { kind: 'public' };
/** A viewer who sees every sealed value (the private standings view, computed by the standings job). */
export const SEALED_VIEWER: Viewer = { kind: 'moderator', userId: 'system' };

/** Anything that may be sealed: a reference row, a seal row, a target with its reference. */
export interface Sealable { sealedUntil: Date | null | undefined }

/** THE rule: is this value visible to this caller at this moment (the injected clock)? */
export function isVisibleNow(reference: Sealable, caller: Viewer, now: Date): boolean {
  if (!reference.sealedUntil || reference.sealedUntil.getTime() <= now.getTime()) return true;
  return seesSealedValues(caller);
}

/** Whether the caller sees sealed values before their date (e.g. the standings' private view). */
export function seesSealedValues(caller: Viewer): boolean {
  return caller.kind === 'moderator';
}

/** Whether a seal is still in force (not yet past its date and not marked revealed). */
export function isSealInForce(seal: Sealable & { revealedAt: Date | null }, now: Date): boolean {
  return !seal.revealedAt && !isVisibleNow(seal, PUBLIC_VIEWER, now);
}

/** The viewer of a request's actor: a moderator or admin in no team sees sealed values; everyone else is the public. */
export async function viewerOf(db: DbOrTx, actor: Actor): Promise<Viewer> {
  if (actor.kind !== 'user' || (actor.user.role !== 'moderator' && actor.user.role !== 'admin')) return PUBLIC_VIEWER;
  const [m] = await db.select({ team: member.organizationId }).from(member).where(eq(member.userId, actor.user.id)).limit(1);
  return m ? PUBLIC_VIEWER : { kind: 'moderator', userId: actor.user.id };
}

export interface TargetReference { key: string; value: number | null; uncertainty: number | null; sealedUntil: Date | null }

/** Every target of a version with its reference row (value null when there is none yet): one query. */
export async function targetReferences(db: DbOrTx, versionId: string, keys?: string[]): Promise<TargetReference[]> {
  const rows = await db.select({ key: targets.key, value: references.value, uncertainty: references.uncertainty, sealedUntil: references.sealedUntil })
    .from(targets).leftJoin(references, eq(references.targetId, targets.id))
    .where(keys ? and(eq(targets.versionId, versionId), inArray(targets.key, keys)) : eq(targets.versionId, versionId)).orderBy(targets.key);
  return rows.map((r) => ({ key: r.key, value: r.value ?? null, uncertainty: r.uncertainty ?? null, sealedUntil: r.sealedUntil ?? null }));
}

/** The keys of the targets whose reference this caller may not see now. */
export function sealedKeys(refs: readonly (Sealable & { key: string })[], caller: Viewer, now: Date): Set<string> {
  return new Set(refs.filter((r) => !isVisibleNow(r, caller, now)).map((r) => r.key));
}

export interface VisibleReferences {
  /** every target's reference row as stored (sealed ones included: use the two fields below) */
  rows: TargetReference[];
  /** targets whose reference the caller may not see now (and whose house-baseline estimates are withheld) */
  sealed: Set<string>;
  /** exact references the caller may see now, by target key */
  exact: Map<string, { value: number; uncertainty: number }>;
}

/** The references of a version as this caller may see them now. */
export function visibleFrom(rows: TargetReference[], caller: Viewer, now: Date): VisibleReferences {
  const sealed = sealedKeys(rows, caller, now);
  const exact = new Map<string, { value: number; uncertainty: number }>();
  for (const r of rows) if (r.value !== null && !sealed.has(r.key)) exact.set(r.key, { value: r.value, uncertainty: r.uncertainty ?? 0 });
  return { rows, sealed, exact };
}

export async function visibleReferences(db: DbOrTx, versionId: string, caller: Viewer, now: Date): Promise<VisibleReferences> {
  return visibleFrom(await targetReferences(db, versionId), caller, now);
}

/**
 * Whether an estimate is withheld from the caller: a house-baseline estimate of a target whose
 * reference the caller may not see (`sealed` from visibleReferences / sealedKeys).
 */
export function isEstimateWithheld(estimate: { isBaseline: boolean; target: string }, sealed: ReadonlySet<string>): boolean {
  return estimate.isBaseline && sealed.has(estimate.target);
}

/** Estimate rows without the withheld ones (baselineIds: the house-baseline entries among them). */
export function withoutSealedBaseline<T extends { entryId: string; target: string }>(rows: T[], baselineIds: ReadonlySet<string>, sealed: ReadonlySet<string>): T[] {
  return sealed.size && baselineIds.size ? rows.filter((r) => !isEstimateWithheld({ isBaseline: baselineIds.has(r.entryId), target: r.target }, sealed)) : rows;
}
