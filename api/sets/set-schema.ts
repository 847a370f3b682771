/** JSON-schema pieces of the bench's requests (sets, meter profiles, surveys, readings). */
import { line, MAX_OHMS, paragraph } from '../templates/template-schema';
import { DEVIATION_KINDS, JOB_STATUSES, METER_CHECK_KINDS, RESTORATION_LEVELS } from '../domain/set-format';
import { DECISION_RULES, METHODS, READING_STATES, SURVEY_PURPOSES } from '../domain/words';

export { line, paragraph };

export const key = (prefix: string) => ({ type: 'string', pattern: `^${prefix}-[A-Za-z0-9_-]{1,40}$` }) as const;
export const id = { type: 'integer', minimum: 1, maximum: 2147483647 } as const;
export const bigId = { type: 'integer', minimum: 1, maximum: 9007199254740991 } as const;
export const version = { type: 'integer', minimum: 1, maximum: 2147483647 } as const;
const ohms = { type: 'number', exclusiveMinimum: 0, maximum: MAX_OHMS } as const;

export const object = (properties: Record<string, unknown>, required: string[] = Object.keys(properties), extra: Record<string, unknown> = {}) => ({
  type: 'object',
  properties,
  required,
  additionalProperties: false,
  ...extra,
});

/** A meter profile (api/domain/meter.ts MeterProfile); the domain's meterProblems checks the rest. */
export const meterProfile = object(
  {
    kind: { type: 'string', enum: ['digital', 'analogue'] },
    autorange: { type: 'boolean' },
    leadOhms: { type: 'number', minimum: 0, maximum: 1000 },
    ranges: {
      type: 'array',
      minItems: 1,
      maxItems: 16,
      items: object(
        {
          fullScaleOhms: ohms,
          resolutionOhms: ohms,
          pctOfReading: { type: 'number', minimum: 0, maximum: 100 },
          counts: { type: 'integer', minimum: 0, maximum: 1000 },
          centreOhms: ohms,
          arcFraction: { type: 'number', exclusiveMinimum: 0, exclusiveMaximum: 0.5 },
        },
        [],
      ),
    },
  },
  ['kind', 'leadOhms', 'ranges'],
);

export const meterProfileFields = {
  name: line(80, 1),
  profile: meterProfile,
  checkKind: { type: 'string', enum: [...METER_CHECK_KINDS] },
  checkDate: { type: ['string', 'null'], format: 'date' },
  checkResistorOhms: { type: ['number', 'null'], exclusiveMinimum: 0, maximum: 1e9 },
  checkResistorTolerancePct: { type: ['number', 'null'], exclusiveMinimum: 0, maximum: 50 },
} as const;

/** `{ ohms, text? }` or `{ state }`. */
export const nominal = {
  type: 'object',
  if: { type: 'object', properties: { state: {} }, required: ['state'] },
  then: object({ state: { type: 'string', enum: ['open', 'short'] } }),
  else: object({ ohms, text: line(40, 1) }, ['ohms']),
} as const;

export const deviation = object(
  {
    key: key('dv'),
    kind: { type: 'string', enum: [...DEVIATION_KINDS] },
    componentKey: key('c'),
    nominal,
    tolerancePct: { type: ['number', 'null'], exclusiveMinimum: 0, maximum: 100 },
    note: paragraph(2000),
  },
  ['kind', 'componentKey', 'nominal'],
);

export const setFields = {
  templateId: id,
  label: line(200, 1),
  accessionNumber: line(80),
  customer: line(200),
  jobStatus: { type: 'string', enum: [...JOB_STATUSES] },
  serial: line(80),
  restorationLevel: { type: 'string', enum: [...RESTORATION_LEVELS] },
  condition: paragraph(4000),
  complaint: paragraph(4000),
  intakeNotes: paragraph(8000),
  deviations: { type: 'array', maxItems: 500, items: deviation },
} as const;

export const conditions = object(
  {
    tubesIn: { type: 'boolean' },
    speakerConnected: { type: 'boolean' },
    controls: line(300),
    ambientC: { type: ['number', 'null'], minimum: -40, maximum: 80 },
    note: paragraph(2000),
  },
  [],
);

export const rule = object(
  {
    decision: { type: 'string', enum: [...DECISION_RULES] },
    nearLimitFraction: { type: 'number', exclusiveMinimum: 0, maximum: 1 },
    bandFrom: { type: 'string', enum: ['template', 'allowance'] },
    allowance: object({ lowPct: { type: 'number', minimum: -100, maximum: 0 }, highPct: { type: 'number', minimum: 0, maximum: 10000 } }),
  },
  ['decision', 'nearLimitFraction', 'bandFrom'],
);

export const purpose = { type: 'string', enum: SURVEY_PURPOSES.filter((p) => p !== 'assignment') } as const;
export const method = { type: 'string', enum: [...METHODS] } as const;
export const stateKey = { type: 'string', enum: READING_STATES.filter((s) => s !== 'value') } as const;
/** 16–64 characters of [A-Za-z0-9_-] (crypto.getRandomValues on the client). */
export const clientKey = { type: 'string', pattern: '^[A-Za-z0-9_-]{16,64}$' } as const;
/** What was typed at the bench: `470k`, `OL`, `4,7 kΩ` (the core parses it). */
export const readingText = line(40, 1);
export const rangeIndex = { type: ['integer', 'null'], minimum: 0, maximum: 15 } as const;
export const liftedEnd = { type: ['integer', 'null'], enum: [0, 1, null] } as const;
