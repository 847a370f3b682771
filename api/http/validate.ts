import { Ajv, type ErrorObject, type JSONSchemaType, type ValidateFunction } from 'ajv';
import addFormatsModule from 'ajv-formats';
import type { RequestHandler } from 'express';
import { badRequest } from './errors';

const addFormats = addFormatsModule as unknown as (ajv: Ajv) => Ajv;

/** One ajv instance for the edge: unknown fields are refused, nothing is coerced in bodies. */
export const ajv = addFormats(new Ajv({ allErrors: false, strict: true, coerceTypes: false, useDefaults: false }));
/** Query strings arrive as text: this instance coerces "2" to 2 where the schema says integer. */
const ajvQuery = addFormats(new Ajv({ allErrors: false, strict: true, coerceTypes: true, useDefaults: true }));

/** `/items/0/name` → `items[0].name` */
function fieldOf(e: ErrorObject): string {
  const parts = e.instancePath.split('/').slice(1).map((p) => p.replace(/~1/g, '/').replace(/~0/g, '~'));
  if (e.keyword === 'required') parts.push(String((e.params as { missingProperty: string }).missingProperty));
  if (e.keyword === 'additionalProperties') parts.push(String((e.params as { additionalProperty: string }).additionalProperty));
  let out = '';
  for (const p of parts) out += /^\d+$/.test(p) ? `[${p}]` : out ? `.${p}` : p;
  return out || '(body)';
}

function messageOf(e: ErrorObject, where: string): string {
  const field = fieldOf(e);
  const name = field === '(body)' ? `The ${where}` : `"${field}"`;
  switch (e.keyword) {
    case 'required':
      return `${name} is required.`;
    case 'additionalProperties':
      return `"${field}" is not a field this request takes.`;
    case 'type':
      return field === '(body)' && where === 'request body'
        ? 'The request body must be a JSON object (send Content-Type: application/json).'
        : `${name} must be ${(e.params as { type: string }).type}.`;
    case 'enum':
      return `${name} must be one of: ${((e.params as { allowedValues: unknown[] }).allowedValues ?? []).join(', ')}.`;
    case 'format':
      return `${name} must be a valid ${(e.params as { format: string }).format}.`;
    case 'maxLength':
    case 'minLength':
    case 'maxItems':
    case 'minItems':
    case 'minimum':
    case 'maximum':
    case 'exclusiveMinimum':
    case 'exclusiveMaximum':
    case 'pattern':
    case 'uniqueItems':
      return `${name} ${e.message}.`;
    default:
      return `${name} is not valid: ${e.message ?? e.keyword}.`;
  }
}

export interface Schemas<B, Q> {
  body?: JSONSchemaType<B>;
  query?: JSONSchemaType<Q>;
  /** Path parameters: each must match its pattern (ids are positive integers). */
  params?: Record<string, RegExp>;
}

/** The path of the first string holding a NUL character (PostgreSQL text cannot store one). */
function findNul(v: unknown, path = ''): string | null {
  if (typeof v === 'string') return v.includes('\u0000') ? path || '(body)' : null;
  if (Array.isArray(v)) {
    for (let i = 0; i < v.length; i++) {
      const f = findNul(v[i], `${path}[${i}]`);
      if (f) return f;
    }
  } else if (v && typeof v === 'object') {
    for (const [k, x] of Object.entries(v)) {
      const f = findNul(x, path ? `${path}.${k}` : k);
      if (f) return f;
    }
  }
  return null;
}

/** Validates at the edge; answers 400 naming the first failing field. */
export function validate<B = unknown, Q = unknown>(schemas: Schemas<B, Q>): RequestHandler {
  const body: ValidateFunction | null = schemas.body ? ajv.compile(schemas.body) : null;
  const query: ValidateFunction | null = schemas.query ? ajvQuery.compile(schemas.query) : null;
  return (req, _res, next) => {
    for (const [name, re] of Object.entries(schemas.params ?? {})) {
      const v = String(req.params[name] ?? '');
      if (!re.test(v)) throw badRequest(`"${name}" in the path is not valid: "${v.slice(0, 40)}".`, name, 'validation');
    }
    const nul = body ? findNul(req.body) : null;
    if (nul) throw badRequest(`"${nul}" holds a NUL character, which no field accepts.`, nul, 'validation');
    if (body && !body(req.body)) {
      const e = body.errors![0];
      throw badRequest(messageOf(e, 'request body'), fieldOf(e), 'validation');
    }
    if (query) {
      const q = { ...(req.query as Record<string, unknown>) };
      if (!query(q)) {
        const e = query.errors![0];
        throw badRequest(messageOf(e, 'query'), fieldOf(e), 'validation');
      }
      keepValidQuery(req, q);
    }
    next();
  };
}

/** Express 5's req.query is a getter: validated (coerced) query values are kept on req.validQuery. */
function keepValidQuery(req: object, q: Record<string, unknown>): void {
  (req as { validQuery?: Record<string, unknown> }).validQuery = q;
}

export function validQuery<Q>(req: object): Q {
  return (req as { validQuery?: Q }).validQuery as Q;
}

/** Reusable schema pieces. */
export const email = { type: 'string', format: 'email', minLength: 3, maxLength: 254 } as const;
export const password = { type: 'string', minLength: 10, maxLength: 200 } as const;
/** A person's name: free text with a visible character, no angle brackets or control characters. */
export const personName = { type: 'string', minLength: 1, maxLength: 120, pattern: '^[^<>\\u0000-\\u001f\\u007f]*[^<>\\s\\u0000-\\u001f\\u007f][^<>\\u0000-\\u001f\\u007f]*$' } as const;
export const token = { type: 'string', minLength: 16, maxLength: 200, pattern: '^[A-Za-z0-9_-]+$' } as const;

/** A positive integer id in a path. */
export const ID = /^[1-9][0-9]{0,9}$/;
