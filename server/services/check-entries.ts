/**
 * The automatic checks the review queue shows next to every entry in review, computed from what is
 * stored: schema and sanity (re-validated against the version's targets and the observables'
 * physical bounds), coverage of the grid, scores against the public exact references, outliers
 * against the consensus of the published entries (|d| > U with the latest standings' per-target
 * consensus), claims outside physical bounds, estimates identical to another entry's (same value
 * to 12 significant digits on >= 3 targets or >= 10% of the targets), partial sweeps, and the
 * blind-round commitment (checked at the reveal; 'altered-after-reveal' when the estimates no longer
 * hash to what was checked, which the freeze in update-entry.ts should make impossible).
 *
 * Computing them reads every estimate of every non-draft entry of the version, so the results are
 * kept per challenge version (QueueChecksCache) under a fingerprint of everything they depend on,
 * read in one cheap query on every request (versionFingerprints): the reference rows, which of
 * their seal dates have passed at this moment (decided by isVisibleNow, queries/visibility.ts), the
 * entries' commitments, the latest standings row (the consensus), and every non-draft
 * entry of the version (the "identical to another entry" check compares with all of them, and the
 * entries in review are among them). Anything that changes a check changes the fingerprint,
 * so a cached result is never stale: a new reference, an unsealing (also by the clock), a
 * recomputed standings, an entry submitted, published, returned or withdrawn.
 */
import { and, asc, eq, inArray, ne, sql } from 'drizzle-orm';
import { degreesOfEquivalence, scoreSweep, type SweepItem } from '@shared/scoring';
import type { Db } from '../db/client';
import { challengeVersions, entries, entryCommitments, observables, organization, standings, targets } from '../db/schema';
import { commitmentHash } from './register-commitment';
import type { StandingsPayload } from './recompute-standings';
import { isVisibleNow, PUBLIC_VIEWER, visibleReferences } from '../queries/visibility';
import { isUncertaintyKind } from '@shared/vocabulary';

const fin = (x: number | null | undefined): number | null => (typeof x === 'number' && Number.isFinite(x) ? x : null);
const LIST = 50;
/** estimates equal to this many significant digits count as identical */
export const IDENTICAL_DIGITS = 12;

export interface QueueItem {
  id: string;
  challenge: { slug: string; version: number };
  team: { id: string; name: string };
  label: string; track: string; methodFamily: string; revision: number; lineageId: string | null; supersedesId: string | null;
  submittedAt: Date | null;
  flags: string[];
  checks: ReturnType<typeof emptyChecks>;
}

function emptyChecks() {
  return {
    schema: { ok: true, problems: [] as { target: string; message: string }[] },
    coverage: { targets: 0, answered: 0, fraction: 0, partial: false },
    scores: { exactReferences: 0, scored: 0, rmse: null as number | null, meanZ2: null as number | null, fractionCovered: null as number | null, maxAbsError: null as number | null },
    outliers: { consensusComputedAt: null as string | null, compared: 0, count: 0, targets: [] as { target: string; value: number; uncertainty: number; consensus: number; d: number; U: number }[] },
    bounds: { count: 0, targets: [] as { target: string; value: number; uncertainty: number; bound: number; beyondThreeSigma: boolean }[] },
    identical: [] as { entryId: string; label: string; team: string; state: string; isBaseline: boolean; targets: number; examples: string[] }[],
    /** the blind-round commitment: after the reveal, whether the estimates still hash to what was checked */
    commitment: null as null | { result: string; checkedAt: Date | null; unchangedSinceCheck: boolean | null },
  };
}

const queuedColumns = {
  id: entries.id, versionId: entries.versionId, challengeSlug: entries.challengeSlug, teamId: entries.teamId, label: entries.label, track: entries.track,
  methodFamily: entries.methodFamily, revision: entries.revision, lineageId: entries.lineageId, supersedesId: entries.supersedesId, submittedAt: entries.submittedAt,
};
type QueuedRow = { e: { [K in keyof typeof queuedColumns]: (typeof entries.$inferSelect)[K] }; teamName: string; version: number };
type EntryChecks = Pick<QueueItem, 'flags' | 'checks'>;

/** Per app: the checks of the entries in review of each challenge version, with the fingerprint they were computed under. */
export class QueueChecksCache {
  readonly versions = new Map<string, { fingerprint: string; checks: Map<string, EntryChecks> }>();
  /** how many versions were computed and how many served from the cache since the app started */
  computed = 0;
  reused = 0;
}

interface VersionState { fingerprint: string; standingsId: string | null }

/**
 * One row per version: a digest of the reference rows (id, row version, public at `now` or not), the
 * latest standings id and a digest of the non-draft entries (id, row version, state, team name).
 * A row version (xmin) is new after every insert or update of the row. An entry's estimates are
 * written only in the transaction that inserts or updates its entries row (create, update, revise,
 * the house baseline), so its row version also stands for its estimates; reading the estimates
 * themselves here would cost as much as the checks.
 */
export async function versionFingerprints(db: Db, versionIds: string[], now: Date): Promise<Map<string, VersionState>> {
  const out = new Map<string, VersionState>();
  if (!versionIds.length) return out;
  const r = (await db.execute(sql`
    select v.id as "versionId",
      (select md5(coalesce(string_agg(format('%s|%s', r.id, r.xmin), ',' order by r.id), ''))
         from targets t join "references" r on r.target_id = t.id where t.version_id = v.id) as refs,
      (select coalesce(string_agg(distinct (extract(epoch from r.sealed_until) * 1000)::bigint::text, ',' order by (extract(epoch from r.sealed_until) * 1000)::bigint::text), '')
         from targets t join "references" r on r.target_id = t.id where t.version_id = v.id and r.sealed_until is not null) as "sealDates",
      (select s.id from standings s where s.version_id = v.id order by s.computed_at desc, s.id desc limit 1) as "standingsId",
      (select md5(coalesce(string_agg(format('%s|%s|%s|%s', e.id, e.xmin, e.state, o.name), ',' order by e.id), ''))
         from entries e join organization o on o.id = e.team_id where e.version_id = v.id and e.state <> 'draft') as others,
      (select md5(coalesce(string_agg(format('%s|%s', c.entry_id, c.xmin), ',' order by c.entry_id), ''))
         from entry_commitments c join entries e on e.id = c.entry_id where e.version_id = v.id) as commitments
    from challenge_versions v where v.id in (${sql.join(versionIds.map((id) => sql`${id}::uuid`), sql`, `)})`)) as unknown as { rows: { versionId: string; refs: string; sealDates: string; standingsId: string | null; others: string; commitments: string }[] };
  for (const row of r.rows) {
    // which seal dates have passed at `now`: an unsealing by the clock alone changes the fingerprint
    const passed = row.sealDates ? row.sealDates.split(',').map((ms) => (isVisibleNow({ sealedUntil: new Date(Number(ms)) }, PUBLIC_VIEWER, now) ? '1' : '0')).join('') : '';
    out.set(row.versionId, { fingerprint: `${row.refs}|${passed}|${row.standingsId ?? '-'}|${row.others}|${row.commitments}`, standingsId: row.standingsId });
  }
  return out;
}

/**
 * The entries in review, oldest first, each with its checks. With a cache, a version's checks are
 * computed again only when its fingerprint changed (read before the computation, so a write in
 * between makes the next request compute again rather than serve a stale result).
 */
export async function reviewQueue(db: Db, now: Date, cache?: QueueChecksCache): Promise<QueueItem[]> {
  const queued: QueuedRow[] = await db.select({ e: queuedColumns, teamName: organization.name, version: challengeVersions.version }).from(entries)
    .innerJoin(organization, eq(organization.id, entries.teamId)).innerJoin(challengeVersions, eq(challengeVersions.id, entries.versionId))
    .where(eq(entries.state, 'in-review')).orderBy(asc(entries.submittedAt), asc(entries.createdAt));
  const byVersion = new Map<string, QueuedRow[]>();
  for (const q of queued) byVersion.set(q.e.versionId, [...(byVersion.get(q.e.versionId) ?? []), q]);
  const states = await versionFingerprints(db, [...byVersion.keys()], now);
  const checksOf = new Map<string, EntryChecks>();
  for (const [versionId, group] of byVersion) {
    const state = states.get(versionId) ?? { fingerprint: `uncached:${Math.random()}`, standingsId: null };
    const hit = cache?.versions.get(versionId);
    let checks = hit && hit.fingerprint === state.fingerprint && group.every((q) => hit.checks.has(q.e.id)) ? hit.checks : null;
    if (checks) cache!.reused++;
    else {
      checks = await checkVersion(db, versionId, group, now, state.standingsId);
      if (cache) { cache.versions.set(versionId, { fingerprint: state.fingerprint, checks }); cache.computed++; }
    }
    for (const q of group) checksOf.set(q.e.id, checks.get(q.e.id)!);
  }
  // versions with nothing in review leave the cache
  if (cache) for (const id of [...cache.versions.keys()]) if (!byVersion.has(id)) cache.versions.delete(id);
  return queued.map(({ e, teamName, version }) => ({
    id: e.id, challenge: { slug: e.challengeSlug, version }, team: { id: e.teamId, name: teamName },
    label: e.label, track: e.track, methodFamily: e.methodFamily, revision: e.revision, lineageId: e.lineageId, supersedesId: e.supersedesId,
    submittedAt: e.submittedAt, ...checksOf.get(e.id)!,
  }));
}

/** Every estimate of every non-draft entry of a version, one row per entry (arrays: far fewer row objects). */
async function versionEstimates(db: Db, versionId: string) {
  const r = (await db.execute(sql`
    select es.entry_id as "entryId", array_agg(es.target_key order by es.target_key, es.id) as k, array_agg(es.value order by es.target_key, es.id) as v,
      array_agg(es.uncertainty order by es.target_key, es.id) as u, array_agg(es.kind order by es.target_key, es.id) as t
    from estimates es join entries e on e.id = es.entry_id where e.version_id = ${versionId}::uuid and e.state <> 'draft' group by es.entry_id`)) as unknown as { rows: { entryId: string; k: string[]; v: (number | string)[]; u: (number | string)[]; t: string[] }[] };
  return new Map(r.rows.map((row) => [row.entryId, row.k.map((key, i) => ({ key, value: Number(row.v[i]), u: Number(row.u[i]), kind: row.t[i] }))]));
}

async function checkVersion(db: Db, versionId: string, group: QueuedRow[], now: Date, standingsId: string | null): Promise<Map<string, EntryChecks>> {
  const tRows = await db.select({ key: targets.key, bound: observables.bound })
    .from(targets).innerJoin(observables, eq(observables.id, targets.observableId)).where(eq(targets.versionId, versionId));
  const tMap = new Map(tRows.map((t) => [t.key, t]));
  // the queue scores against the references the public sees now (the same checks for every
  // moderator, cached per version; a moderator who competes sees nothing sealed here)
  const refs = await visibleReferences(db, versionId, PUBLIC_VIEWER, now);
  const publicRef = (t: { key: string }) => refs.exact.get(t.key);
  const exactCount = refs.exact.size;
  // the standings row the fingerprint names (the latest one when the fingerprint was read)
  const [st] = standingsId ? await db.select().from(standings).where(eq(standings.id, standingsId)).limit(1) : [];
  const consensusOf = new Map<string, { value: number; uncertainty: number; tau2: number }>();
  if (st) {
    for (const c of (st.payload as StandingsPayload).public.targets) {
      if (c.value !== null && c.uncertainty !== null && c.entries > 0) consensusOf.set(c.key, { value: c.value, uncertainty: c.uncertainty, tau2: c.tau2 ?? 0 });
    }
  }
  // every other non-draft entry of the version, for the identical-values check
  const others = await db.select({ id: entries.id, label: entries.label, state: entries.state, lineageId: entries.lineageId, isBaseline: entries.isBaseline, team: organization.name })
    .from(entries).innerJoin(organization, eq(organization.id, entries.teamId)).where(and(eq(entries.versionId, versionId), ne(entries.state, 'draft')));
  const estimatesOf = await versionEstimates(db, versionId);
  const index = new Map<string, string[]>(); // target|value -> entry ids
  for (const [entryId, rows] of estimatesOf) {
    for (const r of rows) {
      const k = `${r.key}|${r.value.toPrecision(IDENTICAL_DIGITS)}`;
      const l = index.get(k);
      if (l) l.push(entryId); else index.set(k, [entryId]);
    }
  }
  const otherById = new Map(others.map((o) => [o.id, o]));
  const commitments = new Map((await db.select().from(entryCommitments).where(inArray(entryCommitments.entryId, group.map((q) => q.e.id)))).map((c) => [c.entryId, c]));
  const result = new Map<string, EntryChecks>();
  for (const { e, version } of group) {
    const checks = emptyChecks();
    const est = estimatesOf.get(e.id) ?? [];
    const answered = new Map<string, { value: number; uncertainty: number }>();
    for (const x of est) {
      const t = tMap.get(x.key);
      const bad = (message: string) => { checks.schema.ok = false; if (checks.schema.problems.length < LIST) checks.schema.problems.push({ target: x.key, message }); };
      if (!t) { bad(`"${x.key}" is not a target of version ${version}`); continue; }
      if (!Number.isFinite(x.value)) { bad('the value is not a finite number'); continue; }
      if (!Number.isFinite(x.u) || x.u < 0) { bad('the uncertainty is not a finite number >= 0'); continue; }
      if (!isUncertaintyKind(x.kind)) bad(`unknown uncertainty kind "${x.kind}"`);
      answered.set(x.key, { value: x.value, uncertainty: x.u });
      if (Math.abs(x.value) > t.bound) {
        checks.bounds.count++;
        if (checks.bounds.targets.length < LIST) checks.bounds.targets.push({ target: x.key, value: x.value, uncertainty: x.u, bound: t.bound, beyondThreeSigma: Math.abs(x.value) > t.bound + 3 * x.u });
      }
      const c = consensusOf.get(x.key);
      if (c) {
        checks.outliers.compared++;
        const [doe] = degreesOfEquivalence([{ value: x.value, uncertainty: x.u }], { value: c.value, uncertainty: c.uncertainty, included: [], tau2: c.tau2 });
        if (Math.abs(doe.d) > doe.U) {
          checks.outliers.count++;
          if (checks.outliers.targets.length < LIST) checks.outliers.targets.push({ target: x.key, value: x.value, uncertainty: x.u, consensus: c.value, d: doe.d, U: doe.U });
        }
      }
    }
    checks.outliers.consensusComputedAt = st ? st.computedAt.toISOString() : null;
    checks.coverage = { targets: tRows.length, answered: answered.size, fraction: tRows.length ? answered.size / tRows.length : 0, partial: answered.size < tRows.length };
    const sweepItems: SweepItem[] = tRows.map((t) => ({ targetId: t.key, estimate: answered.get(t.key), reference: publicRef(t) }));
    const s = scoreSweep(sweepItems).verifiable;
    checks.scores = { exactReferences: exactCount, scored: s.scored, rmse: fin(s.rmse), meanZ2: fin(s.meanZ2), fractionCovered: fin(s.fractionCovered), maxAbsError: fin(s.maxAbsError) };
    // identical values: another entry (not of this entry's own revision chain) with the same value
    const same = new Map<string, string[]>();
    for (const [key, m] of answered) {
      // agreeing on a target's exact value (1 at thetaH = 0, 0 at a Clifford point...) is expected of
      // any good method, not a sign of copying: only values away from a known reference count
      const r = publicRef(tMap.get(key)!);
      if (r && m.value.toPrecision(IDENTICAL_DIGITS) === r.value.toPrecision(IDENTICAL_DIGITS)) continue;
      for (const id of index.get(`${key}|${m.value.toPrecision(IDENTICAL_DIGITS)}`) ?? []) {
        const o = otherById.get(id);
        if (id === e.id || !o) continue;
        if (e.lineageId && o.lineageId === e.lineageId) continue;
        const l = same.get(id);
        if (l) l.push(key); else same.set(id, [key]);
      }
    }
    const threshold = Math.min(3, Math.max(1, Math.ceil(0.1 * tRows.length)));
    for (const [id, keys] of same) {
      if (keys.length < threshold) continue;
      const o = otherById.get(id)!;
      checks.identical.push({ entryId: id, label: o.label, team: o.team, state: o.state, isBaseline: o.isBaseline, targets: keys.length, examples: keys.slice(0, 5) });
    }
    checks.identical.sort((a, b) => b.targets - a.targets);
    const cm = commitments.get(e.id);
    if (cm) {
      const checked = cm.result !== 'pending';
      checks.commitment = { result: cm.result, checkedAt: cm.checkedAt, unchangedSinceCheck: checked ? commitmentHash(est.map((x) => ({ target: x.key, value: x.value, uncertainty: x.u }))) === cm.computedSha256 : null };
    }
    const flags: string[] = [];
    if (!checks.schema.ok) flags.push('schema');
    if (checks.coverage.partial) flags.push('partial-sweep');
    if (checks.bounds.count) flags.push('outside-bounds');
    if (checks.outliers.count) flags.push('outliers');
    if (checks.identical.length) flags.push('identical-to-another-entry');
    if (!s.scored) flags.push('no-exact-reference-to-score');
    if (checks.commitment?.unchangedSinceCheck === false) flags.push('altered-after-reveal');
    result.set(e.id, { flags, checks });
  }
  return result;
}
