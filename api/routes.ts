/** The API's route table, assembled from each resource's rows. */
import { attemptRoutes } from './attempts/attempts.routes';
import { authRoutes } from './auth/auth.routes';
import { classRoutes } from './classes/classes.routes';
import { calcRoutes } from './calc/calc.routes';
import type { Ctx } from './context';
import { fileRoutes } from './files/files.routes';
import { healthRoutes } from './health/health.routes';
import { meterProfileRoutes } from './meter-profiles/meter-profiles.routes';
import type { RouteDef } from './http/route-table';
import { recordRoutes } from './records/records.routes';
import { setFileRoutes } from './set-files/set-files.routes';
import { setRoutes } from './sets/sets.routes';
import { settingsRoutes } from './settings/settings.routes';
import { surveyRoutes } from './surveys/surveys.routes';
import { templateRoutes } from './templates/templates.routes';
import { tubeTypeRoutes } from './tube-types/tube-types.routes';
import { adminRoutes } from './users/users.routes';
import type pg from 'pg';

export function buildRouteTable(ctx: Ctx, pool: pg.Pool): RouteDef[] {
  return [...healthRoutes(pool), ...authRoutes(ctx), ...adminRoutes(ctx), ...settingsRoutes(ctx), ...calcRoutes(ctx.config), ...tubeTypeRoutes(ctx), ...templateRoutes(ctx), ...fileRoutes(ctx), ...meterProfileRoutes(ctx), ...setRoutes(ctx), ...setFileRoutes(ctx), ...surveyRoutes(ctx), ...recordRoutes(ctx), ...classRoutes(ctx), ...attemptRoutes(ctx)];
}
