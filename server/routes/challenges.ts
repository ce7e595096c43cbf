/**
 * Challenges: the public catalogue and challenge data (spec, versions, instances, targets with
 * their references, downloads), and the moderators' draft and publish actions.
 */
import { and, asc, count, desc, eq, inArray, ne, sql } from 'drizzle-orm';
import { z } from 'zod';
import { buildLattice } from '@shared/physics/lattices';
import { planChallenge } from '@shared/physics/planner';
import { plannerOptions } from '../planner-options';
import type { ChallengeSpec } from '@shared/physics/challenge';
import type { AppContext } from '../context';
import { challengeVersions, challenges, entries, instances, jobs, observables, references, targets } from '../db/schema';
import { isModeratorActor, loadChallengeVersion } from '../queries/challenge-version';
import { listedEntry } from '../queries/entries';
import { isVisibleNow, PUBLIC_VIEWER, viewerOf } from '../queries/visibility';
import { presentReference } from '../presenters/reference';
import { AppError, badRequest, notFound } from '../errors';
import { createChallengeVersion, instanceShapes, validateSpecOrThrow } from '../services/create-challenge-version';
import { publishChallengeVersion } from '../services/publish-challenge-version';
import { parseBody } from '../validate';
import { reply } from '../effects';
import { latestStandings, type StandingsPayload } from '../services/recompute-standings';
import type { RouteTable } from './registry';
import type { Request, Response } from 'express';
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { computeForVersion } from '../services/version-cache';
import { documentBody } from '../util/document-body';
import { parseStrictJson } from '../util/strict-json';
import { entryGateStatus, type ChallengeGate, type GateReason } from '../services/validate-entry';
import { TRACKS, type Track } from '@shared/vocabulary';
import type { ChallengeDetail, ChallengeSettings, InstanceParams, ObservableJson, SubmissionsStatus } from '@shared/api-types';

/** a moment as the short reasons say it, in UTC: "2026-12-24 00:00 UTC" (seconds only when there are any) */
const utcText = (d: Date) => {
  const s = d.toISOString();
  return `${s.slice(0, 10)} ${s.slice(11, s.slice(16, 23) === ':00.000' ? 16 : 19)} UTC`;
};
const reasonText = (r: GateReason): string => {
  switch (r.kind) {
    case 'state': return r.state === 'closed' ? 'submissions closed' : `not open (${r.state})`;
    case 'before-window': return `opens ${utcText(r.at)}`;
    case 'after-window': return `closed ${utcText(r.at)}`;
    case 'track-closed': return `${r.track} track closed`;
  }
};

/**
 * Whether the challenge takes entries now (on the request's clock), per track and in any track,
 * with a short reason when not: the same answer as the entry routes' enforcement (entryGateStatus
 * in services/validate-entry.ts).
 * - acceptsEntriesNow: a submission would be taken now (a new entry created and sent to review);
 *   reason says why not.
 * - acceptsDraftsNow: a new draft would be stored now; true as well before the window opens, when
 *   only the submission waits for opensAt.
 * Drafts already stored stay editable and returned entries can be resubmitted whatever this says
 * (see the settings section there).
 */
export function submissionsStatus(c: ChallengeGate, now: Date): SubmissionsStatus {
  const g = entryGateStatus(c, now);
  const track = (t: Track) => ({
    acceptsEntriesNow: g.tracks[t].acceptsEntries, acceptsDraftsNow: g.tracks[t].acceptsDrafts,
    reason: g.tracks[t].reasons.map(reasonText).join('; ') || null,
  });
  // the reasons shared by both tracks (state, window), or that no track is open
  const shared = g.tracks.hardware.reasons.filter((r) => r.kind !== 'track-closed');
  return {
    acceptsEntriesNow: g.acceptsEntries,
    acceptsDraftsNow: g.acceptsDrafts,
    reason: g.acceptsEntries ? null : shared.length ? shared.map(reasonText).join('; ') : 'no track open',
    openTracks: g.openTracks,
    window: { opensAt: g.window.opensAt?.toISOString() ?? null, closesAt: g.window.closesAt?.toISOString() ?? null },
    tracks: Object.fromEntries(TRACKS.map((t) => [t, track(t)])) as SubmissionsStatus['tracks'],
    asOf: now.toISOString(),
  };
}

const publishBody = z.object({ version: z.number().int().positive().optional(), reason: z.string().trim().max(2000).optional() }).strict();
const SPEC_LIMIT = 10 * 1024 * 1024;

/**
 * The spec, from the uploaded file or the JSON body alike: both are spooled by documentBody and
 * parsed by the strict parser (duplicate keys, inexact integers, NUL characters are refused).
 */
function specFromRequest(_req: Request, res: Response): unknown {
  const bytes = res.locals.document as Buffer | undefined;
  if (!bytes?.length) throw badRequest('Send the challenge spec (schemas/challenge.schema.json) as the JSON body with Content-Type: application/json, or as the multipart field "file".', [{ path: '', message: 'the body is empty' }]);
  const r = parseStrictJson(bytes, { maxDepth: 64 });
  if (r.ok) return r.value;
  throw badRequest(`The challenge spec is not valid JSON: ${r.problems[0].path ? `${r.problems[0].path}: ` : ''}${r.problems[0].message}.`, r.problems.map((p) => ({ path: p.path, message: p.message })).concat(r.syntax ? [{ path: '', message: 'send a JSON challenge spec (schemas/challenge.schema.json)' }] : []));
}

export function registerChallengeRoutes(routes: RouteTable, ctx: AppContext): void {
  const { db } = ctx;
  /** a spec as the JSON body or the multipart field "file", spooled and parsed strictly either way */
  const upload = documentBody({
    limit: SPEC_LIMIT, slots: ctx.documentSlots, rawBody: true,
    tooLarge: () => new AppError('payload_too_large', `The challenge spec is larger than the limit of 10 MiB (${SPEC_LIMIT} bytes).`),
    wrongField: 'Upload the challenge spec in the multipart field "file" (curl -F file=@spec.json), one file only.',
  });

  routes.add({
    method: 'get', path: '/challenges', access: 'public', summary: 'The catalogue: every published challenge with its size, depth range, targets, exact share, entries per track and whether it takes entries now',
    handler: async (req) => {
      const rows = await db.select().from(challenges).where(isModeratorActor(req.actor) ? undefined : ne(challenges.state, 'draft')).orderBy(asc(challenges.title));
      const versionIds = rows.map((r) => r.currentVersionId).filter((x): x is string => Boolean(x));
      const versions = versionIds.length ? await db.select({ id: challengeVersions.id, version: challengeVersions.version, checksum: challengeVersions.checksum, spec: challengeVersions.spec, publishedAt: challengeVersions.publishedAt }).from(challengeVersions).where(inArray(challengeVersions.id, versionIds)) : [];
      const tcounts = versionIds.length ? await db.select({ versionId: targets.versionId, n: count(), exact: sql<number>`count(${references.value})::int` })
        .from(targets).leftJoin(references, eq(references.targetId, targets.id)).where(inArray(targets.versionId, versionIds)).groupBy(targets.versionId) : [];
      // sealed counts: one row per (version, seal date); whether a date has passed is isVisibleNow's question
      const sealDates = versionIds.length ? await db.select({ versionId: targets.versionId, sealedUntil: references.sealedUntil, n: count() })
        .from(targets).innerJoin(references, eq(references.targetId, targets.id)).where(and(inArray(targets.versionId, versionIds), sql`${references.sealedUntil} is not null`)).groupBy(targets.versionId, references.sealedUntil) : [];
      const now = ctx.now();
      const sealedCount = (versionId: string | null) => sealDates.filter((d) => d.versionId === versionId && !isVisibleNow(d, PUBLIC_VIEWER, now)).reduce((a, d) => a + Number(d.n), 0);
      // hidden entries are not counted (they left the standings)
      const ecounts = await db.select({ slug: entries.challengeSlug, track: entries.track, n: count(), last: sql<string>`max(${entries.publishedAt})` }).from(entries)
        .where(listedEntry()).groupBy(entries.challengeSlug, entries.track);
      return {
        challenges: rows.map((c) => {
          const v = versions.find((x) => x.id === c.currentVersionId);
          const spec = v?.spec as ChallengeSpec | undefined;
          const tc = tcounts.find((x) => x.versionId === c.currentVersionId);
          const ec = ecounts.filter((x) => x.slug === c.slug);
          const steps = spec?.circuit.family === 'kicked-ising' ? spec.circuit.steps : null;
          const lastEntry = ec.map((x) => x.last).filter(Boolean).sort().pop();
          return {
            slug: c.slug, title: c.title, summary: c.summary, state: c.state,
            version: v?.version ?? null, checksum: v?.checksum ?? null,
            lattice: spec ? { ...spec.lattice, qubits: spec.lattice.kind === 'edges' ? spec.lattice.n : undefined } : null,
            qubits: spec ? buildLatticeSize(spec) : null,
            family: spec?.circuit.family ?? null,
            steps: steps ? { min: Math.min(...steps), max: Math.max(...steps) } : null,
            targets: Number(tc?.n ?? 0), exactTargets: Number(tc?.exact ?? 0), sealedTargets: sealedCount(c.currentVersionId),
            entries: { hardware: Number(ec.find((x) => x.track === 'hardware')?.n ?? 0), classical: Number(ec.find((x) => x.track === 'classical')?.n ?? 0) },
            lastActivity: [lastEntry, v?.publishedAt?.toISOString(), c.updatedAt.toISOString()].filter(Boolean).sort().pop(),
            submissions: submissionsStatus(c, now),
          };
        }),
      };
    },
  });

  routes.add({
    method: 'get', path: '/challenges/:slug', access: 'public', summary: 'One challenge: spec, versions, instances with gate counts and depth, lattice drawing, reference-job progress, whether it takes entries now (tracks, window, reason)',
    handler: async (req) => {
      const { challenge: c, version: v, versions } = await loadChallengeVersion(db, req);
      const spec = v.spec as ChallengeSpec;
      const graph = buildLattice(spec.lattice);
      const inst = await db.select().from(instances).where(eq(instances.versionId, v.id)).orderBy(asc(instances.key));
      const obs = await db.select().from(observables).where(eq(observables.versionId, v.id)).orderBy(asc(observables.key));
      const js = await db.select({ id: jobs.id, kind: jobs.kind, state: jobs.state, progress: jobs.progress, note: jobs.progressNote, error: jobs.error, createdAt: jobs.createdAt, finishedAt: jobs.finishedAt })
        .from(jobs).where(sql`${jobs.payload}->>'versionId' = ${v.id}`).orderBy(desc(jobs.createdAt)).limit(20);
      return {
        slug: c.slug, title: spec.title, description: spec.description, state: c.state, settings: c.settings as ChallengeSettings,
        submissions: submissionsStatus(c, ctx.now()),
        version: { id: v.id, version: v.version, checksum: v.checksum, state: v.state, publishedAt: v.publishedAt, supersededReason: v.supersededReason },
        versions: versions.map((x) => ({ version: x.version, checksum: x.checksum, state: x.state, publishedAt: x.publishedAt, supersededReason: x.supersededReason })),
        spec,
        lattice: { kind: spec.lattice.kind, qubits: graph.n, edges: graph.edges, coords: graph.coords },
        instances: inst.map((i) => ({ key: i.key, params: i.params as InstanceParams, qubits: i.qubits, gateCount: i.gateCount, depth: i.depth })),
        observables: obs.map((o) => ({ key: o.key, spec: o.spec as ObservableJson, bound: o.bound })),
        jobs: js,
      } satisfies ChallengeDetail;
    },
  });

  routes.add({
    method: 'get', path: '/challenges/:slug/targets', access: 'public', summary: 'Every target with its exact reference (value, method, size, cost, engine) or the reason there is none; sealed values hidden until their date',
    handler: async (req) => {
      const { version: v } = await loadChallengeVersion(db, req);
      const rows = await db.select({ key: targets.key, instance: instances.key, params: instances.params, observable: observables.key, disputed: targets.disputed, disputeNote: targets.disputeNote, ref: references })
        .from(targets).innerJoin(instances, eq(instances.id, targets.instanceId)).innerJoin(observables, eq(observables.id, targets.observableId))
        .leftJoin(references, eq(references.targetId, targets.id)).where(eq(targets.versionId, v.id)).orderBy(asc(targets.key));
      const now = ctx.now();
      const viewer = await viewerOf(db, req.actor);
      const st = await latestStandings(db, v.id);
      const cons = new Map(((st?.payload as StandingsPayload | undefined)?.public.targets ?? []).map((x) => [x.key, x]));
      return {
        version: v.version, checksum: v.checksum, estimator: (st?.payload as StandingsPayload | undefined)?.estimator ?? null, standingsComputedAt: st?.computedAt ?? null,
        targets: rows.map((r) => {
          const k = cons.get(r.key);
          return {
            key: r.key, instance: r.instance, params: r.params, observable: r.observable,
            disputed: r.disputed || Boolean(k?.disputed), disputeNote: r.disputeNote,
            reference: presentReference(r.ref, now, viewer),
            consensus: k ? { estimator: k.estimator, entries: k.entries, value: k.value, uncertainty: k.uncertainty, chi2: k.chi2, nu: k.nu, p: k.p, birgeRatio: k.birgeRatio, tau2: k.tau2, I2: k.I2, disputed: k.disputed, teams: k.teams ?? null, ranked: k.ranked ?? null, noConsensus: k.noConsensus ?? null, includedCount: k.includedCount, excluded: k.excluded } : null,
          };
        }),
      };
    },
  });

  routes.add({
    method: 'get', path: '/challenges/:slug/spec.json', access: 'public', summary: 'The exact JSON spec of a version (checksum in the X-Parallax-Checksum header)',
    handler: async (req, res) => {
      const { version: v } = await loadChallengeVersion(db, req);
      res.setHeader('X-Parallax-Checksum', `sha256:${v.checksum}`);
      res.setHeader('Content-Disposition', `attachment; filename="${v.challengeSlug}-v${v.version}.json"`);
      res.type('application/json').send(JSON.stringify(v.spec, null, 2));
    },
  });

  routes.add({
    method: 'get', path: '/challenges/:slug/instances/:instanceKey/qasm', access: 'public', summary: 'One instance as OpenQASM 3 (computed once per version, streamed)',
    handler: async (req, res) => {
      const { version: v } = await loadChallengeVersion(db, req);
      const instanceId = String(req.params.instanceKey);
      const q = await computeForVersion(ctx.threads, ctx.versionCache, v, 'challenge.qasm', { instanceId }, (r) => r.bytes);
      res.setHeader('Content-Disposition', `attachment; filename="${v.challengeSlug}-v${v.version}-${instanceId}.qasm"`);
      res.setHeader('Content-Length', String(q.bytes));
      res.type('text/plain');
      await pipeline(Readable.from(q.pieces.map((p) => Buffer.from(p.buffer, p.byteOffset, p.byteLength))), res);
    },
  });

  routes.add({
    method: 'get', path: '/challenges/:slug/plan', access: 'public', summary: "The planner's report: per target, the exact method it would use and its estimated cost, or why none is feasible (computed once per version)",
    handler: async (req) => {
      const { version: v } = await loadChallengeVersion(db, req);
      const plans = await computeForVersion(ctx.threads, ctx.versionCache, v, 'challenge.plan', { options: plannerOptions(ctx.config.referenceBudget) }, (r) => 200 * r.length);
      return { version: v.version, plans };
    },
  });

  routes.add({
    method: 'post', path: '/challenges/preview', access: 'moderator', summary: 'Validate a spec and show the planner report without storing anything',
    body: upload,
    handler: async (req, res) => {
      const ch = validateSpecOrThrow(specFromRequest(req, res));
      const plans = planChallenge(ch, plannerOptions(ctx.config.referenceBudget));
      const graph = buildLattice(ch.spec.lattice);
      return {
        id: ch.spec.id, version: ch.spec.version, checksum: ch.checksum, qubits: ch.nQubits, instances: ch.instances.length, targets: ch.targets.length,
        instanceList: instanceShapes(ch).map((x) => ({ id: x.key, params: x.params, qubits: x.qubits, gateCount: x.gateCount, depth: x.depth })),
        lattice: { kind: ch.spec.lattice.kind, qubits: graph.n, edges: graph.edges, coords: graph.coords },
        plans: plans.map((p) => ({ target: p.targetId, method: p.method, size: p.size, unit: p.unit, estimatedSeconds: p.estimatedSeconds, reason: p.reason, cone: p.cone })),
      };
    },
  });

  routes.add({
    method: 'post', path: '/challenges', access: 'moderator', summary: 'Store a draft challenge version from a spec (JSON body or multipart field "file")',
    body: upload,
    handler: async (req, res) => {
      const out = await createChallengeVersion(db, specFromRequest(req, res), req.actor, ctx.now());
      res.status(201);
      return out;
    },
  });

  routes.add({
    method: 'post', path: '/challenges/:slug/publish', access: 'moderator', summary: 'Publish the newest draft version (a correction needs a reason) and start the reference job',
    handler: async (req) => {
      const body = parseBody(publishBody, req.body);
      const { result, effects } = await publishChallengeVersion(db, { slug: String(req.params.slug), version: body.version, reason: body.reason, actor: req.actor, now: ctx.now() });
      return reply(effects, result);
    },
  });

  routes.add({
    method: 'get', path: '/jobs/:jobId', access: 'public', summary: 'Progress of a background job (reference computation, baseline, standings)',
    handler: async (req) => {
      const id = String(req.params.jobId);
      if (!/^[0-9a-f-]{36}$/i.test(id)) throw notFound('The job');
      const [j] = await db.select({ id: jobs.id, kind: jobs.kind, state: jobs.state, progress: jobs.progress, note: jobs.progressNote, error: jobs.error, createdAt: jobs.createdAt, startedAt: jobs.startedAt, finishedAt: jobs.finishedAt, result: jobs.result }).from(jobs).where(eq(jobs.id, id));
      if (!j) throw notFound('The job');
      return j;
    },
  });
}

function buildLatticeSize(spec: ChallengeSpec): number {
  return buildLattice(spec.lattice).n;
}
