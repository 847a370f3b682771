import type { JSONSchemaType } from 'ajv';
import type { Ctx } from '../context';
import type { RouteDef } from '../http/route-table';
import { validate } from '../http/validate';
import { getSettings, updateSettings, type InstanceSettings } from './settings.use-cases';

const settingsBody: JSONSchemaType<InstanceSettings> = {
  type: 'object',
  properties: { openSignUp: { type: 'boolean' } },
  required: ['openSignUp'],
  additionalProperties: false,
};

export function settingsRoutes(ctx: Ctx): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/admin/settings',
      access: ['admin'],
      summary: 'Instance settings',
      handler: async (_req, res) => {
        res.json(await getSettings(ctx.db));
      },
    },
    {
      method: 'put',
      path: '/api/admin/settings',
      access: ['admin'],
      summary: 'Change instance settings',
      validate: validate({ body: settingsBody }),
      handler: async (req, res) => {
        res.json(await updateSettings(ctx.db, req.body as InstanceSettings, req.signedIn!.id));
      },
    },
    {
      method: 'get',
      path: '/api/settings/public',
      access: 'public',
      summary: 'Settings the sign-in screens need (open sign-up)',
      handler: async (_req, res) => {
        const s = await getSettings(ctx.db);
        res.json({ openSignUp: s.openSignUp });
      },
    },
  ];
}
