/**
 * Recomputes the standings of a challenge version in one transaction: reads the published entries
 * (the newest published revision of each lineage), their estimates and the references, computes
 * with shared/scoring/standings.ts, and appends a standings row. Rows are never updated, so the
 * standings as of any past date are the newest row computed before it.
 *
 * Two views are stored: `public` (sealed references count as unknown; targets are then scored
 * against the consensus) and `private` (sealed references used), for moderators.
 */
import { and, desc, eq, inArray, lte } from 'drizzle-orm';
import { computeStandings, type StandingsEntryInput, type StandingsEstimate, type StandingsResult } from '@shared/scoring/standings';
import type { ConsensusEstimator } from '@shared/scoring';
import { ENGINE_VERSION } from '@shared/physics/reference';
import type { Db, DbOrTx } from '../db/client';
import { challengeVersions, challenges, entries, estimates, organization, references, standings, targets } from '../db/schema';

export interface StandingsPayload { public: StandingsResult; private: StandingsResult; computedAt: string; versionId: string; estimator: ConsensusEstimator }

export async function recomputeStandings(db: Db, versionId: string, now: Date = new Date()): Promise<{ id: string; computedAt: Date }> {
  return db.transaction(async (tx) => {
    const [v] = await tx.select({ slug: challengeVersions.challengeSlug }).from(challengeVersions).where(eq(challengeVersions.id, versionId));
    if (!v) throw new Error(`challenge version ${versionId} does not exist`);
    const [c] = await tx.select({ settings: challenges.settings }).from(challenges).where(eq(challenges.slug, v.slug));
    const estimator = ((c?.settings as { estimator?: ConsensusEstimator })?.estimator ?? 'random-effects-dl') as ConsensusEstimator;
    const tRows = await tx.select({ key: targets.key, disputed: targets.disputed, note: targets.disputeNote, value: references.value, unc: references.uncertainty, sealedUntil: references.sealedUntil })
      .from(targets).leftJoin(references, eq(references.targetId, targets.id)).where(eq(targets.versionId, versionId)).orderBy(targets.key);
    const eRows = await tx.select({ e: entries, teamName: organization.name }).from(entries).innerJoin(organization, eq(organization.id, entries.teamId))
      .where(and(eq(entries.versionId, versionId), eq(entries.state, 'published'))).orderBy(entries.createdAt);
    const ids = eRows.map((r) => r.e.id);
    const est = ids.length ? await tx.select({ entryId: estimates.entryId, key: estimates.targetKey, value: estimates.value, u: estimates.uncertainty, kind: estimates.kind }).from(estimates).where(inArray(estimates.entryId, ids)) : [];
    const byEntry = new Map<string, Map<string, StandingsEstimate>>(ids.map((id) => [id, new Map()]));
    for (const x of est) byEntry.get(x.entryId)!.set(x.key, { value: x.value, uncertainty: x.u, kind: x.kind as StandingsEstimate['kind'] });
    const entryInputs: StandingsEntryInput[] = eRows.map(({ e, teamName }) => {
      const res = ((e.document as { resources?: StandingsEntryInput['cost'] }).resources ?? {}) as StandingsEntryInput['cost'];
      return {
        id: e.id, label: e.label, teamId: e.teamId, teamName, track: e.track as 'hardware' | 'classical', methodFamily: e.methodFamily,
        submittedAt: (e.submittedAt ?? e.createdAt).toISOString(), isBaseline: e.isBaseline, featured: e.featured,
        cost: { cpuCoreHours: res.cpuCoreHours, gpuHours: res.gpuHours, qpuSeconds: res.qpuSeconds, wallTimeSeconds: res.wallTimeSeconds },
        estimates: byEntry.get(e.id)!,
      };
    }).filter((x) => !eRows.find((r) => r.e.id === x.id)!.e.hiddenReason);
    const exact = (t: (typeof tRows)[number]) => (t.value === null || t.value === undefined ? null : { value: t.value, uncertainty: t.unc ?? 0 });
    const sealed = new Set(tRows.filter((t) => t.sealedUntil && t.sealedUntil > now).map((t) => t.key));
    const publicInputs = sealed.size ? entryInputs.map((e) => (e.isBaseline ? { ...e, estimates: new Map([...e.estimates].filter(([k]) => !sealed.has(k))) } : e)) : entryInputs;
    const pub = computeStandings({ estimator, entries: publicInputs, targets: tRows.map((t) => ({ key: t.key, reference: t.sealedUntil && t.sealedUntil > now ? null : exact(t), disputedNote: t.disputed ? t.note ?? 'marked disputed by a moderator' : null })) });
    const priv = computeStandings({ estimator, entries: entryInputs, targets: tRows.map((t) => ({ key: t.key, reference: exact(t), disputedNote: t.disputed ? t.note ?? 'marked disputed by a moderator' : null })) });
    const payload: StandingsPayload = { public: pub, private: priv, computedAt: now.toISOString(), versionId, estimator };
    const [row] = await tx.insert(standings).values({ versionId, computedAt: now, engineVersion: ENGINE_VERSION, payload }).returning({ id: standings.id, computedAt: standings.computedAt });
    return row;
  });
}

/**
 * Targets whose reference is sealed at `now`. The house baseline is usually exact on small
 * circuits, so its estimates for these targets are withheld from every public view too
 * (otherwise the baseline would reveal the sealed value).
 */
export async function sealedTargetKeys(db: DbOrTx, versionId: string, now: Date): Promise<Set<string>> {
  const rows = await db.select({ key: targets.key, until: references.sealedUntil }).from(targets).innerJoin(references, eq(references.targetId, targets.id)).where(eq(targets.versionId, versionId));
  return new Set(rows.filter((r) => r.until && r.until > now).map((r) => r.key));
}

/** The newest standings row of a version computed at or before `asOf` (default: now). */
export async function latestStandings(db: DbOrTx, versionId: string, asOf?: Date) {
  const [row] = await db.select().from(standings)
    .where(asOf ? and(eq(standings.versionId, versionId), lte(standings.computedAt, asOf)) : eq(standings.versionId, versionId))
    .orderBy(desc(standings.computedAt)).limit(1);
  return row ?? null;
}
