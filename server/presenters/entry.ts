/**
 * An entry as the API shows it: metadata, state, revision chain, history (from the audit log) and,
 * when asked, the full document as submitted (metadata + estimates in their original order), so
 * that a download round-trips to the upload. The house baseline's estimates of targets whose
 * reference the caller may not see are withheld (server/queries/visibility.ts) and counted in
 * `withheld`; a hidden entry carries `hidden: { reason }`.
 */
import { and, asc, eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { auditLog, entries, estimates } from '../db/schema';
import type { EntryDocument, EntryEstimate } from '../services/validate-entry';
import { SCORING_RULES_VERSION, boundOf, crpsCensoredNormal, degreesOfEquivalence, expectedCrpsNormal, scoreAgainstReference } from '@shared/scoring';
import { effectiveUncertainty } from '@shared/scoring/standings';
import { latestStandings, type StandingsPayload } from '../services/recompute-standings';
import { entryListContext, isPublicEntry, type EntryListContext, type EntryRow } from '../queries/entries';
import { isEstimateWithheld, PUBLIC_VIEWER, visibleReferences, type VisibleReferences, type Viewer } from '../queries/visibility';
import type { EntryPage, EntrySummary, EstimateScore } from '@shared/api-types';

export { isPublicEntry, type EntryRow };

/** Reasons the public may read in an entry's history (returns and rejections are for the team). */
const PUBLIC_REASON_ACTIONS = new Set(['entry.publish', 'entry.withdraw', 'entry.feature', 'entry.hide']);

/**
 * Scores of each estimate: against the exact reference where the caller may see it (error, z,
 * covered by +/- 2u), and the degree of equivalence with the consensus (d, U with k = 2; u^2(d) =
 * u^2 + tau^2 -/+ u^2(y) for an entry inside/outside the consensus) from the latest public standings.
 */
export async function estimateScores(db: Db, e: EntryRow, ests: EntryEstimate[], refs: VisibleReferences): Promise<EstimateScore[]> {
  const st = await latestStandings(db, e.versionId);
  const cons = new Map(((st?.payload as StandingsPayload | undefined)?.public.targets ?? []).map((t) => [t.key, t]));
  const inStandings = e.state === 'published' && e.hiddenReason === null;
  return ests.map((x) => {
    const r = refs.exact.get(x.target);
    const c = cons.get(x.target);
    // scoring rules (shared/scoring/rules.ts): u below the exact tolerance is raised to it for z
    // and coverage; the proper score uses the stated u
    const B = boundOf(c?.bound);
    const s = r ? scoreAgainstReference({ value: x.value, uncertainty: e.isBaseline ? 0 : effectiveUncertainty(x.uncertainty, B) }, r) : null;
    const crps = r ? crpsCensoredNormal(x.value, e.isBaseline ? 0 : x.uncertainty, r.value, -B, B) : null;
    let doe: { d: number; U: number; included: boolean; score: number } | null = null;
    if (c && c.value !== null && c.uncertainty !== null) {
      const included = inStandings && !c.excluded.includes(e.id);
      const [d] = degreesOfEquivalence([{ value: x.value, uncertainty: x.uncertainty }], { value: c.value, uncertainty: c.uncertainty, included: included ? [0] : [], tau2: c.tau2 ?? 0 });
      doe = { d: d.d, U: d.U, included, score: Math.min(expectedCrpsNormal(x.value, e.isBaseline ? 0 : x.uncertainty, c.value, c.uncertainty), 2 * B) };
    }
    return { target: x.target, reference: r ? { error: s!.error, z: Number.isFinite(s!.z) ? s!.z : null, covered: s!.covered, crps } : null, consensus: doe };
  });
}

/** The document as stored, without the estimates the caller may not see (`sealed`: from visibleReferences). */
export async function entryDocument(db: Db, e: EntryRow, sealed: ReadonlySet<string> = new Set()): Promise<EntryDocument & { withheld: number }> {
  // a draft saved with problems keeps its document as sent, estimates included (no baseline is ever a draft)
  if (e.problems) return { ...(e.document as EntryDocument), withheld: 0 };
  const rows = await db.select({ t: estimates.targetKey, v: estimates.value, u: estimates.uncertainty, k: estimates.kind, raw: estimates.raw })
    .from(estimates).where(eq(estimates.entryId, e.id)).orderBy(asc(estimates.id));
  const shown = rows.filter((r) => !isEstimateWithheld({ isBaseline: e.isBaseline, target: r.t }, sealed));
  const ests: EntryEstimate[] = shown.map((r) => ({ target: r.t, value: r.v, uncertainty: r.u, uncertaintyKind: r.k as EntryEstimate['uncertaintyKind'], ...((r.raw as object | null) ?? {}) }));
  return { ...(e.document as Omit<EntryDocument, 'estimates'>), estimates: ests, withheld: rows.length - shown.length };
}

/** The fields every view of an entry shares (pages and lists), from a batch context (queries/entries.ts). */
export function entrySummary(e: EntryRow, c: EntryListContext): EntrySummary {
  const v = c.version.get(e.versionId);
  const n = c.stats.get(e.id)?.estimates ?? 0;
  const total = v?.targets ?? 0;
  return {
    id: e.id,
    challenge: { slug: e.challengeSlug, version: v?.version ?? null, checksum: v?.checksum ?? null },
    team: c.team.get(e.teamId) ?? { id: e.teamId, name: null, slug: null },
    state: e.state, track: e.track, methodFamily: e.methodFamily, label: e.label, featured: e.featured,
    revision: e.revision, lineageId: e.lineageId, supersedesId: e.supersedesId, isBaseline: e.isBaseline,
    createdAt: e.createdAt, updatedAt: e.updatedAt, submittedAt: e.submittedAt, publishedAt: e.publishedAt,
    /** set when a moderator hid the entry: the public reason; it is out of the standings and lists */
    hidden: e.hiddenReason !== null ? { reason: e.hiddenReason } : null,
    estimates: n,
    coverage: { targets: total, covered: n, fraction: total ? n / total : 0 },
  };
}

/** opts.now: the app's clock; opts.viewer: whether sealed values are visible is decided for this caller (queries/visibility.ts) */
export async function presentEntry(db: Db, e: EntryRow, opts: { document?: boolean; privileged?: boolean; now: Date; viewer?: Viewer }): Promise<EntryPage> {
  const viewer = opts.viewer ?? PUBLIC_VIEWER;
  const ctx = await entryListContext(db, [e]);
  const lineage = e.lineageId
    ? await db.select({ id: entries.id, revision: entries.revision, state: entries.state, publishedAt: entries.publishedAt, supersedesId: entries.supersedesId }).from(entries).where(eq(entries.lineageId, e.lineageId)).orderBy(asc(entries.revision))
    : [];
  const refs = opts.document ? await visibleReferences(db, e.versionId, viewer, opts.now) : null;
  const doc = refs ? await entryDocument(db, e, refs.sealed) : undefined;
  const history = await db.select({ at: auditLog.at, action: auditLog.action, actor: auditLog.actorLabel, details: auditLog.details }).from(auditLog)
    .where(and(eq(auditLog.subjectType, 'entry'), eq(auditLog.subjectId, e.id))).orderBy(asc(auditLog.id));
  const { withheld, ...document } = doc ?? { withheld: 0 };
  return {
    ...entrySummary(e, ctx),
    revisions: lineage.filter((r) => opts.privileged || isPublicEntry({ state: r.state, publishedAt: r.publishedAt })),
    history: history.map((h) => ({
      at: h.at, action: h.action, actor: opts.privileged ? h.actor : undefined,
      reason: opts.privileged || PUBLIC_REASON_ACTIONS.has(h.action) || (h.details as { decision?: string }).decision === 'publish' ? (h.details as { reason?: string }).reason : undefined,
      warnings: opts.privileged ? (h.details as { warnings?: unknown }).warnings : undefined,
    })),
    document: doc ? document as EntryDocument : undefined,
    /** house-baseline estimates of sealed targets left out of the document until the reveal */
    withheld: doc && withheld ? { estimates: withheld, reason: 'the house baseline is exact here: its estimates of sealed targets are as sealed as the references until their date', until: refs!.rows.filter((r) => refs!.sealed.has(r.key)).map((r) => r.sealedUntil!).sort((a, b) => b.getTime() - a.getTime())[0]?.toISOString() ?? null } : null,
    /** a draft saved with problems: what must be fixed before it can be submitted */
    problems: opts.privileged && Array.isArray(e.problems) ? (e.problems as { path: string; message: string }[]) : undefined,
    scores: doc && refs && !e.problems ? await estimateScores(db, e, doc.estimates, refs) : undefined,
    // the rules the scores above follow (shared/scoring/rules.ts; /scoring states them)
    scoringRulesVersion: doc ? SCORING_RULES_VERSION : undefined,
  };
}
