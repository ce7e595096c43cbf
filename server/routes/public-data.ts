/** Public data behind the challenge page's plots: estimates, light cones, and the history. */
import { and, asc, desc, eq, inArray, like, or, sql } from 'drizzle-orm';
import { ENGINE_VERSION } from '@shared/physics/reference';
import { degreesOfEquivalence } from '@shared/scoring/equivalence';
import { zneSummary } from '@shared/scoring/zne';
import type { AppContext } from '../context';
import { auditLog, challengeVersions, entries, estimates, instances, jobs, observables, organization, references, standings, targets } from '../db/schema';
import { badRequest, notFound } from '../errors';
import { computeForVersion } from '../services/version-cache';
import { loadChallengeVersion } from '../queries/challenge-version';
import { publicEntries } from '../queries/entries';
import { isEstimateWithheld, PUBLIC_VIEWER, sealedKeys, visibleReferences, withoutSealedBaseline } from '../queries/visibility';
import { presentReference } from '../presenters/reference';
import { latestStandings, type StandingsPayload } from '../services/recompute-standings';
import { ENGINE_CHANGE } from '../jobs/engine-upgrade';
import type { RouteTable } from './registry';
import type { InstanceParams, ObservableJson, TargetDetail } from '@shared/api-types';

export function registerPublicDataRoutes(routes: RouteTable, ctx: AppContext): void {
  const { db } = ctx;

  routes.add({
    method: 'get', path: '/challenges/:slug/estimates', access: 'public', summary: 'Every published estimate of a challenge version (?observable= and ?steps= filter; ?raw=0 leaves out noise-scaled data and convergence traces), with the entries they belong to',
    handler: async (req) => {
      const { version: v } = await loadChallengeVersion(db, req);
      const es = await publicEntries(db, v.id);
      const obs = typeof req.query.observable === 'string' ? req.query.observable : '';
      const steps = typeof req.query.steps === 'string' && req.query.steps ? Number(req.query.steps) : null;
      if (steps !== null && !Number.isInteger(steps)) throw badRequest('steps must be a whole number', [{ path: '/query/steps', message: 'not a whole number' }]);
      const conds = [inArray(estimates.entryId, es.length ? es.map((e) => e.id) : ['00000000-0000-0000-0000-000000000000'])];
      if (obs) conds.push(like(estimates.targetKey, `%:${obs.replace(/[%_\\]/g, '\\$&')}`));
      if (steps !== null) conds.push(like(estimates.targetKey, `t${steps}-h%`));
      const withRaw = req.query.raw !== '0';
      const rows = await db.select({ entryId: estimates.entryId, target: estimates.targetKey, value: estimates.value, uncertainty: estimates.uncertainty, kind: estimates.kind, ...(withRaw ? { raw: estimates.raw } : {}) })
        .from(estimates).where(and(...conds)).orderBy(asc(estimates.targetKey)).limit(200_000);
      // the public plots: house-baseline estimates of sealed targets are withheld (queries/visibility.ts)
      const { sealed } = await visibleReferences(db, v.id, PUBLIC_VIEWER, ctx.now());
      const baseline = new Set(es.filter((e) => e.isBaseline).map((e) => e.id));
      return {
        version: v.version,
        sealedTargets: [...sealed],
        entries: es.map((e) => ({ id: e.id, label: e.label, teamId: e.teamId, teamName: e.teamName, track: e.track, methodFamily: e.methodFamily, isBaseline: e.isBaseline, featured: e.featured })),
        estimates: withoutSealedBaseline(rows, baseline, sealed),
      };
    },
  });

  routes.add({
    method: 'get', path: '/challenges/:slug/targets/:targetKey/light-cone', access: 'public', summary: 'The qubits inside the backward light cone of a target (support-based upper bound)',
    handler: async (req) => {
      const { version: v } = await loadChallengeVersion(db, req);
      // computed in a document thread once per version and target (server/services/challenge-computations.ts)
      return computeForVersion(ctx.threads, ctx.versionCache, v, 'challenge.lightCone', { targetKey: String(req.params.targetKey) }, (r) => 100 + 8 * r.qubits.length);
    },
  });

  routes.add({
    method: 'get', path: '/challenges/:slug/targets/:targetKey', access: 'public',
    summary: "One target: its reference with provenance (sealed values withheld until their date) or the consensus with its tests, every public estimate with its degree of equivalence and raw zero-noise data with the server's fits, and the same observable at neighbouring depths and angles",
    handler: async (req) => {
      const { version: v } = await loadChallengeVersion(db, req);
      const key = String(req.params.targetKey);
      const [t] = await db.select({ id: targets.id, key: targets.key, instance: instances.key, params: instances.params, observable: observables.key, spec: observables.spec, bound: observables.bound, disputed: targets.disputed, disputeNote: targets.disputeNote, ref: references })
        .from(targets).innerJoin(instances, eq(instances.id, targets.instanceId)).innerJoin(observables, eq(observables.id, targets.observableId))
        .leftJoin(references, eq(references.targetId, targets.id)).where(and(eq(targets.versionId, v.id), eq(targets.key, key))).limit(1);
      if (!t) throw notFound(`The target "${key}"`);
      const now = ctx.now();
      const st = await latestStandings(db, v.id);
      const payload = st?.payload as StandingsPayload | undefined;
      const c = payload?.public.targets.find((x) => x.key === key) ?? null;
      // the same rule as every public view: hidden entries are left out, and the house baseline's
      // estimate of a sealed target is withheld (it would reveal the sealed value)
      const sealedSet = sealedKeys([{ key, sealedUntil: t.ref?.sealedUntil ?? null }], PUBLIC_VIEWER, now);
      const es = (await publicEntries(db, v.id)).filter((e) => !isEstimateWithheld({ isBaseline: e.isBaseline, target: key }, sealedSet));
      const rows = es.length ? await db.select({ entryId: estimates.entryId, value: estimates.value, uncertainty: estimates.uncertainty, kind: estimates.kind, raw: estimates.raw })
        .from(estimates).where(and(inArray(estimates.entryId, es.map((e) => e.id)), eq(estimates.targetKey, key))) : [];
      const byEntry = new Map(rows.map((r) => [r.entryId, r]));
      const reference = presentReference(t.ref, now);
      const doeOf = (entryId: string, m: { value: number; uncertainty: number }) => {
        if (reference.status === 'exact') {
          const d = m.value - reference.value;
          const u = Math.sqrt(m.uncertainty ** 2 + reference.uncertainty ** 2);
          return { against: 'reference' as const, d, u, U: 2 * u, included: false };
        }
        if (!c || c.value === null || c.uncertainty === null) return null;
        const included = !c.excluded.includes(entryId);
        const [x] = degreesOfEquivalence([m], { value: c.value, uncertainty: c.uncertainty, included: included ? [0] : [], tau2: c.tau2 ?? 0 });
        return { against: 'consensus' as const, d: x.d, u: x.u, U: x.U, included };
      };
      const list = es.flatMap((e) => {
        const r = byEntry.get(e.id);
        if (!r) return [];
        const raw = (r.raw ?? null) as { unmitigated?: number; noiseScaled?: { scale: number; value: number; uncertainty: number }[] } | null;
        const points = Array.isArray(raw?.noiseScaled) ? raw.noiseScaled.filter((p) => Number.isFinite(p.scale) && Number.isFinite(p.value) && Number.isFinite(p.uncertainty)) : [];
        const zne = points.length ? { points, unmitigated: raw?.unmitigated ?? null, fits: zneSummary(points).models.map((m) => ({ model: m.model, ok: m.ok, value: m.ok ? m.value : null, uncertainty: m.ok ? m.uncertainty : null, reason: m.reason ?? null, chi2: m.chi2 !== undefined && Number.isFinite(m.chi2) ? m.chi2 : null, nu: m.nu ?? null })) } : null;
        // the house baseline states a truncation bound (capped at the observable's bound), not a standard
        // uncertainty: it gets no degree of equivalence and is never in the consensus (scoring rules)
        const uncertainty = e.isBaseline ? Math.min(r.uncertainty, t.bound) : r.uncertainty;
        const m = { value: r.value, uncertainty };
        return [{ entry: { id: e.id, label: e.label, teamId: e.teamId, teamName: e.teamName, track: e.track, methodFamily: e.methodFamily, isBaseline: e.isBaseline, publishedAt: e.publishedAt }, value: r.value, uncertainty, kind: e.isBaseline ? 'bound' : r.kind, equivalence: e.isBaseline ? null : doeOf(e.id, m), zne }];
      });
      // the same observable at the other depths and angles of the grid (keys only; their pages say the rest)
      const siblings = await db.select({ key: targets.key, params: instances.params }).from(targets).innerJoin(instances, eq(instances.id, targets.instanceId)).innerJoin(observables, eq(observables.id, targets.observableId))
        .where(and(eq(targets.versionId, v.id), eq(observables.key, t.observable)));
      return {
        version: v.version, checksum: v.checksum, engineVersion: ENGINE_VERSION,
        key: t.key, instance: t.instance, params: t.params as InstanceParams, observable: { key: t.observable, spec: t.spec as ObservableJson, bound: t.bound },
        disputed: t.disputed || Boolean(c?.disputed), disputeNote: t.disputeNote ?? c?.disputedNote ?? null,
        reference,
        consensus: c ? { estimator: c.estimator, entries: c.entries, includedCount: c.includedCount, excluded: c.excluded, value: c.value, uncertainty: c.uncertainty, chi2: c.chi2, nu: c.nu, p: c.p, birgeRatio: c.birgeRatio, tau2: c.tau2, I2: c.I2, disputed: c.disputed, computedAt: st!.computedAt, engineVersion: st!.engineVersion } : null,
        estimates: list,
        siblings: siblings.map((s) => ({ key: s.key, steps: (s.params as { steps?: number }).steps ?? null, thetaH: (s.params as { thetaH?: number }).thetaH ?? null })),
      } satisfies TargetDetail;
    },
  });

  routes.add({
    method: 'get', path: '/challenges/:slug/history', access: 'public', summary: 'Versions, reference computations, standings recomputations, reference-engine changes and public moderation events, newest first',
    handler: async (req) => {
      const { challenge: c } = await loadChallengeVersion(db, req);
      const versions = await db.select().from(challengeVersions).where(eq(challengeVersions.challengeSlug, c.slug));
      const vIds = versions.map((v) => v.id);
      const vOf = new Map(versions.map((v) => [v.id, v.version]));
      const events: { at: string; kind: string; summary: string; version?: number; details?: Record<string, unknown> }[] = [];
      for (const v of versions) {
        if (v.publishedAt) events.push({ at: v.publishedAt.toISOString(), kind: 'version', version: v.version, summary: `Version ${v.version} published (sha256 ${v.checksum.slice(0, 12)}…)` });
        if (v.state === 'superseded') events.push({ at: (v.publishedAt ?? v.createdAt).toISOString(), kind: 'superseded', version: v.version, summary: `Version ${v.version} superseded: ${v.supersededReason ?? ''}` });
      }
      const js = vIds.length ? await db.select().from(jobs).where(and(eq(jobs.kind, 'references'), eq(jobs.state, 'done'), sql`${jobs.payload}->>'versionId' in (${sql.join(vIds.map((x) => sql`${x}`), sql`, `)})`)) : [];
      for (const j of js) {
        const r = j.result as { targets?: number; exact?: number; engine?: string; bySliceJobs?: number } | null;
        events.push({ at: (j.finishedAt ?? j.createdAt).toISOString(), kind: 'references', version: vOf.get((j.payload as { versionId: string }).versionId), summary: `Exact references computed: ${r?.exact ?? '?'} of ${r?.targets ?? '?'} targets${r?.bySliceJobs ? `, ${r.bySliceJobs} more handed to tensor-network slice jobs` : ''} (${r?.engine ?? ''})` });
      }
      const st = vIds.length ? await db.select({ id: standings.id, versionId: standings.versionId, at: standings.computedAt, engine: standings.engineVersion, rules: standings.scoringRulesVersion }).from(standings).where(inArray(standings.versionId, vIds)).orderBy(desc(standings.computedAt)).limit(200) : [];
      st.forEach((s, i) => {
        // the next older row of the same version: a different rules version makes this a change of rules
        const prev = st.slice(i + 1).find((x) => x.versionId === s.versionId);
        const changed = prev && prev.rules !== s.rules;
        events.push({ at: s.at.toISOString(), kind: changed ? 'rescoring' : 'standings', version: vOf.get(s.versionId), summary: changed ? `Scoring rules ${prev.rules} -> ${s.rules}: standings recomputed (${s.engine})` : `Standings recomputed (${s.engine}, scoring rules ${s.rules})`, details: { asOf: s.at.toISOString(), scoringRules: s.rules, ...(changed ? { previousScoringRules: prev.rules } : {}) } });
      });
      const entryRows = await db.select({ id: entries.id, label: entries.label, teamName: organization.name }).from(entries).innerJoin(organization, eq(organization.id, entries.teamId)).where(eq(entries.challengeSlug, c.slug));
      const entryIds = entryRows.map((e) => e.id);
      const entryOf = new Map(entryRows.map((e) => [e.id, e]));
      const PUBLIC_ACTIONS = ['challenge.publish', 'entry.publish', 'entry.withdraw', 'entry.feature', 'entry.hide', 'target.dispute', 'target.undispute', 'references.seal', 'references.unseal', 'challenge.settings', ENGINE_CHANGE];
      const audit = await db.select().from(auditLog).where(and(inArray(auditLog.action, PUBLIC_ACTIONS), or(and(eq(auditLog.subjectType, 'challenge'), eq(auditLog.subjectId, c.slug)), entryIds.length ? and(eq(auditLog.subjectType, 'entry'), inArray(auditLog.subjectId, entryIds)) : sql`false`)))
        .orderBy(desc(auditLog.at)).limit(300);
      for (const a of audit) {
        if (a.action === 'challenge.publish') continue; // shown as a version event
        const d = a.details as Record<string, unknown>;
        if (a.action === ENGINE_CHANGE) {
          events.push({ at: a.at.toISOString(), kind: 'engine', version: Number(d.version), summary: `Reference engine ${d.from} -> ${d.to}: ${d.references} references recomputed, standings rescored` });
          continue;
        }
        events.push({ at: a.at.toISOString(), kind: a.action, summary: `${a.action.replace('.', ' ')}${d.reason ? `: ${d.reason}` : ''}${d.note ? `: ${d.note}` : ''}`, details: { subject: a.subjectId, ...(a.subjectType === 'entry' && entryOf.has(a.subjectId) ? { label: entryOf.get(a.subjectId)!.label, teamName: entryOf.get(a.subjectId)!.teamName } : {}), ...(d.reason ? { reason: d.reason } : {}) } });
      }
      events.sort((a, b) => (a.at < b.at ? 1 : a.at > b.at ? -1 : 0));
      return { challenge: c.slug, events };
    },
  });
}
