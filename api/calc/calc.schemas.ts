/** ajv schemas of the public calculation API (stable shapes: later changes only add fields). */
import { COLOURS } from '../domain/colour-code';
import { SERIES_NAMES } from '../domain/preferred-values';
import { COMPONENT_KINDS, METHODS } from '../domain/words';

/** The largest resistance any field takes (1 TΩ): beyond it a value is a typo, not a reading. */
export const MAX_OHMS = 1e12;
const ohmsValue = { type: 'number', minimum: 0, maximum: MAX_OHMS } as const;
const pctBand = {
  type: 'object',
  properties: { lowPct: { type: 'number', minimum: -100, maximum: 0 }, highPct: { type: 'number', minimum: 0, maximum: 10000 } },
  required: ['lowPct', 'highPct'],
  additionalProperties: false,
} as const;

const digitalRange = {
  type: 'object',
  properties: {
    fullScaleOhms: { type: 'number', exclusiveMinimum: 0 },
    resolutionOhms: { type: 'number', exclusiveMinimum: 0 },
    pctOfReading: { type: 'number', minimum: 0, maximum: 100 },
    counts: { type: 'number', minimum: 0, maximum: 100000 },
  },
  required: ['fullScaleOhms', 'resolutionOhms', 'pctOfReading', 'counts'],
  additionalProperties: false,
} as const;
const analogueRange = {
  type: 'object',
  properties: { centreOhms: { type: 'number', exclusiveMinimum: 0 }, arcFraction: { type: 'number', exclusiveMinimum: 0, maximum: 0.5 } },
  required: ['centreOhms', 'arcFraction'],
  additionalProperties: false,
} as const;

export const meterSchema = {
  type: 'object',
  properties: {
    kind: { type: 'string', enum: ['digital', 'analogue'] },
    autorange: { type: 'boolean' },
    leadOhms: { type: 'number', minimum: 0, maximum: 100 },
    ranges: { type: 'array', minItems: 1, maxItems: 20 },
  },
  required: ['kind', 'leadOhms', 'ranges'],
  additionalProperties: false,
  if: { type: 'object', properties: { kind: { type: 'string', const: 'digital' } } },
  then: { type: 'object', properties: { ranges: { type: 'array', items: digitalRange } } },
  else: { type: 'object', properties: { ranges: { type: 'array', items: analogueRange } }, not: { type: 'object', properties: { autorange: { type: 'boolean' } }, required: ['autorange'] } },
} as const;

const rule = {
  type: 'object',
  properties: {
    decision: { type: 'string', enum: ['simple', 'guarded'] },
    nearLimitFraction: { type: 'number', exclusiveMinimum: 0, maximum: 1 },
    bandFrom: { type: 'string', enum: ['template', 'allowance'] },
    allowance: pctBand,
  },
  required: ['decision', 'nearLimitFraction', 'bandFrom'],
  additionalProperties: false,
} as const;

const thresholds = {
  type: 'object',
  properties: {
    shortOhms: { type: 'number', minimum: 0 },
    openOhms: { type: 'number', exclusiveMinimum: 0 },
    residualContactOhms: { type: 'number', minimum: 0 },
    continuityLowPct: { type: 'number', minimum: -100, maximum: 0 },
    continuityHighPct: { type: 'number', minimum: 0 },
  },
  additionalProperties: false,
} as const;

const ohmsOrState = { anyOf: [{ type: 'number', exclusiveMinimum: 0, maximum: MAX_OHMS }, { type: 'string', enum: ['open', 'short'] }] } as const;

export const verdictBody = {
  type: 'object',
  properties: {
    expected: ohmsOrState,
    reading: { anyOf: [{ type: 'string', minLength: 1, maxLength: 64 }, ohmsValue] },
    tolerancePct: { type: 'number', exclusiveMinimum: 0, maximum: 100 },
    band: pctBand,
    critical: pctBand,
    kind: { type: 'string', enum: [...COMPONENT_KINDS] },
    method: { type: 'string', enum: [...METHODS] },
    rangeIndex: { type: 'integer', minimum: 0, maximum: 19 },
    rule,
    meter: meterSchema,
    thresholds,
    serviceDataYear: { type: 'integer', minimum: 1900, maximum: 2100 },
  },
  required: ['expected', 'reading'],
  additionalProperties: false,
} as const;

export const networkBody = {
  type: 'object',
  properties: {
    edges: {
      type: 'array',
      minItems: 1,
      maxItems: 2000,
      items: {
        type: 'object',
        properties: {
          id: { type: 'string', minLength: 1, maxLength: 64 },
          a: { type: 'string', minLength: 1, maxLength: 64 },
          b: { type: 'string', minLength: 1, maxLength: 64 },
          ohms: ohmsValue,
          kind: { type: 'string', enum: [...COMPONENT_KINDS] },
          tolerancePct: { type: 'number', minimum: 0, maximum: 100 },
        },
        required: ['id', 'a', 'b', 'ohms'],
        additionalProperties: false,
      },
    },
    from: { type: 'string', minLength: 1, maxLength: 64 },
    to: { type: 'string', minLength: 1, maxLength: 64 },
    partId: { type: 'string', minLength: 1, maxLength: 64 },
    readingOhms: ohmsValue,
    uncertaintyOhms: ohmsValue,
    meter: meterSchema,
    rangeIndex: { type: 'integer', minimum: 0, maximum: 19 },
    band: pctBand,
  },
  required: ['edges', 'from', 'to'],
  additionalProperties: false,
} as const;

export const parseBody = {
  type: 'object',
  properties: { text: { type: 'string', maxLength: 64 }, serviceDataYear: { type: 'integer', minimum: 1900, maximum: 2100 } },
  required: ['text'],
  additionalProperties: false,
} as const;

const colour = { type: 'string', enum: [...COLOURS] } as const;
export const colourCodeBody = {
  type: 'object',
  oneOf: [
    {
      properties: { bands: { type: 'array', items: colour, minItems: 3, maxItems: 6 } },
      required: ['bands'],
      additionalProperties: false,
    },
    {
      properties: {
        bodyTipDot: {
          type: 'object',
          properties: { body: colour, tip: { anyOf: [colour, { type: 'null' }] }, dot: { anyOf: [colour, { type: 'null' }] }, end: colour },
          required: ['body', 'tip', 'dot', 'end'],
          additionalProperties: false,
        },
      },
      required: ['bodyTipDot'],
      additionalProperties: false,
    },
    {
      properties: {
        ohms: { type: 'number', exclusiveMinimum: 0, maximum: MAX_OHMS },
        bandCount: { type: 'integer', enum: [4, 5] },
        tolerancePct: { type: 'number', exclusiveMinimum: 0, maximum: 100 },
      },
      required: ['ohms', 'bandCount', 'tolerancePct'],
      additionalProperties: false,
    },
  ],
} as const;

export const preferredQuery = {
  type: 'object',
  properties: { ohms: { type: 'number', exclusiveMinimum: 0, maximum: 1e12 }, series: { type: 'string', enum: [...SERIES_NAMES], default: 'E24' } },
  required: ['ohms'],
  additionalProperties: false,
} as const;

export const dissipationBody = {
  type: 'object',
  properties: {
    ohms: { type: 'number', exclusiveMinimum: 0, maximum: MAX_OHMS },
    volts: { type: 'number', minimum: 0, maximum: 100000 },
    amps: { type: 'number', minimum: 0, maximum: 1000 },
    ratedWatts: { type: 'number', exclusiveMinimum: 0, maximum: 1000 },
    ratedVolts: { type: 'number', exclusiveMinimum: 0, maximum: 100000 },
    mainsFactor: { type: 'number', exclusiveMinimum: 0, maximum: 3 },
    role: { anyOf: [{ type: 'string', enum: ['fuse', 'mains-side'] }, { type: 'null' }] },
    kind: { type: 'string', enum: [...COMPONENT_KINDS] },
  },
  required: ['ohms'],
  additionalProperties: false,
} as const;
