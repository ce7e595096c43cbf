/** Public data behind the challenge page's plots: estimates, light cones, and the history. */
import { and, asc, desc, eq, inArray, like, or, sql } from 'drizzle-orm';
import { lightCone } from '@shared/physics/light-cone';
import { compileInstance } from '@shared/physics/compile';
import type { AppContext } from '../context';
import type { Db } from '../db/client';
import { auditLog, challengeVersions, entries, estimates, jobs, organization, standings } from '../db/schema';
import { badRequest, notFound } from '../errors';
import { validateSpecOrThrow } from '../services/create-challenge-version';
import { loadChallengeVersion } from './challenges';
import { sealedTargetKeys } from '../services/recompute-standings';
import { ENGINE_CHANGE } from '../jobs/engine-upgrade';
import type { RouteTable } from './registry';

/** Published entries of a version that the public may see (not hidden by a moderator). */
export async function publicEntries(db: Db, versionId: string) {
  return db.select({ id: entries.id, label: entries.label, teamId: entries.teamId, teamName: organization.name, track: entries.track, methodFamily: entries.methodFamily, isBaseline: entries.isBaseline, featured: entries.featured, submittedAt: entries.submittedAt, publishedAt: entries.publishedAt, revision: entries.revision, document: entries.document })
    .from(entries).innerJoin(organization, eq(organization.id, entries.teamId))
    .where(and(eq(entries.versionId, versionId), eq(entries.state, 'published'), sql`${entries.hiddenReason} is null`)).orderBy(asc(entries.publishedAt));
}

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
      const sealed = await sealedTargetKeys(db, v.id, ctx.now());
      const baseline = new Set(es.filter((e) => e.isBaseline).map((e) => e.id));
      return {
        version: v.version,
        sealedTargets: [...sealed],
        entries: es.map((e) => ({ id: e.id, label: e.label, teamId: e.teamId, teamName: e.teamName, track: e.track, methodFamily: e.methodFamily, isBaseline: e.isBaseline, featured: e.featured })),
        estimates: sealed.size ? rows.filter((r) => !(baseline.has(r.entryId) && sealed.has(r.target))) : rows,
      };
    },
  });

  routes.add({
    method: 'get', path: '/challenges/:slug/targets/:targetKey/light-cone', access: 'public', summary: 'The qubits inside the backward light cone of a target (support-based upper bound)',
    handler: async (req) => {
      const { version: v } = await loadChallengeVersion(db, req);
      const ch = validateSpecOrThrow(v.spec);
      const key = String(req.params.targetKey);
      const target = ch.targets.find((t) => t.id === key);
      if (!target) throw notFound(`The target "${key}"`);
      const inst = ch.instances.find((i) => i.id === target.instanceId)!;
      const obs = ch.observables[ch.spec.observables.findIndex((o) => o.id === target.observableId)];
      const lc = lightCone(compileInstance(ch.spec, inst), obs);
      return { target: key, qubits: lc.qubits, total: ch.nQubits, nonCliffordRotations: lc.nonCliffordRotations, gatesInCone: lc.keptGates.length };
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
        const r = j.result as { targets?: number; exact?: number; engine?: string } | null;
        events.push({ at: (j.finishedAt ?? j.createdAt).toISOString(), kind: 'references', version: vOf.get((j.payload as { versionId: string }).versionId), summary: `Exact references computed: ${r?.exact ?? '?'} of ${r?.targets ?? '?'} targets (${r?.engine ?? ''})` });
      }
      const st = vIds.length ? await db.select({ id: standings.id, versionId: standings.versionId, at: standings.computedAt, engine: standings.engineVersion }).from(standings).where(inArray(standings.versionId, vIds)).orderBy(desc(standings.computedAt)).limit(200) : [];
      for (const s of st) events.push({ at: s.at.toISOString(), kind: 'standings', version: vOf.get(s.versionId), summary: `Standings recomputed (${s.engine})`, details: { asOf: s.at.toISOString() } });
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
