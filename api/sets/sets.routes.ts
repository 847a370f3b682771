import type { JSONSchemaType } from 'ajv';
import type { Ctx } from '../context';
import { JOB_STATUSES, TUBE_STATUSES, type SetInput } from '../domain/set-format';
import type { RouteDef } from '../http/route-table';
import { ID, validate, validQuery } from '../http/validate';
import { id, line, object, paragraph, setFields, version } from './set-schema';
import * as setsUc from './sets.use-cases';

/** A template socket's key (`so-v1`). */
export const SOCKET_KEY = /^so-[A-Za-z0-9_-]{1,40}$/;

const createBody = object(setFields, ['templateId', 'label']) as unknown as JSONSchemaType<SetInput>;
// A change needs at least one field besides the version.
const patchBody = object({ ...setFields, version }, ['version'], { minProperties: 2 }) as unknown as JSONSchemaType<setsUc.SetPatch>;
const sharingBody = object({ userIds: { type: 'array', maxItems: 100, items: id } }) as unknown as JSONSchemaType<{ userIds: number[] }>;
const tubeRecordBody = object(
  { status: { type: 'string', enum: [...TUBE_STATUSES] }, foundType: line(24), testResult: line(300), note: paragraph(2000) },
  ['status'],
) as unknown as JSONSchemaType<setsUc.TubeRecordInput>;

const listQuery = {
  type: 'object',
  properties: {
    q: { type: 'string', maxLength: 100 },
    status: { type: 'string', enum: [...JOB_STATUSES] },
    page: { type: 'integer', minimum: 1, maximum: 100000, default: 1 },
    pageSize: { type: 'integer', minimum: 1, maximum: 100, default: 25 },
  },
  required: [],
  additionalProperties: false,
} as unknown as JSONSchemaType<setsUc.ListQuery>;

export function setRoutes(ctx: Ctx): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/sets',
      access: 'signed-in',
      summary: 'The sets the caller may see (own, shared with them; admins all): search, status, pages',
      validate: validate({ query: listQuery }),
      handler: async (req, res) => {
        res.json(await setsUc.listSets(ctx, req.signedIn!, validQuery<setsUc.ListQuery>(req)));
      },
    },
    {
      method: 'post',
      path: '/api/sets',
      access: ['admin', 'technician', 'instructor'],
      summary: 'Take in a set: a radio or amplifier following a published template',
      validate: validate({ body: createBody }),
      handler: async (req, res) => {
        res.status(201).json(await setsUc.createSet(ctx, req.signedIn!, req.body as SetInput));
      },
    },
    {
      method: 'get',
      path: '/api/sets/:id',
      access: 'signed-in',
      summary: 'One set: intake, deviations, tube records, sharing, surveys',
      validate: validate({ params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await setsUc.getSet(ctx, req.signedIn!, Number(req.params.id)));
      },
    },
    {
      method: 'patch',
      path: '/api/sets/:id',
      access: 'signed-in',
      summary: 'Change a set (with its version; a stale one is a 409); deviations checked against the template',
      validate: validate({ body: patchBody, params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await setsUc.updateSet(ctx, req.signedIn!, Number(req.params.id), req.body as setsUc.SetPatch));
      },
    },
    {
      method: 'put',
      path: '/api/sets/:id/sharing',
      access: 'signed-in',
      summary: 'Who else sees and edits the set (owner or admin)',
      validate: validate({ body: sharingBody, params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await setsUc.shareSet(ctx, req.signedIn!, Number(req.params.id), req.body as { userIds: number[] }));
      },
    },
    {
      method: 'put',
      path: '/api/sets/:id/tube-records/:socketKey',
      access: 'signed-in',
      summary: "What is in one socket: present, missing, wrong type, replaced; a tube tester's result",
      validate: validate({ body: tubeRecordBody, params: { id: ID, socketKey: SOCKET_KEY } }),
      handler: async (req, res) => {
        res.json(await setsUc.putTubeRecord(ctx, req.signedIn!, Number(req.params.id), String(req.params.socketKey), req.body as setsUc.TubeRecordInput));
      },
    },
  ];
}
