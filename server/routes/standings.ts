/** Standings, per-target consensus and the agreement matrix: read from the cached standings rows. */
import { createHash } from 'node:crypto';
import type { Request, Response } from 'express';
import { and, eq, inArray } from 'drizzle-orm';
import { PRIMARY_METRICS, LEGACY_METRICS, rankRows, resolveMetric, type StandingsResult } from '@shared/scoring/standings';
import { EXACT_TOLERANCE, MIN_INDEPENDENT_TEAMS, SCORING_RULES_VERSION } from '@shared/scoring/rules';
import { pairwiseEquivalence, equivalenceRatio } from '@shared/scoring';
import type { AppContext } from '../context';
import { entries, estimates, organization } from '../db/schema';
import { badRequest } from '../errors';
import { latestStandings, privateView, type StandingsPayload } from '../services/recompute-standings';
import { loadChallengeVersion } from '../queries/challenge-version';
import { isEstimateWithheld, PUBLIC_VIEWER, seesSealedValues, viewerOf, visibleReferences, type Viewer } from '../queries/visibility';
import type { RouteTable } from './registry';
import { TRACK_VIEWS } from '@shared/vocabulary';
import type { StandingsResponse } from '@shared/api-types';

const TRACKS = TRACK_VIEWS;

function parseQuery(req: Request, settings: { primaryMetric?: string }, viewer: Viewer) {
  // names of the previous rules (rmse-verifiable, ...) still work: they rank by the proper score of their scope
  const asked = typeof req.query.metric === 'string' ? req.query.metric : settings.primaryMetric;
  const metric = resolveMetric(asked);
  if (!metric) throw badRequest(`metric must be one of ${PRIMARY_METRICS.join(', ')}`, [{ path: '/query/metric', message: `unknown metric "${String(asked)}"; use one of ${PRIMARY_METRICS.join(', ')} (older names: ${Object.keys(LEGACY_METRICS).join(', ')})` }]);
  const track = (typeof req.query.track === 'string' && req.query.track ? req.query.track : 'all') as (typeof TRACKS)[number];
  if (!TRACKS.includes(track)) throw badRequest('track must be hardware, classical or all', [{ path: '/query/track', message: `unknown track "${track}"` }]);
  let asOf: Date | undefined;
  if (typeof req.query.asOf === 'string' && req.query.asOf) {
    asOf = new Date(req.query.asOf);
    if (Number.isNaN(asOf.getTime())) throw badRequest('asOf must be a date, e.g. 2026-11-30 or 2026-11-30T12:00:00Z', [{ path: '/query/asOf', message: 'not a date' }]);
  }
  // the private view (sealed references used) for a caller who may see sealed values (queries/visibility.ts)
  const view: 'public' | 'private' = req.query.view === 'private' && seesSealedValues(viewer) ? 'private' : 'public';
  return { metric, track, asOf, view };
}

function send(req: Request, res: Response, body: string | Buffer, etag: string) {
  res.setHeader('ETag', etag);
  res.setHeader('Cache-Control', 'public, max-age=0, must-revalidate');
  if (req.headers['if-none-match'] === etag) { res.status(304).end(); return; }
  res.setHeader('Content-Type', 'application/json; charset=utf-8');
  res.end(body);
}

export function registerStandingsRoutes(routes: RouteTable, ctx: AppContext): void {
  const { db, standingsCache } = ctx;

  routes.add({
    method: 'get', path: '/challenges/:slug/standings', access: 'public', summary: 'Ranked standings (?track=hardware|classical, ?metric=, ?asOf= a past date, ?version=)',
    handler: async (req, res) => {
      // the cache is consulted before any database work: a hit costs no query at all
      const viewer = await viewerOf(db, req.actor);
      const rawKey = `${String(req.params.slug)}|${viewer.kind}|${new URLSearchParams(req.query as Record<string, string>).toString()}`;
      const early = req.query.asOf ? undefined : standingsCache.get(rawKey);
      if (early) return send(req, res, early.body, early.etag);
      const { challenge: c, version: v } = await loadChallengeVersion(db, req);
      const q = parseQuery(req, c.settings as { primaryMetric?: string }, viewer);
      const row = await latestStandings(db, v.id, q.asOf);
      const payload = row?.payload as StandingsPayload | undefined;
      const result = payload ? (q.view === 'private' ? privateView(payload) : payload.public) : undefined;
      const rows = (result?.entries ?? []).filter((e) => q.track === 'all' || e.track === q.track);
      const ranked = rankRows(rows, q.metric, q.track).map(({ row: r, rank, tiedWithPrevious, rankInterval }) => ({ ...r, rank, tiedWithPrevious, rankInterval }));
      const body = JSON.stringify({
        challenge: c.slug, version: v.version, checksum: v.checksum,
        status: row ? (row.scoringRulesVersion === SCORING_RULES_VERSION ? 'ready' : 'rescoring') : q.asOf ? 'none' : 'pending', computedAt: row?.computedAt ?? null, engineVersion: row?.engineVersion ?? null,
        // the rules these numbers were computed under, and where they are written down
        scoringRulesVersion: row?.scoringRulesVersion ?? null, currentScoringRulesVersion: SCORING_RULES_VERSION, rulesPage: '/scoring',
        exactTolerance: result?.exactTolerance ?? EXACT_TOLERANCE, minIndependentTeams: MIN_INDEPENDENT_TEAMS, bootstrapReplicates: result?.bootstrapReplicates ?? null,
        nearCopies: result?.nearCopies ?? [],
        estimator: payload?.estimator ?? null, metric: q.metric, metrics: PRIMARY_METRICS, track: q.track, view: q.view, asOf: q.asOf ?? null,
        counts: result?.counts ?? null,
        entries: ranked,
      } satisfies StandingsResponse);
      const etag = `"${createHash('sha1').update(body).digest('base64url')}"`;
      if (!q.asOf) standingsCache.set(rawKey, body, etag, v.id);
      send(req, res, body, etag);
    },
  });

  routes.add({
    method: 'get', path: '/challenges/:slug/agreement', access: 'public', summary: 'Pairwise degrees of equivalence between entries: for one ?target=, or |d|/U averaged over the targets without exact reference',
    handler: async (req) => {
      const { version: v } = await loadChallengeVersion(db, req);
      const row = await latestStandings(db, v.id);
      const result = (row?.payload as StandingsPayload | undefined)?.public as StandingsResult | undefined;
      const labels = new Map((result?.entries ?? []).map((e) => [e.id, { label: e.label, teamName: e.teamName, track: e.track }]));
      const target = typeof req.query.target === 'string' ? req.query.target : '';
      if (!target) {
        return {
          mode: 'average-unverifiable', computedAt: row?.computedAt ?? null,
          entries: (result?.agreement.entryIds ?? []).map((id) => ({ id, ...labels.get(id) })),
          meanRatio: result?.agreement.meanRatio ?? [], targets: result?.agreement.targets ?? [],
          // standings computed before the field existed have none: zeros of the same shape
          incompatible: result?.agreement.incompatible ?? (result?.agreement.targets ?? []).map((r) => r.map(() => 0)),
        };
      }
      // the public standings' agreement: a house-baseline estimate of a sealed target stays withheld
      const { sealed } = await visibleReferences(db, v.id, PUBLIC_VIEWER, ctx.now());
      const ids = (result?.entries ?? []).filter((e) => !isEstimateWithheld({ isBaseline: e.isBaseline, target }, sealed)).map((e) => e.id);
      const est = ids.length ? await db.select({ entryId: estimates.entryId, value: estimates.value, u: estimates.uncertainty })
        .from(estimates).innerJoin(entries, eq(entries.id, estimates.entryId))
        .innerJoin(organization, eq(organization.id, entries.teamId))
        .where(and(inArray(estimates.entryId, ids), eq(estimates.targetKey, target))) : [];
      const order = ids.filter((id) => est.some((e) => e.entryId === id));
      const ms = order.map((id) => { const e = est.find((x) => x.entryId === id)!; return { value: e.value, uncertainty: e.u }; });
      const pw = pairwiseEquivalence(ms);
      return {
        mode: 'target', target, computedAt: row?.computedAt ?? null,
        entries: order.map((id, i) => ({ id, ...labels.get(id), value: ms[i].value, uncertainty: ms[i].uncertainty })),
        d: pw.d, U: pw.U, ratio: pw.d.map((r, i) => r.map((d, j) => equivalenceRatio(d, pw.U[i][j]))),
        consensus: result?.targets.find((t) => t.key === target) ?? null,
      };
    },
  });
}
