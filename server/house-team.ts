/**
 * The house team. Its row is created by the schema (migration 0005 inserts it), never by a job, so no
 * user can take its slug before the first baseline runs; services/team-rules.ts reserves its name and
 * slug. A module of its own so that the team rules need not import the baseline job.
 */
export const HOUSE_TEAM = { id: 'parallax-house', name: 'Parallax house baseline', slug: 'parallax-house' };
