/**
 * The access matrix's vocabulary (spec/api/access-matrix.spec.ts): callers, expected answers and
 * the common rows. Resource files under spec/api/rows/ add their own rows with these.
 */
import type request from 'supertest';
import type { Role } from '../../schema/index';

export type Caller = 'anonymous' | Role;
export const CALLERS: Caller[] = ['anonymous', 'admin', 'author', 'technician', 'instructor', 'student'];
export type Plain = 'ok' | 401 | 403 | 404;
/**
 * Object-level access: the answer when the object (a template, a tube type) is the caller's own,
 * and when it is someone else's (a private one, for templates). The request is sent twice.
 */
export interface Owned {
  own: Plain;
  others: Plain;
}
export type Expect = Plain | Owned;
export const flat = (e: Expect): Plain[] => (typeof e === 'object' ? [e.own, e.others] : [e]);
export const show = (e: Expect) => (typeof e === 'object' ? `own ${e.own}/others ${e.others}` : String(e));

export const ALL_OK: Record<Caller, Expect> = { anonymous: 'ok', admin: 'ok', author: 'ok', technician: 'ok', instructor: 'ok', student: 'ok' };
export const SIGNED_IN: Record<Caller, Expect> = { ...ALL_OK, anonymous: 401 };
export const ADMIN_ONLY: Record<Caller, Expect> = { anonymous: 401, admin: 'ok', author: 403, technician: 403, instructor: 403, student: 403 };
export const AUTHOR_ADMIN: Record<Caller, Expect> = { anonymous: 401, admin: 'ok', author: 'ok', technician: 403, instructor: 403, student: 403 };
/** Reads of a template (and copies, corrections): the owner and admins; someone else's private one is a 404. */
export const SEE_TEMPLATE: Record<Caller, Expect> = {
  anonymous: 401,
  admin: { own: 'ok', others: 'ok' },
  author: { own: 'ok', others: 404 },
  technician: { own: 'ok', others: 404 },
  instructor: { own: 'ok', others: 404 },
  student: { own: 'ok', others: 404 },
};
/** The owner's writes (draft, publish, retire, sharing, decisions): an admin can see but may not (403). */
export const OWNER_WRITES: Record<Caller, Expect> = { ...SEE_TEMPLATE, admin: { own: 'ok', others: 403 } };


type Agent = ReturnType<typeof request>;
/**
 * Sends a valid request for the route (fresh data each time) with the caller's headers. `ownerId`
 * (object-level rows) is whose object to build: the caller's for `own`, another user's for
 * `others`; absent, the object belongs to a fresh user.
 */
export type MatrixRequest = (a: Agent, h: Record<string, string>, ownerId?: number) => Promise<request.Response>;
