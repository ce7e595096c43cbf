/**
 * Recomputes the standings of a challenge version in one transaction: reads the published entries
 * (the newest published revision of each lineage), their estimates and the references, computes
 * with shared/scoring/standings.ts, and appends a standings row. Rows are never updated, so the
 * standings as of any past date are the newest row computed before it.
 *
 * Two views are stored: `public` (sealed references count as unknown; targets are then scored
 * against the consensus) and `private` (sealed references used), for moderators.
 */
import { and, desc, eq, lte, sql } from 'drizzle-orm';
import { computeStandings, type StandingsEntryInput, type StandingsEstimate, type StandingsResult } from '@shared/scoring/standings';
import { SCORING_RULES_VERSION, type ConsensusEstimator } from '@shared/scoring';
import { ENGINE_VERSION } from '@shared/physics/reference';
import type { Db, DbOrTx } from '../db/client';
import { invalidateStandings, type WithEffects } from '../effects';
import { isEstimateWithheld, PUBLIC_VIEWER, sealedKeys } from '../queries/visibility';
import { challengeVersions, challenges, entries, observables, organization, references, standings, targets } from '../db/schema';
import { enqueueJob } from '../jobs/queue';
import type { Track } from '@shared/vocabulary';

/** `private` is null when nothing is sealed (it would equal `public`); use privateView(). */
export interface StandingsPayload { public: StandingsResult; private: StandingsResult | null; computedAt: string; versionId: string; estimator: ConsensusEstimator; rulesVersion?: string }
export const privateView = (p: StandingsPayload): StandingsResult => p.private ?? p.public;

export interface RecomputeTimings { readMs: number; computeMs: number; storeMs: number }

/** The new row; effect: the version's cached standings responses dropped after the commit. */
export async function recomputeStandings(db: Db, versionId: string, now: Date): Promise<WithEffects<{ id: string; computedAt: Date; timings: RecomputeTimings }>> {
  const result = await recomputeInTransaction(db, versionId, now);
  return { result, effects: [invalidateStandings(versionId)] };
}

function recomputeInTransaction(db: Db, versionId: string, now: Date) {
  return db.transaction(async (tx) => {
    const t0 = performance.now();
    const [v] = await tx.select({ slug: challengeVersions.challengeSlug }).from(challengeVersions).where(eq(challengeVersions.id, versionId));
    if (!v) throw new Error(`challenge version ${versionId} does not exist`);
    const [c] = await tx.select({ settings: challenges.settings }).from(challenges).where(eq(challenges.slug, v.slug));
    const estimator = ((c?.settings as { estimator?: ConsensusEstimator })?.estimator ?? 'random-effects-dl') as ConsensusEstimator;
    const tRows = await tx.select({ key: targets.key, disputed: targets.disputed, note: targets.disputeNote, value: references.value, unc: references.uncertainty, sealedUntil: references.sealedUntil, bound: observables.bound })
      .from(targets).leftJoin(references, eq(references.targetId, targets.id)).leftJoin(observables, eq(observables.id, targets.observableId)).where(eq(targets.versionId, versionId)).orderBy(targets.key);
    const eRows = await tx.select({ e: entries, teamName: organization.name }).from(entries).innerJoin(organization, eq(organization.id, entries.teamId))
      .where(and(eq(entries.versionId, versionId), eq(entries.state, 'published'))).orderBy(entries.createdAt);
    const ids = eRows.map((r) => r.e.id);
    const byEntry = await publishedEstimates(tx, ids);
    const entryInputs: StandingsEntryInput[] = eRows.map(({ e, teamName }) => {
      const res = ((e.document as { resources?: StandingsEntryInput['cost'] }).resources ?? {}) as StandingsEntryInput['cost'];
      return {
        id: e.id, label: e.label, teamId: e.teamId, teamName, track: e.track as Track, methodFamily: e.methodFamily,
        submittedAt: (e.submittedAt ?? e.createdAt).toISOString(), isBaseline: e.isBaseline, featured: e.featured,
        cost: { cpuCoreHours: res.cpuCoreHours, gpuHours: res.gpuHours, qpuSeconds: res.qpuSeconds, wallTimeSeconds: res.wallTimeSeconds },
        estimates: byEntry.get(e.id)!,
      };
    }).filter((x) => !eRows.find((r) => r.e.id === x.id)!.e.hiddenReason);
    const t1 = performance.now();
    const exact = (t: (typeof tRows)[number]) => (t.value === null || t.value === undefined ? null : { value: t.value, uncertainty: t.unc ?? 0 });
    // the public view: what the public may see now (queries/visibility.ts); sealed references and the
    // house baseline's estimates of them are left out
    const sealed = sealedKeys(tRows, PUBLIC_VIEWER, now);
    const publicInputs = sealed.size ? entryInputs.map((e) => (e.isBaseline ? { ...e, estimates: new Map([...e.estimates].filter(([target]) => !isEstimateWithheld({ isBaseline: true, target }, sealed))) } : e)) : entryInputs;
    const pub = computeStandings({ estimator, entries: publicInputs, targets: tRows.map((t) => ({ key: t.key, bound: t.bound, reference: sealed.has(t.key) ? null : exact(t), disputedNote: t.disputed ? t.note ?? 'marked disputed by a moderator' : null })) });
    const priv = sealed.size ? computeStandings({ estimator, entries: entryInputs, targets: tRows.map((t) => ({ key: t.key, bound: t.bound, reference: exact(t), disputedNote: t.disputed ? t.note ?? 'marked disputed by a moderator' : null })) }) : null;
    const payload: StandingsPayload = { public: pub, private: priv, computedAt: now.toISOString(), versionId, estimator, rulesVersion: SCORING_RULES_VERSION };
    const t2 = performance.now();
    const [row] = await tx.insert(standings).values({ versionId, computedAt: now, engineVersion: ENGINE_VERSION, scoringRulesVersion: SCORING_RULES_VERSION, payload }).returning({ id: standings.id, computedAt: standings.computedAt });
    return { ...row, timings: { readMs: t1 - t0, computeMs: t2 - t1, storeMs: performance.now() - t2 } };
  });
}

/**
 * Estimates of published entries, by entry. A published entry never changes (a correction is a new
 * revision with a new id), so what was read once is kept in memory and only new entries are read.
 */
const estimateCache = new Map<string, Map<string, StandingsEstimate>>();
let cachedEstimates = 0;
const CACHE_LIMIT = 2_000_000;

async function publishedEstimates(tx: DbOrTx, ids: string[]): Promise<Map<string, Map<string, StandingsEstimate>>> {
  const out = new Map<string, Map<string, StandingsEstimate>>();
  const missing = ids.filter((id) => !estimateCache.has(id));
  if (missing.length) {
    // one row per entry with its estimates as arrays: far fewer row objects than one per estimate
    const r = (await tx.execute(sql`select entry_id as e, array_agg(target_key) as k, array_agg(value) as v, array_agg(uncertainty) as u, array_agg(kind) as t
      from estimates where entry_id in (${sql.join(missing.map((x) => sql`${x}::uuid`), sql`, `)}) group by entry_id`)) as unknown as { rows: { e: string; k: string[]; v: number[]; u: number[]; t: string[] }[] };
    for (const id of missing) out.set(id, new Map());
    for (const row of r.rows) {
      const m = out.get(row.e)!;
      for (let i = 0; i < row.k.length; i++) m.set(row.k[i], { value: Number(row.v[i]), uncertainty: Number(row.u[i]), kind: row.t[i] as StandingsEstimate['kind'] });
    }
    for (const id of missing) {
      const m = out.get(id)!;
      if (cachedEstimates + m.size > CACHE_LIMIT) { estimateCache.clear(); cachedEstimates = 0; }
      estimateCache.set(id, m);
      cachedEstimates += m.size;
    }
  }
  for (const id of ids) if (!out.has(id)) out.set(id, estimateCache.get(id)!);
  return out;
}

/** The newest standings row of a version computed at or before `asOf` (default: now). */
export async function latestStandings(db: DbOrTx, versionId: string, asOf?: Date) {
  const [row] = await db.select().from(standings)
    .where(asOf ? and(eq(standings.versionId, versionId), lte(standings.computedAt, asOf)) : eq(standings.versionId, versionId))
    .orderBy(desc(standings.computedAt)).limit(1);
  return row ?? null;
}

/**
 * A change of SCORING_RULES_VERSION is a rescoring: every challenge version whose newest standings
 * row was computed under other rules gets a standings job (the new row is the history event
 * "scoring rules X -> Y"). Called once at start-up; returns the versions queued.
 */
export async function rescoreOutdatedStandings(db: Db): Promise<string[]> {
  const r = (await db.execute(sql`select distinct on (version_id) version_id as v, scoring_rules_version as rules from standings order by version_id, computed_at desc`)) as unknown as { rows: { v: string; rules: string }[] };
  const outdated = r.rows.filter((x) => x.rules !== SCORING_RULES_VERSION).map((x) => x.v);
  for (const versionId of outdated) await enqueueJob(db, 'standings', { versionId }, `standings:${versionId}`);
  return outdated;
}
