import { eq } from 'drizzle-orm';
import type { AppContext } from '../context';
import { member, organization } from '../db/schema';
import type { RouteTable } from './registry';
import { teamTrack } from '../util/team-meta';

export function registerMeRoutes(routes: RouteTable, ctx: AppContext): void {
  routes.add({
    method: 'get', path: '/me', access: 'public', summary: 'The caller: signed-out, a user with their teams, or an API key',
    handler: async (req) => {
      const a = req.actor;
      if (a.kind === 'api-key') return { kind: 'api-key', teamId: a.teamId, keyName: a.keyName };
      if (a.kind !== 'user') return { kind: 'visitor', user: null, teams: [] };
      const teams = await ctx.db
        .select({ id: organization.id, name: organization.name, slug: organization.slug, role: member.role, metadata: organization.metadata })
        .from(member).innerJoin(organization, eq(member.organizationId, organization.id))
        .where(eq(member.userId, a.user.id)).orderBy(organization.name);
      return {
        kind: 'user',
        user: a.user,
        teams: teams.map((t) => ({ id: t.id, name: t.name, slug: t.slug, role: t.role === 'member' ? 'member' : 'lead', track: teamTrack(t.metadata) })),
      };
    },
  });
}
