import type { AppContext } from '../app';
import type { RouteTable } from './registry';
import { registerHealthRoutes } from './health';
import { registerMeRoutes } from './me';
import { registerTeamRoutes } from './teams';
import { registerAdminRoutes } from './admin';
import { registerChallengeRoutes } from './challenges';

export function registerAllRoutes(routes: RouteTable, ctx: AppContext): void {
  registerHealthRoutes(routes, ctx);
  registerMeRoutes(routes, ctx);
  registerTeamRoutes(routes, ctx);
  registerAdminRoutes(routes, ctx);
  registerChallengeRoutes(routes, ctx);
}
