import type { JSONSchemaType } from 'ajv';
import type { Ctx } from '../context';
import { BASE_NAMES, ELECTRODES, HEATING_KINDS } from '../domain/template-format';
import type { RouteDef } from '../http/route-table';
import { validate, validQuery } from '../http/validate';
import { line, paragraph } from '../templates/template-schema';
import * as tubeTypes from './tube-types.use-cases';

/** A designation as typed (any case; stored upper-case): 12BE6, 6sn7gt, 0Z4A. */
export const DESIGNATION_PARAM = /^[A-Za-z0-9][A-Za-z0-9.-]{0,23}$/;
const designation = { type: 'string', pattern: DESIGNATION_PARAM.source } as const;

const record = {
  base: { type: 'string', enum: [...BASE_NAMES] },
  heating: { type: 'string', enum: [...HEATING_KINDS] },
  heaterVolts: { type: 'number', exclusiveMinimum: 0, maximum: 200 },
  heaterAmps: { type: 'number', exclusiveMinimum: 0, maximum: 20 },
  pins: {
    type: 'array',
    minItems: 1,
    maxItems: 14,
    items: {
      type: 'object',
      properties: { pin: { type: 'integer', minimum: 1, maximum: 14 }, electrode: { type: 'string', enum: [...ELECTRODES] }, label: line(60) },
      required: ['pin', 'electrode', 'label'],
      additionalProperties: false,
    },
  },
  ties: { type: 'array', maxItems: 20, items: { type: 'array', items: { type: 'integer', minimum: 1, maximum: 14 }, minItems: 2, maxItems: 2 } },
  notes: paragraph(2000),
} as const;

// Optional fields are absent or valid, never null (hence the casts: JSONSchemaType wants nullable).
const createBody = {
  type: 'object',
  properties: { designation, ...record },
  required: ['designation', 'base', 'heating', 'heaterVolts', 'heaterAmps', 'pins'],
  additionalProperties: false,
} as unknown as JSONSchemaType<tubeTypes.TubeTypeInput & { designation: string }>;
const updateBody = {
  type: 'object',
  properties: record,
  required: ['base', 'heating', 'heaterVolts', 'heaterAmps', 'pins'],
  additionalProperties: false,
} as unknown as JSONSchemaType<tubeTypes.TubeTypeInput>;

interface ListQuery {
  q?: string;
  page: number;
  pageSize: number;
}
const listQuery: JSONSchemaType<ListQuery> = {
  type: 'object',
  properties: {
    q: { type: 'string', maxLength: 40, nullable: true },
    page: { type: 'integer', minimum: 1, maximum: 100000, default: 1 },
    pageSize: { type: 'integer', minimum: 1, maximum: 500, default: 100 },
  },
  required: [],
  additionalProperties: false,
};

export function tubeTypeRoutes(ctx: Ctx): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/tube-types',
      access: 'signed-in',
      summary: 'The tube-type library (search by designation, paginated)',
      validate: validate({ query: listQuery }),
      handler: async (req, res) => {
        res.json(await tubeTypes.listTubeTypes(ctx, req.signedIn!, validQuery<ListQuery>(req)));
      },
    },
    {
      method: 'get',
      path: '/api/tube-types/:designation',
      access: 'signed-in',
      summary: 'One tube type: base, pins, ties, heater',
      validate: validate({ params: { designation: DESIGNATION_PARAM } }),
      handler: async (req, res) => {
        res.json(await tubeTypes.getTubeType(ctx, req.signedIn!, String(req.params.designation)));
      },
    },
    {
      method: 'post',
      path: '/api/tube-types',
      access: ['author', 'admin'],
      summary: 'Add a tube type to the library',
      validate: validate({ body: createBody }),
      handler: async (req, res) => {
        res.status(201).json(await tubeTypes.createTubeType(ctx, req.signedIn!, req.body as tubeTypes.TubeTypeInput & { designation: string }));
      },
    },
    {
      method: 'put',
      path: '/api/tube-types/:designation',
      access: ['author', 'admin'],
      summary: 'Change a tube type (its creator or an admin)',
      validate: validate({ body: updateBody, params: { designation: DESIGNATION_PARAM } }),
      handler: async (req, res) => {
        res.json(await tubeTypes.updateTubeType(ctx, req.signedIn!, String(req.params.designation), req.body as tubeTypes.TubeTypeInput));
      },
    },
  ];
}
