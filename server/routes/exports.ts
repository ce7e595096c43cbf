/**
 * Downloads: CSV and JSON of the standings and of every published estimate, a data package that
 * lists each file with its SHA-256, BibTeX for a challenge and for an entry, and CITATION.cff.
 * Only public data: published entries, unsealed references.
 */
import { createHash } from 'node:crypto';
import type { Request, Response } from 'express';
import { asc, eq, inArray, and } from 'drizzle-orm';
import type { StandingsResult } from '@shared/scoring/standings';
import type { AppContext } from '../context';
import { entries, estimates, organization, references, targets } from '../db/schema';
import { notFound } from '../errors';
import { latestStandings, type StandingsPayload } from '../services/recompute-standings';
import { loadChallengeVersion } from '../queries/challenge-version';
import { publicEntries } from '../queries/entries';
import { PUBLIC_VIEWER, visibleReferences, withoutSealedBaseline } from '../queries/visibility';
import { presentReference } from '../presenters/reference';
import type { RouteTable } from './registry';

/** A CSV cell. Text that a spreadsheet would run as a formula (= + - @, tab, CR) gets a leading '. */
export function csvCell(v: unknown): string {
  if (v === null || v === undefined) return '';
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : '';
  let s = typeof v === 'string' ? v : JSON.stringify(v);
  if (/^[=+\-@\t\r]/.test(s)) s = `'${s}`;
  return /[",\n\r]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}
export const csv = (header: string[], rows: unknown[][]) => [header, ...rows].map((r) => r.map(csvCell).join(',')).join('\r\n') + '\r\n';

/** BibTeX-safe text: braces balanced away, special characters escaped. */
export function bibText(s: string): string {
  return s.replace(/[\\{}]/g, '').replace(/([&%$#_])/g, '\\$1').replace(/~/g, '\\textasciitilde{}').replace(/\^/g, '\\textasciicircum{}').replace(/[\r\n]+/g, ' ');
}
const yaml = (s: string) => JSON.stringify(s); // a JSON string is a valid YAML double-quoted scalar

async function challengeData(ctx: AppContext, req: Request) {
  const { challenge: c, version: v } = await loadChallengeVersion(ctx.db, req);
  const es = await publicEntries(ctx.db, v.id);
  const st = await latestStandings(ctx.db, v.id);
  const result = (st?.payload as StandingsPayload | undefined)?.public as StandingsResult | undefined;
  const refs = await ctx.db.select({ key: targets.key, ref: references }).from(targets).leftJoin(references, eq(references.targetId, targets.id)).where(eq(targets.versionId, v.id)).orderBy(asc(targets.key));
  const now = ctx.now();
  // exports are public files whoever downloads them (the package's hashes must not depend on the caller)
  const refOf = new Map(refs.map((r) => [r.key, presentReference(r.ref, now, PUBLIC_VIEWER)]));
  const est = es.length ? await ctx.db.select({ entryId: estimates.entryId, target: estimates.targetKey, value: estimates.value, uncertainty: estimates.uncertainty, kind: estimates.kind })
    .from(estimates).where(inArray(estimates.entryId, es.map((e) => e.id))).orderBy(asc(estimates.targetKey)) : [];
  const license = (c.settings as { license?: string }).license ?? 'CC-BY-4.0';
  const { sealed } = await visibleReferences(ctx.db, v.id, PUBLIC_VIEWER, now);
  const visible = withoutSealedBaseline(est, new Set(es.filter((e) => e.isBaseline).map((e) => e.id)), sealed);
  return { c, v, es, result, st, refOf, est: visible, license };
}

function standingsCsv(d: Awaited<ReturnType<typeof challengeData>>) {
  return csv(
    ['rank', 'entry_id', 'label', 'team', 'track', 'method_family', 'house_baseline', 'rmse_verifiable', 'max_error_verifiable', 'mean_z2_verifiable', 'fraction_covered_verifiable', 'agreement_median_d_over_U', 'targets_outside_interval', 'grid_coverage', 'cost_hours', 'submitted_at'],
    (d.result?.entries ?? []).map((e) => [e.rank, e.id, e.label, e.teamName, e.track, e.methodFamily, e.isBaseline, e.metrics.rmseVerifiable, e.metrics.maxErrorVerifiable, e.metrics.meanZ2Verifiable, e.metrics.coveredVerifiable, e.metrics.agreementMedianRatio, e.metrics.outsideInterval, e.metrics.gridCoverage, e.metrics.costHours, e.submittedAt]),
  );
}

function estimatesCsv(d: Awaited<ReturnType<typeof challengeData>>) {
  const byId = new Map(d.es.map((e) => [e.id, e]));
  const cons = new Map((d.result?.targets ?? []).map((t) => [t.key, t]));
  return csv(
    ['target', 'entry_id', 'label', 'team', 'track', 'value', 'uncertainty', 'uncertainty_kind', 'reference', 'reference_method', 'consensus', 'consensus_uncertainty'],
    d.est.map((x) => {
      const e = byId.get(x.entryId)!;
      const r = d.refOf.get(x.target);
      const k = cons.get(x.target);
      return [x.target, x.entryId, e.label, e.teamName, e.track, x.value, x.uncertainty, x.kind, r?.status === 'exact' ? r.value : null, r?.status === 'exact' ? r.method : r?.status ?? null, k?.value ?? null, k?.uncertainty ?? null];
    }),
  );
}

function challengeJson(d: Awaited<ReturnType<typeof challengeData>>) {
  return JSON.stringify({
    challenge: d.c.slug, version: d.v.version, checksum: d.v.checksum, license: d.license, standingsComputedAt: d.st?.computedAt ?? null, engineVersion: d.st?.engineVersion ?? null,
    standings: d.result?.entries ?? [],
    targets: [...d.refOf.entries()].map(([key, reference]) => ({ key, reference, consensus: d.result?.targets.find((t) => t.key === key) ?? null })),
    estimates: d.est,
  }, null, 1);
}

function challengeBib(d: Awaited<ReturnType<typeof challengeData>>, baseUrl: string) {
  const year = (d.v.publishedAt ?? d.v.createdAt).getUTCFullYear();
  return `@misc{parallax-${d.c.slug}-v${d.v.version},\n  title        = {{${bibText(d.c.title)}}},\n  author       = {{Parallax moderators}},\n  year         = {${year}},\n  howpublished = {\\url{${baseUrl}/challenges/${d.c.slug}}},\n  note         = {Parallax challenge ${bibText(d.c.slug)}, version ${d.v.version}, SHA-256 ${d.v.checksum}. Data licence ${bibText(d.license)}.}\n}\n`;
}

function citationCff(d: Awaited<ReturnType<typeof challengeData>>, baseUrl: string) {
  const date = (d.v.publishedAt ?? d.v.createdAt).toISOString().slice(0, 10);
  return [
    'cff-version: 1.2.0',
    'message: "If you use this challenge or its data, please cite it as below."',
    'type: dataset',
    `title: ${yaml(d.c.title)}`,
    `version: "${d.v.version}"`,
    `date-released: "${date}"`,
    `url: ${yaml(`${baseUrl}/challenges/${d.c.slug}`)}`,
    `license: ${yaml(d.license)}`,
    'authors:',
    '  - name: "Parallax moderators"',
    'identifiers:',
    '  - type: other',
    `    value: ${yaml(`sha256:${d.v.checksum}`)}`,
    `    description: "SHA-256 of the canonical challenge specification"`,
    '',
  ].join('\n');
}

const sha = (s: string) => createHash('sha256').update(s).digest('hex');

function download(res: Response, type: string, name: string, body: string) {
  res.setHeader('Content-Disposition', `attachment; filename="${name}"`);
  res.type(type).send(body);
}

export function registerExportRoutes(routes: RouteTable, ctx: AppContext): void {
  const base = ctx.config.baseUrl;
  routes.add({
    method: 'get', path: '/challenges/:slug/export.csv', access: 'public', summary: 'CSV of every published estimate (?table=standings for the standings)',
    handler: async (req, res) => {
      const d = await challengeData(ctx, req);
      const standings = req.query.table === 'standings';
      download(res, 'text/csv', `${d.c.slug}-v${d.v.version}-${standings ? 'standings' : 'estimates'}.csv`, standings ? standingsCsv(d) : estimatesCsv(d));
    },
  });
  routes.add({
    method: 'get', path: '/challenges/:slug/export.json', access: 'public', summary: 'JSON of the standings, targets (references, consensus) and every published estimate',
    handler: async (req, res) => {
      const d = await challengeData(ctx, req);
      download(res, 'application/json', `${d.c.slug}-v${d.v.version}.json`, challengeJson(d));
    },
  });
  routes.add({
    method: 'get', path: '/challenges/:slug/package.json', access: 'public', summary: 'A data package: every export file of the challenge with its size and SHA-256',
    handler: async (req) => {
      const d = await challengeData(ctx, req);
      const files: [string, string, string, string][] = [
        ['spec', `/api/challenges/${d.c.slug}/spec.json?version=${d.v.version}`, 'application/json', JSON.stringify(d.v.spec, null, 2)],
        ['standings-csv', `/api/challenges/${d.c.slug}/export.csv?table=standings&version=${d.v.version}`, 'text/csv', standingsCsv(d)],
        ['estimates-csv', `/api/challenges/${d.c.slug}/export.csv?version=${d.v.version}`, 'text/csv', estimatesCsv(d)],
        ['data-json', `/api/challenges/${d.c.slug}/export.json?version=${d.v.version}`, 'application/json', challengeJson(d)],
        ['citation-bib', `/api/challenges/${d.c.slug}/cite.bib?version=${d.v.version}`, 'application/x-bibtex', challengeBib(d, base)],
        ['citation-cff', `/api/challenges/${d.c.slug}/CITATION.cff?version=${d.v.version}`, 'application/x-yaml', citationCff(d, base)],
      ];
      return {
        name: `parallax-${d.c.slug}-v${d.v.version}`, title: d.c.title, version: d.v.version, challengeChecksum: `sha256:${d.v.checksum}`, license: d.license,
        created: ctx.now().toISOString(), standingsComputedAt: d.st?.computedAt ?? null,
        resources: files.map(([name, path, mediatype, body]) => ({ name, path: `${base}${path}`, mediatype, bytes: Buffer.byteLength(body), hash: `sha256:${sha(body)}` })),
      };
    },
  });
  routes.add({
    method: 'get', path: '/challenges/:slug/cite.bib', access: 'public', summary: 'BibTeX for a challenge version',
    handler: async (req, res) => {
      const d = await challengeData(ctx, req);
      download(res, 'application/x-bibtex', `${d.c.slug}-v${d.v.version}.bib`, challengeBib(d, base));
    },
  });
  routes.add({
    method: 'get', path: '/challenges/:slug/CITATION.cff', access: 'public', summary: 'CITATION.cff for a challenge version',
    handler: async (req, res) => {
      const d = await challengeData(ctx, req);
      download(res, 'application/x-yaml', 'CITATION.cff', citationCff(d, base));
    },
  });
  routes.add({
    method: 'get', path: '/entries/:entryId/cite.bib', access: 'public', summary: 'BibTeX for a published entry',
    handler: async (req, res) => {
      const id = String(req.params.entryId);
      if (!/^[0-9a-f-]{36}$/i.test(id)) throw notFound('The entry');
      const [e] = await ctx.db.select({ e: entries, team: organization.name }).from(entries).innerJoin(organization, eq(organization.id, entries.teamId))
        .where(and(eq(entries.id, id), inArray(entries.state, ['published', 'superseded']))).limit(1);
      if (!e) throw notFound('The entry');
      const year = (e.e.publishedAt ?? e.e.createdAt).getUTCFullYear();
      const doi = (e.e.document as { links?: { doi?: string } }).links?.doi;
      download(res, 'application/x-bibtex', `entry-${id.slice(0, 8)}.bib`,
        `@misc{parallax-entry-${id.slice(0, 8)},\n  title        = {{${bibText(e.e.label)}}},\n  author       = {{${bibText(e.team)}}},\n  year         = {${year}},\n  howpublished = {\\url{${base}/entries/${id}}},\n  note         = {Entry to the Parallax challenge ${bibText(e.e.challengeSlug)} (revision ${e.e.revision}).}${doi ? `,\n  doi          = {${bibText(doi)}}` : ''}\n}\n`);
    },
  });
}
