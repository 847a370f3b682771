/**
 * One route table of our own: every API route with its method, path, access and pipeline.
 * Express 5 cannot list mounted sub-routers, so this table is what mounts the routes and what the
 * access-matrix and bad-input specs read. A new route gets a row here (through its resource's
 * `*.routes.ts`) and rows in both spec tables.
 */
import type { Express, RequestHandler } from 'express';
import type { Role } from '../../schema/index';
import type { AuthGuards } from '../auth/guards';

/** Who may call a route: anyone, any signed-in user, or holders of one of the roles. */
export type Access = 'public' | 'signed-in' | readonly Role[];

export type Method = 'get' | 'post' | 'put' | 'patch' | 'delete';

export interface RouteDef {
  method: Method;
  /** Full path as Express sees it, e.g. `/api/admin/users/:userId`. */
  path: string;
  access: Access;
  summary: string;
  /** Runs first: a malformed request is a 400 before any 401/403 (DESIGN.md §4 precedence). */
  validate?: RequestHandler;
  /**
   * `folded`: only for access 'signed-in' — the guard verifies the token without a query and the
   * handler checks the account (active, token version) inside its own statement (req.claims).
   */
  auth?: 'folded';
  /** Extra middleware between the guards and the handler (e.g. a route's own rate limit). */
  before?: RequestHandler[];
  handler: RequestHandler;
}

export function mountRoutes(app: Express, routes: readonly RouteDef[], guards: AuthGuards): void {
  const seen = new Set<string>();
  for (const r of routes) {
    const key = `${r.method.toUpperCase()} ${r.path}`;
    if (seen.has(key)) throw new Error(`Route table: ${key} is listed twice`);
    seen.add(key);
    const pipeline: RequestHandler[] = [];
    if (r.validate) pipeline.push(r.validate);
    if (r.auth === 'folded' && r.access !== 'signed-in') throw new Error(`Route table: ${key} folds the account check, which only a 'signed-in' route may`);
    if (r.access !== 'public') pipeline.push(r.auth === 'folded' ? guards.requireClaims : guards.requireSignIn);
    if (Array.isArray(r.access)) pipeline.push(guards.requireRoles(r.access));
    pipeline.push(...(r.before ?? []), r.handler);
    app[r.method](r.path, ...pipeline);
  }
}
