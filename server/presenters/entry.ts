/**
 * An entry as the API shows it: metadata, state, revision chain, history (from the audit log) and,
 * when asked, the full document as submitted (metadata + estimates in their original order), so
 * that a download round-trips to the upload.
 */
import { and, asc, count, eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { auditLog, challengeVersions, entries, estimates, organization, references, targets } from '../db/schema';
import type { EntryDocument, EntryEstimate } from '../services/validate-entry';
import { degreesOfEquivalence, scoreAgainstReference } from '@shared/scoring';
import { latestStandings, type StandingsPayload } from '../services/recompute-standings';

/** Reasons the public may read in an entry's history (returns and rejections are for the team). */
const PUBLIC_REASON_ACTIONS = new Set(['entry.publish', 'entry.withdraw', 'entry.feature', 'entry.hide']);

/**
 * Scores of each estimate: against the exact reference where it is public (error, z, covered by
 * +/- 2u), and the degree of equivalence with the consensus (d, U with k = 2; u^2(d) = u^2 + tau^2
 * -/+ u^2(y) for an entry inside/outside the consensus) from the latest public standings.
 */
export async function estimateScores(db: Db, e: EntryRow, ests: EntryEstimate[], now: Date) {
  const refs = await db.select({ key: targets.key, value: references.value, unc: references.uncertainty, sealedUntil: references.sealedUntil })
    .from(targets).innerJoin(references, eq(references.targetId, targets.id)).where(eq(targets.versionId, e.versionId));
  const refOf = new Map(refs.filter((r) => r.value !== null && !(r.sealedUntil && r.sealedUntil > now)).map((r) => [r.key, { value: r.value as number, uncertainty: r.unc }]));
  const st = await latestStandings(db, e.versionId);
  const cons = new Map(((st?.payload as StandingsPayload | undefined)?.public.targets ?? []).map((t) => [t.key, t]));
  const inStandings = e.state === 'published';
  return ests.map((x) => {
    const r = refOf.get(x.target);
    const s = r ? scoreAgainstReference({ value: x.value, uncertainty: x.uncertainty }, r) : null;
    const c = cons.get(x.target);
    let doe: { d: number; U: number; included: boolean } | null = null;
    if (c && c.value !== null && c.uncertainty !== null) {
      const included = inStandings && !c.excluded.includes(e.id);
      const [d] = degreesOfEquivalence([{ value: x.value, uncertainty: x.uncertainty }], { value: c.value, uncertainty: c.uncertainty, included: included ? [0] : [], tau2: c.tau2 ?? 0 });
      doe = { d: d.d, U: d.U, included };
    }
    return { target: x.target, reference: r ? { error: s!.error, z: Number.isFinite(s!.z) ? s!.z : null, covered: s!.covered } : null, consensus: doe };
  });
}

export type EntryRow = typeof entries.$inferSelect;

/** States a visitor may see: published, superseded, and withdrawn after publication. */
export function isPublicEntry(e: Pick<EntryRow, 'state' | 'publishedAt'>): boolean {
  return e.state === 'published' || e.state === 'superseded' || (e.state === 'withdrawn' && e.publishedAt !== null);
}

export async function entryDocument(db: Db, e: EntryRow): Promise<EntryDocument> {
  // a draft saved with problems keeps its document as sent, estimates included
  if (e.problems) return e.document as EntryDocument;
  const rows = await db.select({ t: estimates.targetKey, v: estimates.value, u: estimates.uncertainty, k: estimates.kind, raw: estimates.raw })
    .from(estimates).where(eq(estimates.entryId, e.id)).orderBy(asc(estimates.id));
  const ests: EntryEstimate[] = rows.map((r) => ({ target: r.t, value: r.v, uncertainty: r.u, uncertaintyKind: r.k as EntryEstimate['uncertaintyKind'], ...((r.raw as object | null) ?? {}) }));
  return { ...(e.document as Omit<EntryDocument, 'estimates'>), estimates: ests };
}

/** opts.now: the app's clock (whether a sealed reference is public yet is decided at this time) */
export async function presentEntry(db: Db, e: EntryRow, opts: { document?: boolean; privileged?: boolean; now?: Date } = {}) {
  const [team] = await db.select({ id: organization.id, name: organization.name, slug: organization.slug }).from(organization).where(eq(organization.id, e.teamId));
  const [v] = await db.select({ version: challengeVersions.version, checksum: challengeVersions.checksum }).from(challengeVersions).where(eq(challengeVersions.id, e.versionId));
  const [{ n }] = await db.select({ n: count() }).from(estimates).where(eq(estimates.entryId, e.id));
  const [{ total }] = await db.select({ total: count() }).from(targets).where(eq(targets.versionId, e.versionId));
  const lineage = e.lineageId
    ? await db.select({ id: entries.id, revision: entries.revision, state: entries.state, publishedAt: entries.publishedAt, supersedesId: entries.supersedesId }).from(entries).where(eq(entries.lineageId, e.lineageId)).orderBy(asc(entries.revision))
    : [];
  const doc = opts.document ? await entryDocument(db, e) : undefined;
  const history = await db.select({ at: auditLog.at, action: auditLog.action, actor: auditLog.actorLabel, details: auditLog.details }).from(auditLog)
    .where(and(eq(auditLog.subjectType, 'entry'), eq(auditLog.subjectId, e.id))).orderBy(asc(auditLog.id));
  return {
    id: e.id,
    challenge: { slug: e.challengeSlug, version: v?.version ?? null, checksum: v?.checksum ?? null },
    team: team ?? { id: e.teamId, name: null, slug: null },
    state: e.state, track: e.track, methodFamily: e.methodFamily, label: e.label,
    revision: e.revision, lineageId: e.lineageId, supersedesId: e.supersedesId, isBaseline: e.isBaseline,
    createdAt: e.createdAt, updatedAt: e.updatedAt, submittedAt: e.submittedAt, publishedAt: e.publishedAt,
    estimates: Number(n),
    coverage: { targets: Number(total), covered: Number(n), fraction: Number(total) ? Number(n) / Number(total) : 0 },
    revisions: lineage.filter((r) => opts.privileged || isPublicEntry({ state: r.state, publishedAt: r.publishedAt })),
    history: history.map((h) => ({
      at: h.at, action: h.action, actor: opts.privileged ? h.actor : undefined,
      reason: opts.privileged || PUBLIC_REASON_ACTIONS.has(h.action) || (h.details as { decision?: string }).decision === 'publish' ? (h.details as { reason?: string }).reason : undefined,
      warnings: opts.privileged ? (h.details as { warnings?: unknown }).warnings : undefined,
    })),
    document: doc,
    /** a draft saved with problems: what must be fixed before it can be submitted */
    problems: opts.privileged && Array.isArray(e.problems) ? (e.problems as { path: string; message: string }[]) : undefined,
    scores: doc && !e.problems ? await estimateScores(db, e, doc.estimates, opts.now ?? new Date()) : undefined,
  };
}
