/**
 * The canonical form of a template document: keys in the order of the format's JSON schema
 * (template-schema.ts), arrays in their order (bench order matters), two-space indentation and a
 * final newline. PostgreSQL's jsonb keeps no key order, so every export goes through here; the
 * canonical export of a re-imported version equals the original byte for byte.
 */
import type { TemplateDocument } from '../domain/template-format';
import { TEMPLATE_JSON_SCHEMA } from './template-schema';

interface Schema {
  type?: string | readonly string[];
  properties?: Record<string, Schema>;
  required?: readonly string[];
  items?: Schema;
  if?: Schema;
  then?: Schema;
  else?: Schema;
  const?: unknown;
}

/** Does the value satisfy an `if` of this format (required fields and constant values only)? */
function matches(value: Record<string, unknown>, cond: Schema): boolean {
  for (const r of cond.required ?? []) if (!(r in value)) return false;
  for (const [k, s] of Object.entries(cond.properties ?? {})) if ('const' in s && k in value && value[k] !== s.const) return false;
  return true;
}

function order(value: unknown, schema: Schema | undefined): unknown {
  if (Array.isArray(value)) return value.map((v) => order(v, schema?.items));
  if (value === null || typeof value !== 'object') return value;
  let s = schema;
  while (s?.if) s = matches(value as Record<string, unknown>, s.if) ? s.then : s.else;
  const obj = value as Record<string, unknown>;
  const out: Record<string, unknown> = {};
  const known = Object.keys(s?.properties ?? {});
  for (const k of known) if (k in obj && obj[k] !== undefined) out[k] = order(obj[k], s!.properties![k]);
  for (const k of Object.keys(obj).sort()) if (!known.includes(k) && obj[k] !== undefined) out[k] = order(obj[k], undefined);
  return out;
}

/** The document with its keys in canonical order (a new object). */
export function canonicalDocument(doc: TemplateDocument): TemplateDocument {
  return order(doc, TEMPLATE_JSON_SCHEMA as unknown as Schema) as TemplateDocument;
}

/** The canonical text of a document: what the export sends. */
export function canonicalJson(doc: TemplateDocument): string {
  return JSON.stringify(canonicalDocument(doc), null, 2) + '\n';
}

/** Equal content, whatever the key order. */
export function sameDocument(a: TemplateDocument, b: TemplateDocument): boolean {
  return canonicalJson(a) === canonicalJson(b);
}
