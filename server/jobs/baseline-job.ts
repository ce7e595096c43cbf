/** The house baseline of a challenge version: truncated Pauli propagation of every target, published as an unranked entry. */
import { and, desc, eq } from 'drizzle-orm';
import { ENGINE_VERSION } from '@shared/physics/reference';
import { entries, observables, targets } from '../db/schema';
import { createSystemEntry } from '../services/create-system-entry';
import { runCompute } from './run-compute';
import { versionSpec } from './references-job';
import type { JobHandler } from './types';

import { HOUSE_TEAM } from '../house-team';

export { HOUSE_TEAM };
export const BASELINE_SETTINGS = { delta: 5e-3, maxTerms: 20_000 };

export const baselineJob: JobHandler = async (job, w) => {
  const versionId = String((job.payload as { versionId: string }).versionId);
  const v = await versionSpec(w.db, versionId);
  // the newest baseline of the version: kept while this engine made it; an older engine's is
  // replaced by a new revision (the old one stays visible as an earlier revision)
  const [have] = await w.db.select({ id: entries.id, lineageId: entries.lineageId, revision: entries.revision, document: entries.document })
    .from(entries).where(and(eq(entries.versionId, versionId), eq(entries.isBaseline, true))).orderBy(desc(entries.revision)).limit(1);
  const madeBy = (have?.document as { resources?: { software?: { name?: string }[] } } | undefined)?.resources?.software?.[0]?.name;
  if (have && madeBy === ENGINE_VERSION) return { skipped: 'baseline exists' };
  const ts = await w.db.select({ key: targets.key, bound: observables.bound }).from(targets).innerJoin(observables, eq(observables.id, targets.observableId)).where(eq(targets.versionId, versionId));
  const keys = ts.map((t) => t.key);
  // the truncation bound (sum of the dropped |c|) is stated as a bound, capped at the observable's own
  // bound (|<O>| <= sum |c|): a larger figure says nothing more; the raw figure stays in raw.truncatedWeight
  const boundOf = new Map(ts.map((t) => [t.key, t.bound]));
  const rows: { targetKey: string; value: number; uncertainty: number; kind: string; raw: Record<string, unknown> }[] = [];
  let wallMs = 0;
  await runCompute({ mode: 'baseline', spec: v.spec, targetIds: keys, baseline: BASELINE_SETTINGS }, async (m) => {
    if (m.type === 'progress') await w.progress(m.done / Math.max(1, m.total), m.note);
    if (m.type !== 'baseline') return;
    wallMs += m.wallMs;
    rows.push({ targetKey: m.targetId, value: m.value, uncertainty: Math.min(m.bound, boundOf.get(m.targetId) ?? Infinity), kind: m.exact ? 'none' : 'bound', raw: { peakTerms: m.terms, truncatedWeight: m.bound } });
  });
  // stored (entry, estimates, audit, standings job) by the service that owns system entries
  const { effects } = await createSystemEntry(w.db, {
    slug: v.challengeSlug, versionId, teamId: HOUSE_TEAM.id, state: 'published', track: 'classical',
    methodFamily: 'pauli-propagation', isBaseline: true,
    label: `House baseline: truncated Pauli propagation (|c| < ${BASELINE_SETTINGS.delta} dropped after every gate, at most ${BASELINE_SETTINGS.maxTerms} terms)`,
    document: {
      method: { family: 'pauli-propagation', settings: { coefficientThreshold: BASELINE_SETTINGS.delta, maxTerms: BASELINE_SETTINGS.maxTerms, truncation: 'after every gate' } },
      resources: { wallTimeSeconds: wallMs / 1000, cpuCoreHours: wallMs / 3.6e6, hardware: 'one CPU core of the Parallax server', software: [{ name: ENGINE_VERSION }] },
      uncertaintyNote: 'Each uncertainty is the triangle-inequality bound: the sum of |c| over every dropped term.',
    },
    estimates: rows, actorLabel: 'house baseline', auditDetails: { baseline: true, versionId, ...(have ? { replaces: have.id, engineBefore: madeBy ?? 'unversioned' } : {}) }, at: w.now(),
    ...(have ? { supersedes: { id: have.id, lineageId: have.lineageId ?? have.id, revision: have.revision } } : {}),
  });
  return { estimates: rows.length, wallMs, effects };
};
