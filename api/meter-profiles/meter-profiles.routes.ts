import type { JSONSchemaType } from 'ajv';
import type { Ctx } from '../context';
import type { RouteDef } from '../http/route-table';
import { ID, validate, validQuery } from '../http/validate';
import { meterProfileFields, object, version } from '../sets/set-schema';
import * as meters from './meter-profiles.use-cases';

const SIGNED_IN_USERS = 'signed-in' as const;

const createBody = object(meterProfileFields, ['name', 'profile']) as unknown as JSONSchemaType<meters.MeterProfileInput>;
const updateBody = object({ ...meterProfileFields, version, archived: { type: 'boolean' } }, ['name', 'profile', 'version']) as unknown as JSONSchemaType<meters.MeterProfileUpdate>;

interface ListQuery {
  archived?: boolean;
}
const listQuery = { type: 'object', properties: { archived: { type: 'boolean' } }, required: [], additionalProperties: false } as unknown as JSONSchemaType<ListQuery>;

export function meterProfileRoutes(ctx: Ctx): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/meter-profiles',
      access: SIGNED_IN_USERS,
      summary: "The caller's meter profiles (?archived=true includes archived ones)",
      validate: validate({ query: listQuery }),
      handler: async (req, res) => {
        res.json(await meters.listProfiles(ctx, req.signedIn!, validQuery<ListQuery>(req)));
      },
    },
    {
      method: 'post',
      path: '/api/meter-profiles',
      access: SIGNED_IN_USERS,
      summary: 'Add a meter profile',
      validate: validate({ body: createBody }),
      handler: async (req, res) => {
        res.status(201).json(await meters.createProfile(ctx, req.signedIn!, req.body as meters.MeterProfileInput));
      },
    },
    {
      method: 'get',
      path: '/api/meter-profiles/:id',
      access: SIGNED_IN_USERS,
      summary: 'One of the caller\'s meter profiles',
      validate: validate({ params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await meters.getProfile(ctx, req.signedIn!, Number(req.params.id)));
      },
    },
    {
      method: 'put',
      path: '/api/meter-profiles/:id',
      access: SIGNED_IN_USERS,
      summary: 'Change a meter profile (with its version; a stale one is a 409)',
      validate: validate({ body: updateBody, params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await meters.updateProfile(ctx, req.signedIn!, Number(req.params.id), req.body as meters.MeterProfileUpdate));
      },
    },
    {
      method: 'delete',
      path: '/api/meter-profiles/:id',
      access: SIGNED_IN_USERS,
      summary: 'Archive a meter profile (kept for the surveys that used it)',
      validate: validate({ params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await meters.archiveProfile(ctx, req.signedIn!, Number(req.params.id)));
      },
    },
  ];
}
