/** JSON-schema pieces of the records routes (gates, bring-up, parts record, marks, labels, reports). */
import type { JSONSchemaType } from 'ajv';
import { GATE_ITEM_KEYS } from '../domain/gates';
import { SERIES_NAMES } from '../domain/preferred-values';
import { RECAP_POLICIES } from '../domain/replacement-list';
import { BRING_UP_OBSERVATIONS, BRING_UP_STEPS, PARTS_ACTIONS } from '../domain/set-format';
import { bigId, id, key, line, object, paragraph } from '../sets/set-schema';

export const ITEM_KEY_PARAM = new RegExp(`^(${GATE_ITEM_KEYS.join('|')})$`);
export const COMPONENT_KEY_PARAM = /^c-[A-Za-z0-9_-]{1,40}$/;
export const TOKEN_PARAM = /^[A-Za-z0-9_-]{20,100}$/;

const note = paragraph(2000);
const none = <T>(s: unknown) => s as JSONSchemaType<T>;

/** Sign a gate item or record first power: a note (may be empty). */
export const noteBody = none<{ note: string }>(object({ note }));
/** Re-open a gate item: why (required). */
export const reasonBody = none<{ note: string }>(object({ note: { ...paragraph(2000), minLength: 1 } }));

export const bringUpBody = none<{ step: string }>(
  object(
    {
      step: { type: 'string', enum: [...BRING_UP_STEPS] },
      setting: line(120),
      mainsVolts: { type: ['number', 'null'], minimum: 0, maximum: 300 },
      currentAmps: { type: ['number', 'null'], minimum: 0, maximum: 20 },
      bPlus: { type: 'array', maxItems: 20, items: object({ node: line(40, 1), volts: { type: 'number', minimum: -1000, maximum: 1000 } }) },
      observations: { type: 'array', maxItems: BRING_UP_OBSERVATIONS.length, uniqueItems: true, items: { type: 'string', enum: [...BRING_UP_OBSERVATIONS] } },
      note,
    },
    ['step'],
  ),
);

export const partsLineBody = none<{ componentKey: string }>(
  object(
    {
      componentKey: key('c'),
      action: { type: 'string', enum: [...PARTS_ACTIONS] },
      newPart: {
        type: ['object', 'null'],
        properties: {
          text: line(40, 1),
          uF: { type: ['number', 'null'], exclusiveMinimum: 0, maximum: 1e6 },
          watts: { type: ['number', 'null'], exclusiveMinimum: 0, maximum: 1000 },
          volts: { type: ['number', 'null'], exclusiveMinimum: 0, maximum: 100000 },
          kind: line(60),
          measuredText: line(40),
        },
        required: ['text'],
        additionalProperties: false,
      },
      readingId: { ...bigId, type: ['integer', 'null'] },
      reason: line(300),
      note,
    },
    ['componentKey', 'action'],
  ),
);

export const marksBody = none<{ ordered: boolean; received: boolean }>(object({ ordered: { type: 'boolean' }, received: { type: 'boolean' } }));

export interface ReplacementsQuery {
  surveyId?: number;
  series: (typeof SERIES_NAMES)[number];
  recap: (typeof RECAP_POLICIES)[number];
  mainsFactor: number;
  format: 'json' | 'csv';
}
export const replacementsQuery = none<ReplacementsQuery>({
  type: 'object',
  properties: {
    surveyId: { ...id, nullable: true },
    series: { type: 'string', enum: [...SERIES_NAMES], default: 'E24' },
    recap: { type: 'string', enum: [...RECAP_POLICIES], default: 'standard' },
    mainsFactor: { type: 'number', minimum: 0.5, maximum: 2, default: 1 },
    format: { type: 'string', enum: ['json', 'csv'], default: 'json' },
  },
  required: [],
  additionalProperties: false,
});

export interface CompareQuery {
  a: number;
  b: number;
}
export const compareQuery = none<CompareQuery>({ type: 'object', properties: { a: id, b: id }, required: ['a', 'b'], additionalProperties: false });

export const formatQuery = none<{ format: 'json' | 'csv' }>({
  type: 'object',
  properties: { format: { type: 'string', enum: ['json', 'csv'], default: 'json' } },
  required: [],
  additionalProperties: false,
});

export const emptyQuery = none<Record<string, never>>({ type: 'object', properties: {}, required: [], additionalProperties: false });
