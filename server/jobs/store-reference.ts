/** Writing a computed reference (the reference job and the slice jobs that combine a tensor-network value). */
import { sql } from 'drizzle-orm';
import { ENGINE_VERSION, type ReferenceResult } from '@shared/physics/reference';
import type { DbOrTx } from '../db/client';
import { references } from '../db/schema';

/**
 * Stores a computed reference of a target: a stale one is replaced in place (its seal, if any,
 * stays); a supplied one, or one this engine already wrote, is never touched.
 */
export async function storeReference(db: DbOrTx, targetId: string, r: ReferenceResult, now: Date): Promise<void> {
  const row = r.value === null
    ? { value: null, method: 'none', reason: r.reason, engineVersion: r.engineVersion, size: {}, wallMs: null }
    // size: the method's own measure, plus the tensor network's width, flops and slices and the
    // cross-check by a second exact method where one ran (shown with the reference)
    : { value: r.value, method: r.method, size: { [r.unit]: r.size, detail: r.detail, ...(r.width !== undefined ? { width: r.width, flops: r.flops, slices: r.slices } : {}), ...(r.crossCheck ? { crossCheck: r.crossCheck } : {}) }, wallMs: r.wallMs, engineVersion: r.engineVersion, reason: null };
  await db.insert(references).values({ targetId, ...row, createdAt: now }).onConflictDoUpdate({
    target: references.targetId, set: { ...row, uncertainty: 0, createdAt: now },
    setWhere: sql`${references.method} <> 'supplied' and ${references.engineVersion} is distinct from ${ENGINE_VERSION}`,
  });
}
