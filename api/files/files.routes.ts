/**
 * Routes of template files. Uploads are multipart (`file`, optional `stageKey` and `caption`): the path and the
 * content type are checked first (a 400 before any 401), then the sign-in and the owner check, and
 * only then is the body read (multer, in memory, within UPLOAD_MAX_BYTES) — an anonymous caller or
 * a non-owner never makes the server buffer a file.
 *
 * Served bytes: `nosniff` always; images and PDFs `inline`, anything else `attachment`; a
 * content security policy of their own replaces the app's (see SERVE_POLICY).
 */
import type { JSONSchemaType, ValidateFunction } from 'ajv';
import type { Request, RequestHandler, Response } from 'express';
import multer from 'multer';
import { pipeline } from 'node:stream/promises';
import type { Ctx } from '../context';
import { AppError, badRequest } from '../http/errors';
import type { RouteDef } from '../http/route-table';
import { ajv, ID, validate } from '../http/validate';
import type { StoredObject } from '../storage/storage';
import { line } from '../templates/template-schema';
import * as files from './files.use-cases';
import { contentDisposition, downloadName, IMAGE_TYPES, PDF, THUMBNAIL_TYPE } from './media';

const STAGE_KEY = '^st-[A-Za-z0-9_-]{1,40}$';
/** A caption: one line of free text, no markup, at most 300 characters ('' = none). */
export const CAPTION_MAX = 300;
const caption = line(CAPTION_MAX);
const CAPTION_MESSAGES: Record<string, string> = {
  pattern: '"caption" holds a control character or markup (one line of plain text).',
  maxLength: `"caption" must be at most ${CAPTION_MAX} characters.`,
  type: '"caption" must be a string.',
};
/** The message of a refused caption in words (ajv's own names the pattern). */
export const captionMessage = (keyword: string) => CAPTION_MESSAGES[keyword] ?? '"caption" is not valid.';
const captionCheck = ajv.compile(caption);

/**
 * Policies for served files (they replace the app's policy on these responses):
 * - images: `sandbox` (no script, no same origin, should a browser ever render them as a
 *   document) and nothing loaded but the image itself;
 * - PDFs: no `sandbox` — Chromium refuses to start its PDF viewer in a sandboxed document
 *   (crbug.com/413851) — but nothing else may load; the viewer runs PDF script in its own isolated
 *   process, away from our origin; `style-src 'unsafe-inline'` for the viewer's wrapper page
 *   (crbug.com/271452), `object-src 'self'` for its embed;
 * - `frame-ancestors 'self'` so the app's own viewer may frame them, and no one else.
 */
export const SERVE_POLICY = {
  image: "sandbox; default-src 'none'; img-src 'self'; style-src 'unsafe-inline'; frame-ancestors 'self'",
  pdf: "default-src 'none'; img-src 'self'; style-src 'unsafe-inline'; object-src 'self'; frame-ancestors 'self'",
  other: "sandbox; default-src 'none'; frame-ancestors 'none'",
};

const INLINE_TYPES: readonly string[] = [...IMAGE_TYPES, PDF];

interface UploadFields {
  stageKey?: string;
  caption?: string;
}
const uploadFields = ajv.compile({
  type: 'object',
  properties: { stageKey: { type: 'string', pattern: STAGE_KEY }, caption },
  required: [],
  additionalProperties: false,
} as unknown as JSONSchemaType<UploadFields>);

interface ChangeBody {
  stageKey?: string | null;
  caption?: string;
}
/** A move (`stageKey`, null = the whole template), a new caption, or both; at least one. */
const changeBody = {
  type: 'object',
  properties: { stageKey: { anyOf: [{ type: 'string', pattern: STAGE_KEY }, { type: 'null' }] }, caption },
  required: [],
  minProperties: 1,
  additionalProperties: false,
} as unknown as JSONSchemaType<ChangeBody>;

/** A multipart request, or a 400 before anything else. */
export const multipartOnly: RequestHandler = (req, _res, next) => {
  if (!req.is('multipart/form-data')) throw badRequest('Send the file as multipart/form-data with the file in the field "file".', '(body)', 'not-multipart');
  next();
};

const MULTER_MESSAGES: Record<string, (maxBytes: number, field?: string) => [string, string]> = {
  LIMIT_FILE_SIZE: (max) => [`The file is larger than the limit of ${(max / 1024 / 1024).toFixed(max >= 1024 * 1024 ? 0 : 2)} MiB.`, 'file-too-large'],
  LIMIT_UNEXPECTED_FILE: (_m, field) => [`Send the file in the field "file" (one file; got one in "${field ?? '?'}").`, 'unexpected-file-field'],
  LIMIT_FILE_COUNT: () => ['Send one file per request.', 'too-many-files'],
  LIMIT_FIELD_VALUE: (_m, field) => [`The field "${field ?? '?'}" is too long.`, 'field-too-long'],
};
/** multer errors that name a field of their own rather than `file`. */
const FIELD_ERRORS = ['LIMIT_UNEXPECTED_FILE', 'LIMIT_FIELD_VALUE'];

/** multer in memory within the limits; its errors (and a broken body) become 400s naming `file`. */
export function uploadParser(ctx: Ctx): RequestHandler {
  const max = ctx.config.upload.maxBytes;
  const single = multer({
    storage: multer.memoryStorage(),
    // fieldSize in bytes: a 300-character caption may take up to 1200 bytes of UTF-8.
    limits: { fileSize: max, files: 1, fields: 4, parts: 6, fieldNameSize: 40, fieldSize: 2000, headerPairs: 50 },
  }).single('file');
  return (req, res, next) => {
    single(req, res, (err?: unknown) => {
      if (!err) return next();
      const e = err as Error & { code?: string; field?: string };
      if (e instanceof multer.MulterError) {
        const [message, code] = MULTER_MESSAGES[e.code]?.(max, e.field) ?? [`The upload was refused: ${e.message}.`, 'bad-multipart'];
        return next(badRequest(message, FIELD_ERRORS.includes(e.code) ? (e.field ?? 'file') : 'file', code));
      }
      // busboy: truncated body, a missing boundary, a malformed part header.
      next(badRequest(`The multipart body cannot be read (${e.message}).`, '(body)', 'bad-multipart'));
    });
  };
}

/**
 * A validation whose refused caption is said in words (ajv's own message names the pattern); any
 * other refusal goes out as the validation made it.
 */
export function withCaptionInWords(check: RequestHandler): RequestHandler {
  return (req, res, next) => {
    let refused: unknown = null;
    try {
      check(req, res, (err?: unknown) => {
        refused = err ?? null;
      });
    } catch (e) {
      refused = e;
    }
    if (refused === null) return next();
    const body = req.body as { caption?: unknown } | null;
    if (refused instanceof AppError && refused.details?.field === 'caption' && !String(body?.caption).includes('\u0000') && !captionCheck(body?.caption)) {
      throw badRequest(captionMessage(captionCheck.errors![0].keyword), 'caption', 'validation');
    }
    throw refused;
  };
}

/** How one stored object goes out: its media type, inline or as an attachment, the name to save it under. */
export interface Served {
  mediaType: string;
  inline: boolean;
  name: string;
}

/**
 * Sends the bytes of an upload (a template file, a set's photo, their thumbnails): `nosniff`, the
 * media type and size, a policy of its own replacing the app's (SERVE_POLICY: PDFs theirs, other
 * inline types the image one, attachments `other`), inline or attachment under the given name, no
 * caching; then streams the object from storage. A stream that breaks once the headers are out
 * (the client went away, the storage failed) ends the response; nothing more can be answered.
 */
export async function sendStored(res: Response, object: StoredObject, { mediaType, inline, name }: Served): Promise<void> {
  res.setHeader('Content-Type', mediaType);
  if (object.size !== null) res.setHeader('Content-Length', String(object.size));
  res.setHeader('X-Content-Type-Options', 'nosniff');
  res.setHeader('Content-Security-Policy', !inline ? SERVE_POLICY.other : mediaType === PDF ? SERVE_POLICY.pdf : SERVE_POLICY.image);
  res.setHeader('Content-Disposition', contentDisposition(inline ? 'inline' : 'attachment', name));
  res.setHeader('Cache-Control', 'private, no-store');
  try {
    await pipeline(object.body, res);
  } catch (e) {
    if (!res.headersSent) throw e;
    res.destroy();
  }
}

const templateId = (req: Request) => Number(req.params.id);
const fileId = (req: Request) => Number(req.params.fileId);

/**
 * The multipart fields and file of an upload, checked: unknown fields, the caption, the route's
 * other field (`other`: its name and the message for a bad value), a missing or empty file. The
 * original name loses control characters and is kept to 200 characters (`fallback` when empty).
 */
export function checkedUpload<F extends { caption?: string }>(
  req: Request,
  check: ValidateFunction<F>,
  opts: { fields: string; other: string; otherMessage: string; fallback: string },
): { fields: F; file: Express.Multer.File; originalName: string } {
  const fields = { ...(req.body as Record<string, string>) } as unknown as F;
  if (!check(fields)) {
    const e = check.errors![0];
    if (e.keyword === 'additionalProperties') {
      const field = String((e.params as { additionalProperty: string }).additionalProperty);
      throw badRequest(`"${field}" is not a field this upload takes (${opts.fields}).`, field, 'validation');
    }
    if (e.instancePath === '/caption') throw badRequest(captionMessage(e.keyword), 'caption', 'validation');
    throw badRequest(opts.otherMessage, opts.other, 'validation');
  }
  if (!req.file) throw badRequest('No file: send it in the multipart field "file".', 'file', 'no-file');
  if (req.file.size === 0) throw badRequest('The file is empty.', 'file', 'empty-file');
  const originalName = (req.file.originalname || opts.fallback).replace(/[\u0000-\u001f\u007f]/g, '').slice(0, 200) || opts.fallback;
  return { fields, file: req.file, originalName };
}

export function fileRoutes(ctx: Ctx): RouteDef[] {
  const uploadPath = validate({ params: { id: ID } });
  const validateChange = withCaptionInWords(validate({ body: changeBody, params: { id: ID, fileId: ID } }));
  const ownerGate: RequestHandler = async (req, _res, next) => {
    await files.checkCanUpload(ctx, req.signedIn!, templateId(req));
    next();
  };
  const serve = (which: 'file' | 'thumbnail'): RequestHandler =>
    async (req, res) => {
      const { file, object } = await files.openFile(ctx, req.signedIn!, templateId(req), fileId(req), which);
      const mediaType = which === 'thumbnail' ? object.mediaType : file.mediaType;
      await sendStored(res, object, {
        mediaType,
        inline: INLINE_TYPES.includes(mediaType),
        name: which === 'thumbnail' ? `thumbnail-${downloadName(file.originalName, THUMBNAIL_TYPE)}` : downloadName(file.originalName, mediaType),
      });
    };

  return [
    {
      method: 'post',
      path: '/api/templates/:id/files',
      access: 'signed-in',
      summary: 'Upload a schematic or photo (multipart: file, optional stageKey and caption) to the template or a stage (owner)',
      validate: (req, res, next) => uploadPath(req, res, (err?: unknown) => (err ? next(err) : multipartOnly(req, res, next))),
      before: [ownerGate, uploadParser(ctx)],
      handler: async (req, res) => {
        const { fields, file, originalName } = checkedUpload(req, uploadFields, {
          fields: 'file, stageKey, caption',
          other: 'stageKey',
          otherMessage: '"stageKey" must be a stage key such as st-audio.',
          fallback: 'file',
        });
        res.status(201).json(await files.uploadFile(ctx, req.signedIn!, templateId(req), { bytes: file.buffer, originalName, stageKey: fields.stageKey, caption: fields.caption }));
      },
    },
    {
      method: 'get',
      path: '/api/templates/:id/files',
      access: 'signed-in',
      summary: 'The files of a template: stage, type, size, pixels, thumbnail address',
      validate: validate({ params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await files.listFiles(ctx, req.signedIn!, templateId(req)));
      },
    },
    {
      method: 'get',
      path: '/api/templates/:id/files/:fileId',
      access: 'signed-in',
      summary: 'The bytes of a file: images and PDFs inline, anything else as an attachment (nosniff, sandboxing policy)',
      validate: validate({ params: { id: ID, fileId: ID } }),
      handler: serve('file'),
    },
    {
      method: 'get',
      path: '/api/templates/:id/files/:fileId/thumbnail',
      access: 'signed-in',
      summary: 'The thumbnail of an image file (WebP, at most 320 px)',
      validate: validate({ params: { id: ID, fileId: ID } }),
      handler: serve('thumbnail'),
    },
    {
      method: 'patch',
      path: '/api/templates/:id/files/:fileId',
      access: 'signed-in',
      summary: 'Move a file to a stage (or to the whole template with stageKey null) and/or change its caption (owner)',
      validate: validateChange,
      handler: async (req, res) => {
        res.json(await files.changeFile(ctx, req.signedIn!, templateId(req), fileId(req), req.body as ChangeBody));
      },
    },
    {
      method: 'delete',
      path: '/api/templates/:id/files/:fileId',
      access: 'signed-in',
      summary: 'Delete a file and its stored bytes (owner)',
      validate: validate({ params: { id: ID, fileId: ID } }),
      handler: async (req, res) => {
        await files.deleteFile(ctx, req.signedIn!, templateId(req), fileId(req));
        res.status(204).end();
      },
    },
  ];
}
