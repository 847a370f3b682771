/**
 * The JSON schema of our template format ("driftmark-template", formatVersion 1; the TypeScript
 * types are api/domain/template-format.ts). Published at `GET /api/schemas/template.json`, used by
 * every write of a document (draft, import, create, corrections) and by the canonical export (the
 * order of `properties` here is the canonical key order).
 *
 * Standard JSON Schema draft-07 (no ajv-only keywords), so anyone's validator can check a file.
 * Polymorphic parts use if/then/else on their discriminating field, so a problem is reported once,
 * in the branch that applies.
 */
import { Ajv, type ErrorObject } from 'ajv';
import { CHASSIS_KINDS, DIELECTRICS, POWER_ARRANGEMENTS, SAFETY_CLASSES, SOURCE_DOCUMENT_KINDS, TEMPLATE_COMPONENT_KINDS, TEMPLATE_FORMAT, TEMPLATE_FORMAT_VERSION, type TemplateProblem } from '../domain/template-format';
import { VALUE_SOURCES } from '../domain/words';

/** The largest resistance a template takes (1 TΩ), as the calculation API. */
export const MAX_OHMS = 1e12;
/** One line of text: no control characters and no markup (a `<` opening a tag). */
export const LINE_PATTERN = '^(?![\\s\\S]*<[A-Za-z/!?])[^\\u0000-\\u001f\\u007f]*$';
/** A paragraph: as a line, with line breaks and tabs. */
export const PARAGRAPH_PATTERN = '^(?![\\s\\S]*<[A-Za-z/!?])[^\\u0000-\\u0008\\u000b\\u000c\\u000e-\\u001f\\u007f]*$';

export const line = (maxLength: number, minLength = 0) => ({ type: 'string', minLength, maxLength, pattern: LINE_PATTERN }) as const;
export const paragraph = (maxLength: number) => ({ type: 'string', maxLength, pattern: PARAGRAPH_PATTERN }) as const;
const key = (prefix: string) => ({ type: 'string', pattern: `^${prefix}-[A-Za-z0-9_-]{1,40}$` }) as const;
const nullableNumber = (exclusiveMinimum: number | null, maximum: number, minimum?: number) => ({
  type: ['number', 'null'],
  ...(exclusiveMinimum !== null ? { exclusiveMinimum } : {}),
  ...(minimum !== undefined ? { minimum } : {}),
  maximum,
});
const object = (properties: Record<string, unknown>, required: string[] = Object.keys(properties)) => ({
  type: 'object',
  properties,
  required,
  additionalProperties: false,
});

/** A tube type's designation as the library stores it (upper case): `12BE6`, `6SN7GTB`, `0Z4A`. */
export const DESIGNATION_PATTERN = '^[A-Z0-9][A-Z0-9.-]{0,23}$';
/** A node name: a pin (`V3.7`), `chassis`, `B-`, `B+` or a junction's name. */
const node = line(60, 1);
const valueSource = { type: 'string', enum: [...VALUE_SOURCES] } as const;
const states = { type: 'string', enum: ['open', 'short'] } as const;
const ohms = { type: 'number', exclusiveMinimum: 0, maximum: MAX_OHMS } as const;

/** `{ ohms, text? }` or `{ state }`, told apart by the presence of `state`. */
const nominal = {
  type: 'object',
  if: { type: 'object', properties: { state: {} }, required: ['state'] },
  then: object({ state: states }),
  else: object({ ohms, text: line(40, 1) }, ['ohms']),
};
const expected = {
  type: 'object',
  if: { type: 'object', properties: { state: {} }, required: ['state'] },
  then: object({ state: states }),
  else: object({ ohms }),
};
const band = object({ lowPct: { type: 'number', minimum: -100, maximum: 0 }, highPct: { type: 'number', minimum: 0, maximum: 10000 } });

const capacitor = object({
  uF: { type: 'number', exclusiveMinimum: 0, maximum: 1e6 },
  workingVolts: { type: 'number', exclusiveMinimum: 0, maximum: 100000 },
  dielectric: { type: 'string', enum: [...DIELECTRICS] },
  polarised: { type: 'boolean' },
  can: { type: ['object', 'null'], properties: { id: line(20, 1), section: line(10, 1), commonReturn: node }, required: ['id', 'section', 'commonReturn'], additionalProperties: false },
  safetyClass: { type: ['string', 'null'], enum: [...SAFETY_CLASSES, null] },
  lineConnected: { type: 'boolean' },
});

const component = object({
  key: key('c'),
  ref: { type: 'string', pattern: '^[A-Za-z][A-Za-z0-9.+/-]{0,15}$' },
  kind: { type: 'string', enum: [...TEMPLATE_COMPONENT_KINDS] },
  stageKey: key('st'),
  nodes: { type: 'array', items: node, minItems: 2, maxItems: 2 },
  wiper: { type: ['object', 'null'], properties: { node, fraction: { type: 'number', minimum: 0, maximum: 1 } }, required: ['node', 'fraction'], additionalProperties: false },
  nominal,
  tolerancePct: nullableNumber(0, 100),
  ratedWatts: nullableNumber(0, 1000),
  ratedVolts: nullableNumber(0, 100000),
  voltsAcross: nullableNumber(null, 100000, 0),
  critical: { ...band, type: ['object', 'null'] },
  fuseRole: { type: 'boolean' },
  mainsSide: { type: 'boolean' },
  nonLinear: { type: 'boolean' },
  valueSource,
  capacitor: { ...capacitor, type: ['object', 'null'] },
  note: paragraph(2000),
});

const conditions = { tubesIn: { type: 'boolean' }, speakerConnected: { type: 'boolean' }, controls: line(300) };

const componentCheck = object({ key: key('tp'), stageKey: key('st'), kind: { type: 'string', const: 'component-check' }, componentKey: key('c') });
const chartReading = object({
  key: key('tp'),
  stageKey: key('st'),
  kind: { type: 'string', const: 'chart-reading' },
  from: node,
  to: node,
  expected,
  tolerancePct: { type: 'number', exclusiveMinimum: 0, maximum: 100 },
  conditions: object(conditions, []),
  valueSource,
});
const pairRelation = object({
  key: key('tp'),
  stageKey: key('st'),
  kind: { type: 'string', const: 'pair-relation' },
  a: key('tp'),
  b: key('tp'),
  ratioTolerancePct: { type: 'number', exclusiveMinimum: 0, maximum: 100 },
});
const kindIs = (k: string) => ({ type: 'object', properties: { kind: { type: 'string', const: k } }, required: ['kind'] });
/** A test point, by its `kind`. */
const testPoint = {
  type: 'object',
  if: kindIs('component-check'),
  then: componentCheck,
  else: {
    type: 'object',
    if: kindIs('chart-reading'),
    then: chartReading,
    else: {
      type: 'object',
      if: kindIs('pair-relation'),
      then: pairRelation,
      else: { type: 'object', properties: { kind: { type: 'string', enum: ['component-check', 'chart-reading', 'pair-relation'] } }, required: ['kind'] },
    },
  },
};

export const chassisSchema = object({
  maker: line(120, 1),
  model: line(120, 1),
  chassisNumber: line(60),
  variants: { type: 'array', items: line(60, 1), maxItems: 50 },
  yearFrom: { type: ['integer', 'null'], minimum: 1880, maximum: 2100 },
  yearTo: { type: ['integer', 'null'], minimum: 1880, maximum: 2100 },
  kind: { type: 'string', enum: [...CHASSIS_KINDS] },
  power: { type: 'string', enum: [...POWER_ARRANGEMENTS] },
  hotChassis: { type: 'boolean' },
  hazardNotes: paragraph(2000),
  sources: { type: 'array', maxItems: 50, items: object({ title: line(200, 1), kind: { type: 'string', enum: [...SOURCE_DOCUMENT_KINDS] }, note: paragraph(1000) }) },
});

/** The whole document (draft-07). The order of `properties` is the canonical key order. */
export const TEMPLATE_JSON_SCHEMA = {
  $schema: 'http://json-schema.org/draft-07/schema#',
  $id: 'urn:driftmark:template-format:1',
  title: 'Driftmark chassis template, format 1',
  description: 'One version of a chassis template: chassis, stages with sockets, junctions, components (the chassis network) and test points in bench order. Keys (st-, so-, c-, tp-) are stable across versions and copies.',
  ...object({
    format: { type: 'string', const: TEMPLATE_FORMAT },
    formatVersion: { type: 'integer', const: TEMPLATE_FORMAT_VERSION },
    chassis: chassisSchema,
    conditions: object(conditions),
    stages: {
      type: 'array',
      maxItems: 60,
      items: object({
        key: key('st'),
        name: line(120, 1),
        sockets: { type: 'array', maxItems: 30, items: object({ key: key('so'), designator: { type: 'string', pattern: '^[A-Za-z]+[0-9]+[A-Za-z]?$', maxLength: 12 }, tubeType: { type: 'string', pattern: DESIGNATION_PATTERN } }) },
      }),
    },
    junctions: { type: 'array', maxItems: 500, items: object({ name: node, note: paragraph(500) }) },
    components: { type: 'array', maxItems: 2000, items: component },
    testPoints: { type: 'array', maxItems: 4000, items: testPoint },
  }),
} as const;

/** Fields of a component and of a test point that a correction may propose (all but the key). */
export const COMPONENT_FIELDS = Object.keys(component.properties).filter((k) => k !== 'key');
export const TEST_POINT_FIELDS = [...new Set([...Object.keys(componentCheck.properties), ...Object.keys(chartReading.properties), ...Object.keys(pairRelation.properties)])].filter((k) => k !== 'key');

const documentAjv = new Ajv({ allErrors: true, strict: true, allowUnionTypes: true, coerceTypes: false, useDefaults: false });
const validateDocument = documentAjv.compile(TEMPLATE_JSON_SCHEMA);

/** `/components/0/nodes/1` → `components[0].nodes[1]`, under an optional prefix (`content`). */
export function pathOf(instancePath: string, extra: string | null, prefix = ''): string {
  const parts = instancePath.split('/').slice(1).map((p) => p.replace(/~1/g, '/').replace(/~0/g, '~'));
  if (extra !== null) parts.push(extra);
  let out = prefix;
  for (const p of parts) out += /^\d+$/.test(p) ? `[${p}]` : out ? `.${p}` : p;
  return out || '(body)';
}

function problemOf(e: ErrorObject, prefix: string): TemplateProblem {
  const p = e.params as Record<string, unknown>;
  switch (e.keyword) {
    case 'required':
      return { path: pathOf(e.instancePath, String(p.missingProperty), prefix), message: 'is required.' };
    case 'additionalProperties':
      return { path: pathOf(e.instancePath, String(p.additionalProperty), prefix), message: 'is not a field of this format.' };
    case 'enum':
      return { path: pathOf(e.instancePath, null, prefix), message: `must be one of: ${(p.allowedValues as unknown[]).map((v) => (v === null ? 'null' : String(v))).join(', ')}.` };
    case 'const':
      return { path: pathOf(e.instancePath, null, prefix), message: `must be ${JSON.stringify(p.allowedValue)}.` };
    case 'pattern': {
      const pattern = String(p.pattern);
      const keyPrefix = /^\^([a-z]+)-\[/.exec(pattern)?.[1];
      const message =
        pattern === LINE_PATTERN || pattern === PARAGRAPH_PATTERN
          ? 'holds a control character or markup.'
          : keyPrefix
            ? `must be a key like "${keyPrefix}-1a2b3c" (letters, digits, - and _ after "${keyPrefix}-").`
            : pattern === DESIGNATION_PATTERN
              ? 'must be a tube designation in capitals (e.g. 12BE6, 6SN7GT).'
              : 'is not in the expected form.';
      return { path: pathOf(e.instancePath, null, prefix), message };
    }
    default:
      return { path: pathOf(e.instancePath, null, prefix), message: `${e.message ?? e.keyword}.` };
  }
}

/**
 * Every problem of the document's shape, each with its path (under `prefix`, e.g. `content`).
 * Empty when the document follows the format.
 */
export function shapeProblems(doc: unknown, prefix = ''): TemplateProblem[] {
  if (validateDocument(doc)) return [];
  const seen = new Set<string>();
  const out: TemplateProblem[] = [];
  for (const e of validateDocument.errors ?? []) {
    if (e.keyword === 'if') continue; // accompanies the branch's own errors
    const pr = problemOf(e, prefix);
    const k = `${pr.path} ${pr.message}`;
    if (seen.has(k)) continue;
    seen.add(k);
    out.push(pr);
  }
  return out;
}
