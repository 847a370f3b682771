/**
 * The bad-input spec's route description (spec/api/bad-input.spec.ts). Resource files under
 * spec/api/rows/ add their own write routes with these.
 */
import { userSession, type Session } from './api-env';

export type Body = Record<string, unknown>;
export interface WriteRoute {
  method: 'post' | 'put' | 'patch';
  path: () => Promise<string>;
  valid: () => Promise<Body>;
  auth: 'none' | 'admin';
  /** Fields the route may go without. */
  optional?: string[];
  /** The caller who owns the object the route writes (their headers replace `auth`'s); called before `valid` and `path`. */
  caller?: () => Promise<Session>;
  /** Generated cases that are valid for this route (e.g. `stageKey as null`: null means "none"), left out. */
  accepts?: string[];
}

/**
 * A route that writes an object of its caller's own (a template): `caller` makes the owner,
 * `build` the object and the valid body, `path` the address; they share the row's state.
 */
export function owned(
  method: WriteRoute['method'],
  build: (owner: Session) => Promise<{ path: string; body: Body }>,
  optional?: string[],
  accepts?: string[],
  roles: Parameters<typeof userSession>[0] = ['author'],
): WriteRoute {
  let owner: Session;
  let built: { path: string; body: Body };
  return {
    method,
    auth: 'none',
    optional,
    accepts,
    caller: async () => (owner = await userSession(roles)),
    valid: async () => (built = await build(owner)).body,
    path: async () => built.path,
  };
}
