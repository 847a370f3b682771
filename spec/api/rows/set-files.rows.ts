/**
 * Access-matrix and bad-input rows of a set's photos (see ./index.ts). Every route follows
 * `SEE_SET` (owner, shared-with users and admins; someone else's set a 404). The upload is
 * multipart: its bad requests are in spec/api/set-files.spec.ts; the bad-input row covers the
 * JSON write (PATCH).
 */
import sharp from 'sharp';
import { uploadSetFile } from '../../../api/set-files/set-files.use-cases';
import { storageFromConfig } from '../../../api/storage/index';
import { apiEnv } from '../../support/api-env';
import { owned, type WriteRoute } from '../../support/bad-input-kit';
import { addReading, makeSet, makeSurvey } from '../../support/bench-fixtures';
import type { Caller, Expect, MatrixRequest } from '../../support/matrix-kit';
import { SEE_SET } from './sets.rows';

const smallPng = () => sharp({ create: { width: 8, height: 8, channels: 3, background: { r: 120, g: 80, b: 30 } } }).png().toBuffer();

/**
 * A set of `ownerId`'s (a fresh technician's when absent) with one photo, stored where the app
 * under test keeps its files; with `reading`, a survey and one reading of it too.
 */
export async function setWithPhoto(ownerId?: number, opts: { reading?: boolean } = {}): Promise<{ id: number; ownerId: number; fileId: number; readingId: number | null }> {
  const env = await apiEnv();
  const set = await makeSet({ ownerId });
  const readingId = opts.reading ? await addReading((await makeSurvey({ setId: set.id })).id, { testPointKey: 'tp-r2', text: '262k' }) : null;
  const f = await uploadSetFile(
    { db: env.database.db, storage: storageFromConfig(env.config), config: env.config },
    { id: set.ownerId, roles: ['technician'] },
    set.id,
    { bytes: await smallPng(), originalName: 'intake.png', caption: 'Chassis at intake' },
  );
  return { id: set.id, ownerId: set.ownerId, fileId: f.id, readingId };
}

export const SET_FILE_MATRIX: Record<string, Record<Caller, Expect>> = {
  'POST /api/sets/:id/files': SEE_SET,
  'GET /api/sets/:id/files': SEE_SET,
  'GET /api/sets/:id/files/:fileId': SEE_SET,
  'GET /api/sets/:id/files/:fileId/thumbnail': SEE_SET,
  'PATCH /api/sets/:id/files/:fileId': SEE_SET,
  'DELETE /api/sets/:id/files/:fileId': SEE_SET,
};

export const SET_FILE_REQUESTS: Record<string, MatrixRequest> = {
  'POST /api/sets/:id/files': async (a, h, ownerId) =>
    a
      .post(`/api/sets/${(await makeSet({ ownerId })).id}/files`)
      .set(h)
      .field('caption', 'Dial glass, front')
      .attach('file', await smallPng(), 'matrix.png'),
  'GET /api/sets/:id/files': async (a, h, ownerId) => a.get(`/api/sets/${(await setWithPhoto(ownerId)).id}/files`).set(h),
  'GET /api/sets/:id/files/:fileId': async (a, h, ownerId) => {
    const s = await setWithPhoto(ownerId);
    return a.get(`/api/sets/${s.id}/files/${s.fileId}`).set(h);
  },
  'GET /api/sets/:id/files/:fileId/thumbnail': async (a, h, ownerId) => {
    const s = await setWithPhoto(ownerId);
    return a.get(`/api/sets/${s.id}/files/${s.fileId}/thumbnail`).set(h);
  },
  'PATCH /api/sets/:id/files/:fileId': async (a, h, ownerId) => {
    const s = await setWithPhoto(ownerId);
    return a.patch(`/api/sets/${s.id}/files/${s.fileId}`).set(h).send({ caption: 'Chassis underside at intake' });
  },
  'DELETE /api/sets/:id/files/:fileId': async (a, h, ownerId) => {
    const s = await setWithPhoto(ownerId);
    return a.delete(`/api/sets/${s.id}/files/${s.fileId}`).set(h);
  },
};

export const SET_FILE_BAD_INPUT: Record<string, WriteRoute> = {
  'PATCH /api/sets/:id/files/:fileId': owned(
    'patch',
    async (o) => {
      const s = await setWithPhoto(o.user.id, { reading: true });
      return { path: `/api/sets/${s.id}/files/${s.fileId}`, body: { caption: 'R2 plate load, scorched body', readingId: s.readingId } };
    },
    // Either field alone is a change; an empty object is not.
    ['caption', 'readingId'],
    // null detaches the photo from its reading; '' clears the caption; a caption is free text (stored, never run).
    ['readingId as null', 'caption empty', 'caption with SQL injection'],
    ['technician'],
  ),
};
