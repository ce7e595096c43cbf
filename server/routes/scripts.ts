/**
 * For scripts and notebooks: a sample entry file per challenge (every target key, the current
 * version and checksum, valid against schemas/entry.schema.json), the exact bytes the checksum is
 * the SHA-256 of, and an entry's document as a download.
 */
import { eq } from 'drizzle-orm';
import type { AppContext } from '../context';
import { targets } from '../db/schema';
import { badRequest, notFound } from '../errors';
import { canonicalJson } from '@shared/physics/challenge';
import { CHECKSUM_RECIPE } from '@shared/physics/checksum-recipe';
import { entryDocument, isPublicEntry } from '../presenters/entry';
import { loadChallengeVersion } from '../queries/challenge-version';
import { entryAccess } from '../queries/entry-access';
import type { RouteTable } from './registry';
import { viewerOf, visibleReferences } from '../queries/visibility';

const byKey = (a: string, b: string) => a.localeCompare(b, 'en', { numeric: true });

export function registerScriptRoutes(routes: RouteTable, ctx: AppContext): void {
  const { db } = ctx;
  const { loadEntry, privileged } = entryAccess(db);

  routes.add({
    method: 'get', path: '/challenges/:slug/sample-entry.json', access: 'public',
    summary: 'A sample entry file for the current (or ?version=N) version: every target key with value 0 and uncertainty 1 to be replaced, the version and checksum filled in; ?track=hardware|classical. It passes the dry run unchanged',
    handler: async (req, res) => {
      const { version: v } = await loadChallengeVersion(db, req);
      const track = req.query.track === undefined ? 'classical' : String(req.query.track);
      if (track !== 'classical' && track !== 'hardware') throw badRequest('track must be "hardware" or "classical", e.g. ?track=hardware', [{ path: '/track', message: `"${track}" is not a track` }]);
      const keys = (await db.select({ key: targets.key }).from(targets).where(eq(targets.versionId, v.id))).map((t) => t.key).sort(byKey);
      const doc = {
        challenge: { id: v.challengeSlug, version: v.version, checksum: `sha256:${v.checksum}` },
        track,
        label: 'Sample entry: replace this label and every value',
        method: {
          family: track === 'hardware' ? 'error-mitigated-hardware' : 'other',
          description: 'Describe the method here. Each estimate below is a placeholder (value 0, uncertainty 1): replace them with your values and standard uncertainties (1 sigma).',
          settings: {},
        },
        resources: {},
        license: 'CC-BY-4.0',
        estimates: keys.map((target) => ({ target, value: 0, uncertainty: 1, uncertaintyKind: 'statistical' })),
      };
      res.setHeader('Content-Disposition', `attachment; filename="${v.challengeSlug}-v${v.version}-sample-entry.json"`);
      res.type('application/json').send(JSON.stringify(doc, null, 2) + '\n');
    },
  });

  routes.add({
    method: 'get', path: '/challenges/:slug/spec.canonical.json', access: 'public',
    summary: `The canonical serialisation of a version's spec: sha256sum of this download equals the checksum. The checksum is the ${CHECKSUM_RECIPE}`,
    handler: async (req, res) => {
      const { version: v } = await loadChallengeVersion(db, req);
      const { $schema: _drop, ...rest } = v.spec as Record<string, unknown>;
      void _drop;
      res.setHeader('X-Parallax-Checksum', `sha256:${v.checksum}`);
      res.setHeader('Content-Disposition', `attachment; filename="${v.challengeSlug}-v${v.version}.canonical.json"`);
      res.type('application/json').send(Buffer.from(canonicalJson(rest), 'utf8'));
    },
  });

  routes.add({
    method: 'get', path: '/entries/:entryId/entry.json', access: 'public',
    summary: "An entry's document as a file, as it was submitted (metadata and estimates in their order); who may read it as for GET /entries/{entryId}",
    handler: async (req, res) => {
      const e = await loadEntry(req);
      if (!isPublicEntry(e) && !(await privileged(req, e.teamId))) throw notFound('The entry');
      // the one sealed rule (queries/visibility.ts): the house baseline's estimates of sealed targets are withheld
      const refs = await visibleReferences(db, e.versionId, await viewerOf(db, req.actor), ctx.now());
      const { withheld, ...doc } = await entryDocument(db, e, refs.sealed);
      if (withheld) res.setHeader('X-Parallax-Withheld-Estimates', String(withheld));
      res.setHeader('Content-Disposition', `attachment; filename="entry-${e.id}.json"`);
      res.type('application/json').send(JSON.stringify(doc, null, 2) + '\n');
    },
  });
}
