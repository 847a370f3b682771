/**
 * Routes of a set's photos, on the pattern of template files (api/files/files.routes.ts, whose
 * pieces they reuse). Uploads are multipart (`file`, optional `caption` and `readingId`): the path
 * and the content type are checked first (a 400 before any 401), then the sign-in and the set's
 * visibility, and only then is the body read (multer, in memory, within UPLOAD_MAX_BYTES) — an
 * anonymous caller or a stranger to the set never makes the server buffer a file.
 *
 * Served bytes: as template files (sendStored): `nosniff`, `inline` with the image policy
 * (SERVE_POLICY.image) replacing the app's, no caching.
 */
import type { JSONSchemaType } from 'ajv';
import type { Request, RequestHandler } from 'express';
import type { Ctx } from '../context';
import { CAPTION_MAX, checkedUpload, multipartOnly, sendStored, uploadParser, withCaptionInWords } from '../files/files.routes';
import { downloadName, THUMBNAIL_TYPE } from '../files/media';
import { badRequest } from '../http/errors';
import type { RouteDef } from '../http/route-table';
import { ajv, ID, validate } from '../http/validate';
import { line } from '../templates/template-schema';
import * as photos from './set-files.use-cases';

const caption = line(CAPTION_MAX);
/** A reading id in a multipart field (text): a positive integer within JavaScript's exact range. */
const READING_ID_TEXT = '^[1-9][0-9]{0,15}$';
const readingIdNumber = { type: 'integer', minimum: 1, maximum: Number.MAX_SAFE_INTEGER } as const;

interface UploadFields {
  caption?: string;
  readingId?: string;
}
const uploadFields = ajv.compile({
  type: 'object',
  properties: { caption, readingId: { type: 'string', pattern: READING_ID_TEXT } },
  required: [],
  additionalProperties: false,
} as unknown as JSONSchemaType<UploadFields>);

interface ChangeBody {
  caption?: string;
  readingId?: number | null;
}
/** A new caption, a reading to attach to (null detaches), or both; at least one. */
const changeBody = {
  type: 'object',
  properties: { caption, readingId: { anyOf: [readingIdNumber, { type: 'null' }] } },
  required: [],
  minProperties: 1,
  additionalProperties: false,
} as unknown as JSONSchemaType<ChangeBody>;

const setId = (req: Request) => Number(req.params.id);
const fileId = (req: Request) => Number(req.params.fileId);

export function setFileRoutes(ctx: Ctx): RouteDef[] {
  const uploadPath = validate({ params: { id: ID } });
  /** The shared validation, with a refused caption said in words (as template files). */
  const validateChange = withCaptionInWords(validate({ body: changeBody, params: { id: ID, fileId: ID } }));
  const setGate: RequestHandler = async (req, _res, next) => {
    await photos.checkCanUpload(ctx, req.signedIn!, setId(req));
    next();
  };
  const serve = (which: 'file' | 'thumbnail'): RequestHandler =>
    async (req, res) => {
      const { file, object } = await photos.openSetFile(ctx, req.signedIn!, setId(req), fileId(req), which);
      const mediaType = which === 'thumbnail' ? object.mediaType : file.mimeType;
      await sendStored(res, object, {
        mediaType,
        // Only images are taken; a record of another type (none can be uploaded) would go as an attachment.
        inline: which === 'thumbnail' || photos.SET_PHOTO_TYPES.includes(mediaType),
        name: which === 'thumbnail' ? `thumbnail-${downloadName(file.originalName, THUMBNAIL_TYPE)}` : downloadName(file.originalName, mediaType),
      });
    };

  return [
    {
      method: 'post',
      path: '/api/sets/:id/files',
      access: 'signed-in',
      summary: "Upload a photo of a set (multipart: file, optional caption and readingId — a reading of one of the set's surveys); JPEG, PNG or WebP",
      validate: (req, res, next) => uploadPath(req, res, (err?: unknown) => (err ? next(err) : multipartOnly(req, res, next))),
      before: [setGate, uploadParser(ctx)],
      handler: async (req, res) => {
        const { fields, file, originalName } = checkedUpload(req, uploadFields, {
          fields: 'file, caption, readingId',
          other: 'readingId',
          otherMessage: '"readingId" must be the id of a reading (a positive whole number).',
          fallback: 'photo',
        });
        const readingId = fields.readingId !== undefined ? Number(fields.readingId) : undefined;
        if (readingId !== undefined && !Number.isSafeInteger(readingId)) throw badRequest('"readingId" is out of range.', 'readingId', 'validation');
        res.status(201).json(await photos.uploadSetFile(ctx, req.signedIn!, setId(req), { bytes: file.buffer, originalName, caption: fields.caption, readingId }));
      },
    },
    {
      method: 'get',
      path: '/api/sets/:id/files',
      access: 'signed-in',
      summary: "The photos of a set: caption, the linked reading's test point, type, size, who uploaded, when, addresses",
      validate: validate({ params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await photos.listSetFiles(ctx, req.signedIn!, setId(req)));
      },
    },
    {
      method: 'get',
      path: '/api/sets/:id/files/:fileId',
      access: 'signed-in',
      summary: 'The bytes of a photo of a set (inline, nosniff, a policy of its own)',
      validate: validate({ params: { id: ID, fileId: ID } }),
      handler: serve('file'),
    },
    {
      method: 'get',
      path: '/api/sets/:id/files/:fileId/thumbnail',
      access: 'signed-in',
      summary: 'The thumbnail of a photo of a set (WebP, at most 320 px)',
      validate: validate({ params: { id: ID, fileId: ID } }),
      handler: serve('thumbnail'),
    },
    {
      method: 'patch',
      path: '/api/sets/:id/files/:fileId',
      access: 'signed-in',
      summary: "Change a photo's caption and/or attach it to a reading of the set's surveys (readingId null detaches)",
      validate: validateChange,
      handler: async (req, res) => {
        res.json(await photos.changeSetFile(ctx, req.signedIn!, setId(req), fileId(req), req.body as ChangeBody));
      },
    },
    {
      method: 'delete',
      path: '/api/sets/:id/files/:fileId',
      access: 'signed-in',
      summary: 'Delete a photo of a set and its stored bytes',
      validate: validate({ params: { id: ID, fileId: ID } }),
      handler: async (req, res) => {
        await photos.deleteSetFile(ctx, req.signedIn!, setId(req), fileId(req));
        res.status(204).end();
      },
    },
  ];
}
