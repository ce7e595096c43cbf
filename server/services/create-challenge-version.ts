/**
 * A draft challenge version from a spec: validates it (schema, then semantics), and stores the
 * version with its checksum, instances (gate counts, depth), observables (bound) and targets in
 * one transaction. Nothing is stored unless the whole spec is valid.
 */
import { and, eq, max } from 'drizzle-orm';
import { validateChallenge, type ValidatedChallenge } from '@shared/physics/challenge';
import { compileInstance, compileLattice, gateCounts, kickedIsingGateTotals } from '@shared/physics/compile';
import { coefficientBound } from '@shared/physics/observable';
import type { Db } from '../db/client';
import { challengeVersions, challenges, instances, observables, targets } from '../db/schema';
import { conflict, invalid } from '../errors';
import { recordAudit, type AuditActor } from './record-audit';
import { DEFAULT_PRIMARY_METRIC } from '@shared/scoring/standings';
import { TRACKS } from '@shared/vocabulary';

export function validateSpecOrThrow(spec: unknown): ValidatedChallenge {
  const r = validateChallenge(spec);
  if (!r.ok) throw invalid(r.errors, `The challenge spec is not valid: ${r.errors[0].path || '(document)'}: ${r.errors[0].message}`);
  return r.challenge;
}

/** Gate counts and depth per instance, cheap for kicked-Ising (no gate list is built). */
export function instanceShapes(ch: ValidatedChallenge) {
  const lattice = compileLattice(ch.spec);
  return ch.instances.map((inst) => {
    if (inst.params.family === 'kicked-ising') {
      const totals = kickedIsingGateTotals(ch.nQubits, lattice.graph.edges.length, inst.params.steps);
      return { key: inst.id, params: inst.params, qubits: ch.nQubits, gateCount: totals.total, depth: inst.params.steps * (1 + lattice.colourLayers.length) };
    }
    const c = gateCounts(compileInstance(ch.spec, inst, lattice));
    return { key: inst.id, params: inst.params, qubits: ch.nQubits, gateCount: c.total, depth: c.depth };
  });
}

export async function createChallengeVersion(db: Db, spec: unknown, actor: AuditActor, now: Date) {
  const ch = validateSpecOrThrow(spec);
  const shapes = instanceShapes(ch);
  return db.transaction(async (tx) => {
    const slug = ch.spec.id;
    const [dup] = await tx.select({ slug: challengeVersions.challengeSlug, version: challengeVersions.version }).from(challengeVersions).where(eq(challengeVersions.checksum, ch.checksum)).limit(1);
    if (dup) throw conflict(`This exact spec is already stored as ${dup.slug} version ${dup.version} (same checksum).`);
    const [existing] = await tx.select().from(challenges).where(eq(challenges.slug, slug)).limit(1);
    if (!existing) {
      await tx.insert(challenges).values({
        slug, title: ch.spec.title, summary: ch.spec.description.slice(0, 400), state: 'draft',
        settings: { estimator: 'random-effects-dl', primaryMetric: DEFAULT_PRIMARY_METRIC, tracks: [...TRACKS], license: ch.spec.license ?? 'CC-BY-4.0' },
        createdBy: actor.kind === 'user' ? actor.user.id : null, createdAt: now, updatedAt: now,
      });
    }
    const [{ latest }] = await tx.select({ latest: max(challengeVersions.version) }).from(challengeVersions).where(eq(challengeVersions.challengeSlug, slug));
    if (latest !== null && ch.spec.version <= latest) {
      throw invalid([{ path: '/version', message: `version ${ch.spec.version} exists already for "${slug}"; use ${latest + 1}` }]);
    }
    const [v] = await tx.insert(challengeVersions).values({ challengeSlug: slug, version: ch.spec.version, checksum: ch.checksum, spec: ch.spec, state: 'draft', createdAt: now }).returning();
    const instRows = await insertChunks(tx, instances, shapes.map((s) => ({ versionId: v.id, ...s })), { id: instances.id, key: instances.key });
    const obsRows = await insertChunks(tx, observables, ch.spec.observables.map((o, i) => ({ versionId: v.id, key: o.id, spec: o, bound: coefficientBound(ch.observables[i]) })), { id: observables.id, key: observables.key });
    const instId = new Map(instRows.map((r) => [r.key, r.id]));
    const obsId = new Map(obsRows.map((r) => [r.key, r.id]));
    await insertChunks(tx, targets, ch.targets.map((t) => ({ versionId: v.id, key: t.id, instanceId: instId.get(t.instanceId)!, observableId: obsId.get(t.observableId)! })), { id: targets.id });
    await tx.update(challenges).set({ updatedAt: now }).where(and(eq(challenges.slug, slug)));
    await recordAudit(tx, { actor, action: 'challenge.draft', subjectType: 'challenge', subjectId: slug, at: now, details: { version: ch.spec.version, checksum: ch.checksum, targets: ch.targets.length } });
    return { slug, versionId: v.id, version: v.version, checksum: v.checksum, targets: ch.targets.length, instances: ch.instances.length };
  });
}

async function insertChunks<R extends Record<string, any>>(tx: any, table: any, rows: object[], returning: R, size = 1000): Promise<{ [K in keyof R]: any }[]> {
  const out: any[] = [];
  for (let i = 0; i < rows.length; i += size) {
    out.push(...(await tx.insert(table).values(rows.slice(i, i + size)).returning(returning)));
  }
  return out;
}
