/** Public challenge catalogue (the full challenge pages come with the challenge engine). */
import { asc, ne } from 'drizzle-orm';
import type { AppContext } from '../app';
import { challenges } from '../db/schema';
import type { RouteTable } from './registry';

export function registerChallengeRoutes(routes: RouteTable, ctx: AppContext): void {
  routes.add({
    method: 'get', path: '/challenges', access: 'public', summary: 'Published challenges: slug, title, summary, state',
    handler: async () => {
      const rows = await ctx.db.select({ slug: challenges.slug, title: challenges.title, summary: challenges.summary, state: challenges.state, updatedAt: challenges.updatedAt })
        .from(challenges).where(ne(challenges.state, 'draft')).orderBy(asc(challenges.title));
      return { challenges: rows };
    },
  });
}
