import type { JSONSchemaType } from 'ajv';
import type { RequestHandler } from 'express';
import { CORRECTION_TARGETS, TEMPLATE_VISIBILITIES, type TemplateVisibility } from '../../schema/index';
import type { Ctx } from '../context';
import { CHASSIS_KINDS, POWER_ARRANGEMENTS, SOURCE_DOCUMENT_KINDS } from '../domain/template-format';
import type { RouteDef } from '../http/route-table';
import { ID, validate, validQuery, type Schemas } from '../http/validate';
import { problemsError } from '../tube-types/tube-types.use-cases';
import * as corrections from './corrections.use-cases';
import { line, paragraph, shapeProblems, TEMPLATE_JSON_SCHEMA } from './template-schema';
import * as templates from './templates.use-cases';

/** A version in a path or query: its number, or `draft`. */
const VERSION = /^([1-9][0-9]{0,5}|draft)$/;
const versionRef = (s: string): templates.VersionRef => (s === 'draft' ? 'draft' : Number(s));

/**
 * Validates the request as usual, then the template document it carries (at `field`, or the whole
 * body) against the format: every problem with its path in `details.problems`, the first in
 * `details.field`. Runs before the sign-in check like any validation.
 */
function validateWithDocument<B, Q>(schemas: Schemas<B, Q>, field: string): RequestHandler {
  const first = validate(schemas);
  return (req, res, next) => {
    first(req, res, (err?: unknown) => {
      if (err) return next(err);
      const body = req.body as Record<string, unknown>;
      if (field in body) {
        const problems = shapeProblems(body[field], field);
        if (problems.length) return next(problemsError(problems, 'The template'));
      }
      next();
    });
  };
}

const note = (max: number) => ({ ...paragraph(max), minLength: 1 });
const anyObject = { type: 'object' } as const;

const newChassis = {
  type: 'object',
  properties: {
    maker: line(120, 1),
    model: line(120, 1),
    chassisNumber: line(60),
    variants: { type: 'array', items: line(60, 1), maxItems: 50 },
    yearFrom: { type: 'integer', minimum: 1880, maximum: 2100 },
    yearTo: { type: 'integer', minimum: 1880, maximum: 2100 },
    kind: { type: 'string', enum: [...CHASSIS_KINDS] },
    power: { type: 'string', enum: [...POWER_ARRANGEMENTS] },
    hotChassis: { type: 'boolean' },
    hazardNotes: paragraph(2000),
    sources: {
      type: 'array',
      maxItems: 50,
      items: {
        type: 'object',
        properties: { title: line(200, 1), kind: { type: 'string', enum: [...SOURCE_DOCUMENT_KINDS] }, note: paragraph(1000) },
        required: ['title', 'kind', 'note'],
        additionalProperties: false,
      },
    },
  },
  required: ['maker', 'model', 'kind', 'power'],
  additionalProperties: false,
} as const;

// Optional fields are absent or valid, never null (hence the casts: JSONSchemaType wants nullable).
type CreateBody = { chassis: templates.NewChassis } | { document: unknown };
const createBody = {
  type: 'object',
  properties: { chassis: newChassis, document: anyObject },
  required: [],
  minProperties: 1,
  maxProperties: 1,
  additionalProperties: false,
} as unknown as JSONSchemaType<CreateBody>;

interface ImportBody {
  document: unknown;
}
const importBody = { type: 'object', properties: { document: anyObject }, required: ['document'], additionalProperties: false } as unknown as JSONSchemaType<ImportBody>;

interface DraftBody {
  revision: number;
  content: unknown;
}
const draftBody = {
  type: 'object',
  properties: { revision: { type: 'integer', minimum: 0, maximum: 1_000_000_000 }, content: anyObject },
  required: ['revision', 'content'],
  additionalProperties: false,
} as unknown as JSONSchemaType<DraftBody>;

interface PublishBody {
  changelog: string;
}
const publishBody = { type: 'object', properties: { changelog: line(500, 1) }, required: ['changelog'], additionalProperties: false } as unknown as JSONSchemaType<PublishBody>;

interface RetireBody {
  reason: string;
}
const retireBody = { type: 'object', properties: { reason: line(500, 1) }, required: ['reason'], additionalProperties: false } as unknown as JSONSchemaType<RetireBody>;

interface CopyBody {
  version: number | 'draft';
}
const copyBody = {
  type: 'object',
  properties: { version: { anyOf: [{ type: 'integer', minimum: 1, maximum: 999999 }, { type: 'string', enum: ['draft'] }] } },
  required: ['version'],
  additionalProperties: false,
} as unknown as JSONSchemaType<CopyBody>;

interface SharingBody {
  visibility: TemplateVisibility;
  userIds: number[];
}
const sharingBody = {
  type: 'object',
  properties: {
    visibility: { type: 'string', enum: [...TEMPLATE_VISIBILITIES] },
    userIds: { type: 'array', items: { type: 'integer', minimum: 1, maximum: 2147483647 }, maxItems: 200, uniqueItems: true },
  },
  required: ['visibility', 'userIds'],
  additionalProperties: false,
} as unknown as JSONSchemaType<SharingBody>;

const correctionBody = {
  type: 'object',
  properties: {
    versionNumber: { type: 'integer', minimum: 1, maximum: 999999 },
    target: {
      type: 'object',
      properties: { kind: { type: 'string', enum: [...CORRECTION_TARGETS] }, key: { type: 'string', pattern: '^(c|tp)-[A-Za-z0-9_-]{1,40}$' } },
      required: ['kind', 'key'],
      additionalProperties: false,
    },
    change: { type: 'object', minProperties: 1, maxProperties: 30 },
    note: note(2000),
  },
  required: ['versionNumber', 'target', 'change', 'note'],
  additionalProperties: false,
} as unknown as JSONSchemaType<corrections.CorrectionInput>;

interface DecisionBody {
  decision: 'accept' | 'decline';
  note?: string;
}
const decisionBody = {
  type: 'object',
  properties: { decision: { type: 'string', enum: ['accept', 'decline'] }, note: note(2000) },
  required: ['decision'],
  additionalProperties: false,
} as unknown as JSONSchemaType<DecisionBody>;

interface LibraryQuery {
  q?: string;
  maker?: string;
  model?: string;
  chassis?: string;
  tubeType?: string;
  kind?: string;
  author?: string;
  sort: 'use' | 'maker' | 'model' | 'updated';
  page: number;
  pageSize: number;
}
const text = (max: number) => ({ type: 'string', maxLength: max });
const libraryQuery = {
  type: 'object',
  properties: {
    q: text(200),
    maker: text(120),
    model: text(120),
    chassis: text(60),
    tubeType: text(24),
    kind: { type: 'string', enum: [...CHASSIS_KINDS] },
    author: text(120),
    sort: { type: 'string', enum: ['use', 'maker', 'model', 'updated'], default: 'use' },
    page: { type: 'integer', minimum: 1, maximum: 100000, default: 1 },
    pageSize: { type: 'integer', minimum: 1, maximum: 100, default: 25 },
  },
  required: [],
  additionalProperties: false,
} as unknown as JSONSchemaType<LibraryQuery>;

interface DiffQuery {
  from: string;
  to: string;
}
const diffQuery = {
  type: 'object',
  properties: { from: { type: 'string', pattern: VERSION.source }, to: { type: 'string', pattern: VERSION.source } },
  required: ['from', 'to'],
  additionalProperties: false,
} as unknown as JSONSchemaType<DiffQuery>;

interface ExportQuery {
  version?: string;
}
const exportQuery = { type: 'object', properties: { version: { type: 'string', pattern: VERSION.source } }, required: [], additionalProperties: false } as unknown as JSONSchemaType<ExportQuery>;

const id = (req: { params: Record<string, unknown> }) => Number(req.params.id);

export function templateRoutes(ctx: Ctx): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/schemas/template.json',
      access: 'public',
      summary: 'The JSON schema of the template format (import and export)',
      handler: (_req, res) => {
        res.json(TEMPLATE_JSON_SCHEMA);
      },
    },
    {
      method: 'get',
      path: '/api/templates',
      access: 'signed-in',
      summary: 'The template library: what the caller may see (search, filters, sort, paginated)',
      validate: validate({ query: libraryQuery }),
      handler: async (req, res) => {
        res.json(await templates.listLibrary(ctx, req.signedIn!, validQuery<LibraryQuery>(req)));
      },
    },
    {
      method: 'post',
      path: '/api/templates',
      access: ['author', 'admin'],
      summary: 'Create a template and its first draft, from a chassis or a whole document',
      validate: validateWithDocument({ body: createBody }, 'document'),
      handler: async (req, res) => {
        res.status(201).json(await templates.createTemplate(ctx, req.signedIn!, req.body as CreateBody));
      },
    },
    {
      method: 'post',
      path: '/api/templates/import',
      access: ['author', 'admin'],
      summary: 'Import a document of our format as a new template with a draft (all or nothing)',
      validate: validateWithDocument({ body: importBody }, 'document'),
      handler: async (req, res) => {
        res.status(201).json(await templates.createTemplate(ctx, req.signedIn!, { document: (req.body as ImportBody).document }));
      },
    },
    {
      method: 'get',
      path: '/api/templates/:id',
      access: 'signed-in',
      summary: 'A template: its identity, sharing and versions',
      validate: validate({ params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await templates.getTemplate(ctx, req.signedIn!, id(req)));
      },
    },
    {
      method: 'get',
      path: '/api/templates/:id/draft',
      access: 'signed-in',
      summary: 'The draft (or the content a new draft starts from) and its revision',
      validate: validate({ params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await templates.getDraft(ctx, req.signedIn!, id(req)));
      },
    },
    {
      method: 'put',
      path: '/api/templates/:id/draft',
      access: 'signed-in',
      summary: 'Save the whole draft at the revision it was loaded at (owner)',
      validate: validateWithDocument({ body: draftBody, params: { id: ID } }, 'content'),
      handler: async (req, res) => {
        res.json(await templates.saveDraft(ctx, req.signedIn!, id(req), req.body as DraftBody));
      },
    },
    {
      method: 'get',
      path: '/api/templates/:id/versions/:version',
      access: 'signed-in',
      summary: 'One version (number, or draft for the owner) with its content',
      validate: validate({ params: { id: ID, version: VERSION } }),
      handler: async (req, res) => {
        res.json(await templates.getVersion(ctx, req.signedIn!, id(req), versionRef(String(req.params.version))));
      },
    },
    {
      method: 'get',
      path: '/api/templates/:id/versions/:version/network',
      access: 'signed-in',
      summary: 'Per test point: the in-circuit expected reading (null = open), its parallel paths and any chart disagreement',
      validate: validate({ params: { id: ID, version: VERSION } }),
      handler: async (req, res) => {
        res.json(await templates.versionNetwork(ctx, req.signedIn!, id(req), versionRef(String(req.params.version))));
      },
    },
    {
      method: 'put',
      path: '/api/templates/:id/versions/:version',
      access: 'signed-in',
      summary: 'Save a version: the draft only; a published or retired version answers 409',
      validate: validateWithDocument({ body: draftBody, params: { id: ID, version: VERSION } }, 'content'),
      handler: async (req, res) => {
        res.json(await templates.saveVersion(ctx, req.signedIn!, id(req), versionRef(String(req.params.version)), req.body as DraftBody));
      },
    },
    {
      method: 'post',
      path: '/api/templates/:id/publish',
      access: 'signed-in',
      summary: 'Publish the draft as the next immutable version (owner)',
      validate: validate({ body: publishBody, params: { id: ID } }),
      handler: async (req, res) => {
        res.status(201).json(await templates.publish(ctx, req.signedIn!, id(req), (req.body as PublishBody).changelog));
      },
    },
    {
      method: 'post',
      path: '/api/templates/:id/versions/:number/retire',
      access: 'signed-in',
      summary: 'Retire a published version: hidden from new surveys, kept for those that used it (owner)',
      validate: validate({ body: retireBody, params: { id: ID, number: ID } }),
      handler: async (req, res) => {
        res.json(await templates.retire(ctx, req.signedIn!, id(req), Number(req.params.number), (req.body as RetireBody).reason));
      },
    },
    {
      method: 'get',
      path: '/api/templates/:id/diff',
      access: 'signed-in',
      summary: 'Components and test points added, removed and changed between two versions',
      validate: validate({ query: diffQuery, params: { id: ID } }),
      handler: async (req, res) => {
        const q = validQuery<DiffQuery>(req);
        res.json(await templates.diffVersions(ctx, req.signedIn!, id(req), versionRef(q.from), versionRef(q.to)));
      },
    },
    {
      method: 'get',
      path: '/api/templates/:id/export',
      access: 'signed-in',
      summary: 'The canonical JSON of a version (or the draft): stable key order, no ids or timestamps',
      validate: validate({ query: exportQuery, params: { id: ID } }),
      handler: async (req, res) => {
        const q = validQuery<ExportQuery>(req);
        const out = await templates.exportVersion(ctx, req.signedIn!, id(req), q.version !== undefined ? versionRef(q.version) : undefined);
        res.setHeader('Content-Disposition', `attachment; filename="${out.filename}"`);
        res.type('application/json; charset=utf-8').send(out.text);
      },
    },
    {
      method: 'post',
      path: '/api/templates/:id/copy',
      access: 'signed-in',
      summary: "Copy a version into a private template of one's own (origin and author credited)",
      validate: validate({ body: copyBody, params: { id: ID } }),
      handler: async (req, res) => {
        res.status(201).json(await templates.copyTemplate(ctx, req.signedIn!, id(req), (req.body as CopyBody).version));
      },
    },
    {
      method: 'put',
      path: '/api/templates/:id/sharing',
      access: 'signed-in',
      summary: 'Private, shared with named users, or public (owner)',
      validate: validate({ body: sharingBody, params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await templates.share(ctx, req.signedIn!, id(req), req.body as SharingBody));
      },
    },
    {
      method: 'post',
      path: '/api/templates/:id/corrections',
      access: 'signed-in',
      summary: 'Send the author a correction on a component or test point of a version',
      validate: validate({ body: correctionBody, params: { id: ID } }),
      handler: async (req, res) => {
        res.status(201).json(await corrections.proposeCorrection(ctx, req.signedIn!, id(req), req.body as corrections.CorrectionInput));
      },
    },
    {
      method: 'get',
      path: '/api/templates/:id/corrections',
      access: 'signed-in',
      summary: "Corrections: all for the owner, one's own for anyone else",
      validate: validate({ params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await corrections.listCorrections(ctx, req.signedIn!, id(req)));
      },
    },
    {
      method: 'post',
      path: '/api/templates/:id/corrections/:correctionId/decision',
      access: 'signed-in',
      summary: 'Accept (into the draft) or decline a correction, with a note (owner)',
      validate: validate({ body: decisionBody, params: { id: ID, correctionId: ID } }),
      handler: async (req, res) => {
        res.json(await corrections.decideCorrection(ctx, req.signedIn!, id(req), Number(req.params.correctionId), req.body as DecisionBody));
      },
    },
  ];
}
