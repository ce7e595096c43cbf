/**
 * The engine check run when a server process starts its worker (server/boot.ts): every computed
 * reference whose engine version is not this code's ENGINE_VERSION is recomputed (its version's
 * reference job replaces stale references in place, then queues the house baseline and the
 * standings, which rescore every entry), and each affected challenge version gets one public
 * history event "Reference engine X -> Y" (audit action engine.change). Supplied references are
 * never recomputed. Nothing happens, and no event is written, when the version did not change:
 * the history no longer calls every standings recomputation an engine change.
 */
import { and, count, eq, isNull, ne, or, sql } from 'drizzle-orm';
import { ENGINE_VERSION } from '@shared/physics/reference';
import type { Db } from '../db/client';
import { auditLog, challengeVersions, references, targets } from '../db/schema';
import { recordAudit } from '../services/record-audit';
import { enqueueJob } from './queue';

export const ENGINE_CHANGE = 'engine.change';

export interface EngineUpgrade { versions: number; references: number }

export async function upgradeEngine(db: Db, now: Date, engine: string = ENGINE_VERSION): Promise<EngineUpgrade> {
  const stale = await db.select({ versionId: targets.versionId, slug: challengeVersions.challengeSlug, version: challengeVersions.version, from: references.engineVersion, n: count() })
    .from(references)
    .innerJoin(targets, eq(targets.id, references.targetId))
    .innerJoin(challengeVersions, eq(challengeVersions.id, targets.versionId))
    .where(and(ne(references.method, 'supplied'), or(isNull(references.engineVersion), ne(references.engineVersion, engine))))
    .groupBy(targets.versionId, challengeVersions.challengeSlug, challengeVersions.version, references.engineVersion);
  const byVersion = new Map<string, { slug: string; version: number; from: string[]; n: number }>();
  for (const s of stale) {
    const v = byVersion.get(s.versionId) ?? { slug: s.slug, version: s.version, from: [], n: 0 };
    v.from.push(s.from ?? 'unversioned');
    v.n += Number(s.n);
    byVersion.set(s.versionId, v);
  }
  for (const [versionId, v] of byVersion) {
    await db.transaction(async (tx) => {
      // one event per version and engine change, also when a restart comes before the recomputation is done
      const [seen] = await tx.select({ id: auditLog.id }).from(auditLog)
        .where(and(eq(auditLog.action, ENGINE_CHANGE), sql`${auditLog.details}->>'versionId' = ${versionId}`, sql`${auditLog.details}->>'to' = ${engine}`)).limit(1);
      if (!seen) {
        await recordAudit(tx, {
          actor: { kind: 'system', label: 'engine upgrade' }, action: ENGINE_CHANGE, subjectType: 'challenge', subjectId: v.slug, at: now,
          details: { versionId, version: v.version, from: v.from.sort().join(', '), to: engine, references: v.n },
        });
      }
      await enqueueJob(tx, 'references', { versionId }, `references:${versionId}`);
    });
  }
  return { versions: byVersion.size, references: [...byVersion.values()].reduce((a, v) => a + v.n, 0) };
}
