/** Routes of a student's class survey, its attempts, the reviews and the class results. */
import type { Ctx } from '../context';
import type { RouteDef } from '../http/route-table';

export function attemptRoutes(_ctx: Ctx): RouteDef[] {
  return [];
}
