import type { AppContext } from '../context';
import type { RouteTable } from './registry';
import { registerHealthRoutes } from './health';
import { registerMeRoutes } from './me';
import { registerTeamRoutes } from './teams';
import { registerAdminRoutes } from './admin';
import { registerChallengeRoutes } from './challenges';
import { registerEntryRoutes } from './entries';
import { registerOpenApiRoutes } from './openapi';
import { registerStandingsRoutes } from './standings';
import { registerPublicDataRoutes } from './public-data';
import { registerExportRoutes } from './exports';
import { startRevealClock } from '../jobs/reveal-job';
import { registerModerationRoutes } from './moderation';
import { registerAuditRoutes } from './audit';
import { registerScriptRoutes } from './scripts';
import { registerFollowRoutes } from './follows';

export function registerAllRoutes(routes: RouteTable, ctx: AppContext): void {
  registerHealthRoutes(routes, ctx);
  registerMeRoutes(routes, ctx);
  registerTeamRoutes(routes, ctx);
  registerAdminRoutes(routes, ctx);
  registerChallengeRoutes(routes, ctx);
  registerEntryRoutes(routes, ctx);
  registerOpenApiRoutes(routes, ctx);
  registerStandingsRoutes(routes, ctx);
  registerPublicDataRoutes(routes, ctx);
  registerExportRoutes(routes, ctx);
  registerModerationRoutes(routes, ctx);
  registerAuditRoutes(routes, ctx);
  registerScriptRoutes(routes, ctx);
  registerFollowRoutes(routes, ctx);
  startRevealClock(ctx);
}
