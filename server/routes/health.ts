import type { AppContext } from '../context';
import { migrationCount, migrationLevel } from '../db/migrate';
import type { RouteTable } from './registry';

export function registerHealthRoutes(routes: RouteTable, ctx: AppContext): void {
  routes.add({
    method: 'get', path: '/health', access: 'public', summary: 'Liveness, database kind and migration level',
    handler: async () => ({
      status: 'ok',
      database: ctx.database.kind,
      migrations: { applied: await migrationLevel(ctx.database), known: migrationCount() },
      time: ctx.now().toISOString(),
    }),
  });
}
