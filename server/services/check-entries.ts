/**
 * The automatic checks the review queue shows next to every entry in review, computed on the fly
 * from what is stored: schema and sanity (re-validated against the version's targets and the
 * observables' physical bounds), coverage of the grid, scores against the public exact references,
 * outliers against the consensus of the published entries (|d| > U with the latest standings'
 * per-target consensus), claims outside physical bounds, estimates identical to another entry's
 * (same value to 12 significant digits on >= 3 targets or >= 10% of the targets), partial sweeps.
 */
import { and, asc, eq, inArray, ne } from 'drizzle-orm';
import { degreesOfEquivalence, scoreSweep, type SweepItem } from '@shared/scoring';
import type { Db } from '../db/client';
import { challengeVersions, entries, estimates, observables, organization, references, targets } from '../db/schema';
import { latestStandings, type StandingsPayload } from './recompute-standings';

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
  };
}

export async function reviewQueue(db: Db, now: Date): Promise<QueueItem[]> {
  const queued = await db.select({ e: entries, teamName: organization.name, version: challengeVersions.version }).from(entries)
    .innerJoin(organization, eq(organization.id, entries.teamId)).innerJoin(challengeVersions, eq(challengeVersions.id, entries.versionId))
    .where(eq(entries.state, 'in-review')).orderBy(asc(entries.submittedAt), asc(entries.createdAt));
  const out: QueueItem[] = [];
  const byVersion = new Map<string, typeof queued>();
  for (const q of queued) byVersion.set(q.e.versionId, [...(byVersion.get(q.e.versionId) ?? []), q]);
  const items = new Map<string, QueueItem>();
  for (const [versionId, group] of byVersion) {
    for (const it of await checkVersion(db, versionId, group, now)) items.set(it.id, it);
  }
  for (const q of queued) out.push(items.get(q.e.id)!);
  return out;
}

async function checkVersion(db: Db, versionId: string, group: { e: typeof entries.$inferSelect; teamName: string; version: number }[], now: Date): Promise<QueueItem[]> {
  const tRows = await db.select({ key: targets.key, bound: observables.bound, value: references.value, unc: references.uncertainty, sealedUntil: references.sealedUntil })
    .from(targets).innerJoin(observables, eq(observables.id, targets.observableId)).leftJoin(references, eq(references.targetId, targets.id))
    .where(eq(targets.versionId, versionId));
  const tMap = new Map(tRows.map((t) => [t.key, t]));
  const publicRef = (t: (typeof tRows)[number]) => (t.value === null || t.value === undefined || (t.sealedUntil && t.sealedUntil > now) ? undefined : { value: t.value, uncertainty: t.unc ?? 0 });
  const exactCount = tRows.filter((t) => publicRef(t)).length;
  const st = await latestStandings(db, versionId);
  const consensusOf = new Map<string, { value: number; uncertainty: number; tau2: number }>();
  if (st) {
    for (const c of (st.payload as StandingsPayload).public.targets) {
      if (c.value !== null && c.uncertainty !== null && c.entries > 0) consensusOf.set(c.key, { value: c.value, uncertainty: c.uncertainty, tau2: c.tau2 ?? 0 });
    }
  }
  // every other non-draft entry of the version, for the identical-values check
  const others = await db.select({ id: entries.id, label: entries.label, state: entries.state, lineageId: entries.lineageId, isBaseline: entries.isBaseline, team: organization.name })
    .from(entries).innerJoin(organization, eq(organization.id, entries.teamId)).where(and(eq(entries.versionId, versionId), ne(entries.state, 'draft')));
  const otherIds = others.map((o) => o.id);
  const index = new Map<string, string[]>(); // target|value -> entry ids
  if (otherIds.length) {
    for (let i = 0; i < otherIds.length; i += 500) {
      const rows = await db.select({ entryId: estimates.entryId, key: estimates.targetKey, value: estimates.value }).from(estimates).where(inArray(estimates.entryId, otherIds.slice(i, i + 500)));
      for (const r of rows) {
        const k = `${r.key}|${r.value.toPrecision(IDENTICAL_DIGITS)}`;
        const l = index.get(k);
        if (l) l.push(r.entryId); else index.set(k, [r.entryId]);
      }
    }
  }
  const otherById = new Map(others.map((o) => [o.id, o]));
  const result: QueueItem[] = [];
  for (const { e, teamName, version } of group) {
    const checks = emptyChecks();
    const est = await db.select({ key: estimates.targetKey, value: estimates.value, u: estimates.uncertainty, kind: estimates.kind }).from(estimates).where(eq(estimates.entryId, e.id)).orderBy(asc(estimates.targetKey));
    const answered = new Map<string, { value: number; uncertainty: number }>();
    for (const x of est) {
      const t = tMap.get(x.key);
      const bad = (message: string) => { checks.schema.ok = false; if (checks.schema.problems.length < LIST) checks.schema.problems.push({ target: x.key, message }); };
      if (!t) { bad(`"${x.key}" is not a target of version ${version}`); continue; }
      if (!Number.isFinite(x.value)) { bad('the value is not a finite number'); continue; }
      if (!Number.isFinite(x.u) || x.u < 0) { bad('the uncertainty is not a finite number >= 0'); continue; }
      if (!['statistical', 'systematic', 'bound', 'none'].includes(x.kind)) bad(`unknown uncertainty kind "${x.kind}"`);
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
        if (id === e.id) continue;
        const o = otherById.get(id)!;
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
    const flags: string[] = [];
    if (!checks.schema.ok) flags.push('schema');
    if (checks.coverage.partial) flags.push('partial-sweep');
    if (checks.bounds.count) flags.push('outside-bounds');
    if (checks.outliers.count) flags.push('outliers');
    if (checks.identical.length) flags.push('identical-to-another-entry');
    if (!s.scored) flags.push('no-exact-reference-to-score');
    result.push({
      id: e.id, challenge: { slug: e.challengeSlug, version }, team: { id: e.teamId, name: teamName },
      label: e.label, track: e.track, methodFamily: e.methodFamily, revision: e.revision, lineageId: e.lineageId, supersedesId: e.supersedesId,
      submittedAt: e.submittedAt, flags, checks,
    });
  }
  return result;
}
