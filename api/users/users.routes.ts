import type { JSONSchemaType } from 'ajv';
import { ROLES, type Role } from '../../schema/index';
import { createInvitation } from '../auth/auth.use-cases';
import { listInvitations } from './invitations.repository';
import type { Ctx } from '../context';
import type { RouteDef } from '../http/route-table';
import { email, ID, password, personName, validate, validQuery } from '../http/validate';
import * as users from './users.use-cases';

const roles = { type: 'array', items: { type: 'string', enum: [...ROLES] }, minItems: 1, maxItems: 5, uniqueItems: true } as const;

interface ListQuery {
  q?: string;
  page: number;
  pageSize: number;
}
const listQuery: JSONSchemaType<ListQuery> = {
  type: 'object',
  properties: {
    q: { type: 'string', maxLength: 200, nullable: true },
    page: { type: 'integer', minimum: 1, maximum: 100000, default: 1 },
    pageSize: { type: 'integer', minimum: 1, maximum: 200, default: 25 },
  },
  required: [],
  additionalProperties: false,
};
interface CreateBody {
  email: string;
  name: string;
  roles: Role[];
  password: string;
}
const createBody: JSONSchemaType<CreateBody> = {
  type: 'object',
  properties: { email, name: personName, roles: roles as never, password },
  required: ['email', 'name', 'roles', 'password'],
  additionalProperties: false,
};
interface PatchBody {
  name?: string;
  roles?: Role[];
  active?: boolean;
}
// Optional fields are absent or valid, never null (hence the cast: JSONSchemaType wants nullable).
const patchBody = {
  type: 'object',
  properties: { name: personName, roles, active: { type: 'boolean' } },
  required: [],
  minProperties: 1,
  additionalProperties: false,
} as unknown as JSONSchemaType<PatchBody>;
interface InviteBody {
  email: string;
  name?: string;
  roles: Role[];
}
const inviteBody = {
  type: 'object',
  properties: { email, name: personName, roles },
  required: ['email', 'roles'],
  additionalProperties: false,
} as unknown as JSONSchemaType<InviteBody>;
export function adminRoutes(ctx: Ctx): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/admin/users',
      access: ['admin'],
      summary: 'List users (search, paginated)',
      validate: validate({ query: listQuery }),
      handler: async (req, res) => {
        res.json(await users.listUsers(ctx, validQuery<ListQuery>(req)));
      },
    },
    {
      method: 'post',
      path: '/api/admin/users',
      access: ['admin'],
      summary: 'Create a user with a password',
      validate: validate({ body: createBody }),
      handler: async (req, res) => {
        res.status(201).json(await users.createUser(ctx, req.body as CreateBody));
      },
    },
    {
      method: 'patch',
      path: '/api/admin/users/:userId',
      access: ['admin'],
      summary: 'Rename, change roles, deactivate or reactivate a user',
      validate: validate({ body: patchBody, params: { userId: ID } }),
      handler: async (req, res) => {
        res.json(await users.updateUser(ctx, req.signedIn!, Number(req.params.userId), req.body as PatchBody));
      },
    },
    {
      method: 'get',
      path: '/api/admin/invitations',
      access: ['admin'],
      summary: 'List invitations',
      handler: async (_req, res) => {
        res.json({ items: await listInvitations(ctx.db) });
      },
    },
    {
      method: 'post',
      path: '/api/admin/invitations',
      access: ['admin'],
      summary: 'Invite someone by e-mail (single-use link)',
      validate: validate({ body: inviteBody }),
      handler: async (req, res) => {
        const b = req.body as InviteBody;
        res.status(201).json(await createInvitation(ctx, req.signedIn!, { ...b, email: b.email.trim() }));
      },
    },
  ];
}
