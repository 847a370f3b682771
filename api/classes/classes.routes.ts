/** Routes of classes, students, invitations, assignments, competencies and notifications. */
import type { Ctx } from '../context';
import type { RouteDef } from '../http/route-table';

export function classRoutes(_ctx: Ctx): RouteDef[] {
  return [];
}
