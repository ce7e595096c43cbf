/**
 * Entry reads shared by the routes, exports and presenters: which entries the public may see and
 * which are listed, and the batched reads behind the entry lists (a fixed number of queries
 * whatever the number of entries).
 */
import { and, asc, eq, inArray, isNull, sql } from 'drizzle-orm';
import type { DbOrTx } from '../db/client';
import { challengeVersions, entries, organization } from '../db/schema';

export type EntryRow = typeof entries.$inferSelect;

/** Entry pages a visitor may open: published, superseded, and withdrawn after publication (hidden ones too, with the reason). */
export function isPublicEntry(e: Pick<EntryRow, 'state' | 'publishedAt'>): boolean {
  return e.state === 'published' || e.state === 'superseded' || (e.state === 'withdrawn' && e.publishedAt !== null);
}

/**
 * Entries the public lists, plots, ranks and exports: published and not hidden by a moderator (a
 * hidden entry keeps its page, with the reason). As a SQL condition, since every reader filters in
 * its query.
 */
export const listedEntry = () => and(eq(entries.state, 'published'), isNull(entries.hiddenReason));

/** Listed entries of a version, with their team's name. */
export async function publicEntries(db: DbOrTx, versionId: string) {
  return db.select({ id: entries.id, label: entries.label, teamId: entries.teamId, teamName: organization.name, track: entries.track, methodFamily: entries.methodFamily, isBaseline: entries.isBaseline, featured: entries.featured, submittedAt: entries.submittedAt, publishedAt: entries.publishedAt, revision: entries.revision, document: entries.document })
    .from(entries).innerJoin(organization, eq(organization.id, entries.teamId))
    .where(and(eq(entries.versionId, versionId), listedEntry())).orderBy(asc(entries.publishedAt));
}

/** What an entry summary needs beyond its row, for many entries at once: 3 queries whatever their number. */
export interface EntryListContext {
  team: Map<string, { id: string; name: string | null; slug: string | null }>;
  version: Map<string, { version: number; checksum: string; targets: number }>;
  /** per entry: number of estimates and the median stated uncertainty (the middle one of the sorted list, upper for an even count) */
  stats: Map<string, { estimates: number; medianUncertainty: number | null }>;
}

export async function entryListContext(db: DbOrTx, rows: readonly EntryRow[]): Promise<EntryListContext> {
  const teamIds = [...new Set(rows.map((e) => e.teamId))];
  const versionIds = [...new Set(rows.map((e) => e.versionId))];
  const entryIds = rows.map((e) => e.id);
  const [teams, versions, stats] = await Promise.all([
    teamIds.length ? db.select({ id: organization.id, name: organization.name, slug: organization.slug }).from(organization).where(inArray(organization.id, teamIds)) : [],
    versionIds.length ? db.select({ id: challengeVersions.id, version: challengeVersions.version, checksum: challengeVersions.checksum, targets: sql<number>`(select count(*)::int from targets t where t.version_id = "challenge_versions"."id")` })
      .from(challengeVersions).where(inArray(challengeVersions.id, versionIds)) : [],
    entryIds.length
      ? (db.execute(sql`select entry_id as "entryId", count(*)::int as n, (array_agg(uncertainty order by uncertainty))[count(*) / 2 + 1] as median
          from estimates where entry_id in (${sql.join(entryIds.map((id) => sql`${id}::uuid`), sql`, `)}) group by entry_id`) as unknown as Promise<{ rows: { entryId: string; n: number; median: number | string | null }[] }>)
      : Promise.resolve({ rows: [] }),
  ]);
  return {
    team: new Map(teams.map((t) => [t.id, t])),
    version: new Map(versions.map((v) => [v.id, { version: v.version, checksum: v.checksum, targets: Number(v.targets) }])),
    stats: new Map(stats.rows.map((r) => [r.entryId, { estimates: Number(r.n), medianUncertainty: r.median === null ? null : Number(r.median) }])),
  };
}

/** Entries of a version for a list: the listed ones, or (moderators) every published one, hidden ones marked. */
export async function versionEntries(db: DbOrTx, versionId: string, withHidden: boolean): Promise<EntryRow[]> {
  return db.select().from(entries).where(and(eq(entries.versionId, versionId), withHidden ? eq(entries.state, 'published') : listedEntry())).orderBy(sql`${entries.publishedAt} desc`);
}
