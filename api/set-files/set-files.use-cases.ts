/**
 * Photos of a set (DESIGN.md §2 "set": intake notes, photos), each optionally attached to one
 * reading of one of the set's surveys.
 *
 * Access follows the set (api/sets/sets.repository.ts `visibleSet` / `editableSet`): its owner,
 * the users it is shared with and admins list, read, upload, change and delete; anyone else gets
 * a 404, the same as for a set that does not exist.
 *
 * Content: images only — JPEG, PNG and WebP, the type read from the bytes (api/files/media.ts
 * `sniff`), then prepared exactly as template images (`prepareUpload`: pixel limit from the
 * header, decoded within it, turned upright, re-encoded without metadata such as a GPS position,
 * a WebP thumbnail of at most 320 px beside it).
 */
import { randomUUID } from 'node:crypto';
import type { Db, Tx } from '../db';
import { thumbnailKey } from '../files/files.use-cases';
import { EXTENSIONS, prepareUpload, sniff, THUMBNAIL_TYPE } from '../files/media';
import { AppError, badRequest, notFound } from '../http/errors';
import { editableSet, visibleSet, type Actor } from '../sets/sets.repository';
import type { Storage, StoredObject } from '../storage/index';
import * as repo from './set-files.repository';

type Deps = { db: Db; storage: Storage; config: { upload: { maxPixels: number } } };

/** What a set takes: photographs and scans, no GIF, no PDF, no SVG. */
export const SET_PHOTO_TYPES: readonly string[] = ['image/jpeg', 'image/png', 'image/webp'];

/** One photo of a set as the API answers it. */
export interface SetFileRecord {
  id: number;
  setId: number;
  caption: string;
  /** The reading it is attached to, or null for the set as a whole. */
  readingId: number | null;
  /** The linked reading's test point and survey (null when not attached). */
  testPointKey: string | null;
  surveyId: number | null;
  name: string;
  mimeType: string;
  bytes: number;
  uploadedBy: { id: number; name: string } | null;
  createdAt: string;
  url: string;
  thumbnailUrl: string | null;
}

export function setFileView(f: repo.SetFileListed): SetFileRecord {
  const base = `/api/sets/${f.setId}/files/${f.id}`;
  return {
    id: f.id,
    setId: f.setId,
    caption: f.caption,
    readingId: f.readingId,
    testPointKey: f.readingId !== null ? f.testPointKey : null,
    surveyId: f.readingId !== null ? f.surveyId : null,
    name: f.originalName,
    mimeType: f.mimeType,
    bytes: f.bytes,
    uploadedBy: f.uploadedBy !== null && f.uploaderName !== null ? { id: f.uploadedBy, name: f.uploaderName } : null,
    createdAt: f.createdAt.toISOString(),
    url: base,
    thumbnailUrl: f.thumbnailKey !== null ? `${base}/thumbnail` : null,
  };
}

/** Before the body is read: may this caller add photos to the set at all? (404 otherwise.) */
export async function checkCanUpload(ctx: Deps, actor: Actor, setId: number): Promise<void> {
  await visibleSet(ctx.db, actor, setId);
}

/** The reading must belong to one of this set's surveys: a 400 naming `readingId` otherwise. */
async function checkReading(tx: Tx, setId: number, readingId: number | null | undefined): Promise<void> {
  if (readingId === null || readingId === undefined) return;
  if (!(await repo.readingOfSet(tx, setId, readingId))) throw badRequest(`Reading ${readingId} is not a reading of this set's surveys.`, 'readingId', 'validation');
}

export interface SetUpload {
  bytes: Buffer;
  originalName: string;
  /** One line of plain text (checked at the edge); trimmed; '' or absent = none. */
  caption?: string;
  readingId?: number;
}

/** Checks the content, prepares it (re-encoded, thumbnail), stores it and records it. */
export async function uploadSetFile(ctx: Deps, actor: Actor, setId: number, u: SetUpload): Promise<SetFileRecord> {
  await visibleSet(ctx.db, actor, setId);
  await checkReading(ctx.db, setId, u.readingId);
  const type = await sniff(u.bytes);
  if (!type || !SET_PHOTO_TYPES.includes(type)) {
    throw new AppError(
      400,
      'unsupported-file-type',
      `This file is ${type ? `of type ${type}` : 'of no type we recognise from its content'}; a set's photos are JPEG, PNG or WebP images (the type is read from the content, not the name).`,
      { field: 'file' },
    );
  }
  const p = await prepareUpload(u.bytes, ctx.config.upload.maxPixels);
  const key = `sets/${setId}/${randomUUID()}.${EXTENSIONS[p.mediaType] ?? 'bin'}`;
  const thumb = p.thumbnail ? thumbnailKey(key) : null;
  await ctx.storage.put(key, p.bytes, p.mediaType);
  if (thumb && p.thumbnail) await ctx.storage.put(thumb, p.thumbnail, THUMBNAIL_TYPE);
  try {
    return await ctx.db.transaction(async (tx) => {
      await editableSet(tx, actor, setId);
      await checkReading(tx, setId, u.readingId);
      const row = await repo.insertSetFile(tx, {
        setId,
        readingId: u.readingId ?? null,
        storageKey: key,
        thumbnailKey: thumb,
        originalName: u.originalName,
        mimeType: p.mediaType,
        bytes: p.bytes.length,
        caption: (u.caption ?? '').trim(),
        uploadedBy: actor.id,
      });
      return setFileView((await repo.findSetFile(tx, setId, row.id))!);
    });
  } catch (e) {
    // Nothing recorded: nothing kept.
    await ctx.storage.delete(key).catch(() => undefined);
    if (thumb) await ctx.storage.delete(thumb).catch(() => undefined);
    throw e;
  }
}

export async function listSetFiles(ctx: Deps, actor: Actor, setId: number): Promise<{ setId: number; items: SetFileRecord[] }> {
  await visibleSet(ctx.db, actor, setId);
  return { setId, items: (await repo.listSetFiles(ctx.db, setId)).map(setFileView) };
}

async function fileOf(tx: Tx, setId: number, fileId: number): Promise<repo.SetFileListed> {
  const f = await repo.findSetFile(tx, setId, fileId);
  if (!f) throw notFound('No such photo on this set.');
  return f;
}

/** The stored bytes of a photo (or of its thumbnail) with its record. */
export async function openSetFile(ctx: Deps, actor: Actor, setId: number, fileId: number, which: 'file' | 'thumbnail'): Promise<{ file: repo.SetFileListed; object: StoredObject }> {
  await visibleSet(ctx.db, actor, setId);
  const file = await fileOf(ctx.db, setId, fileId);
  const key = which === 'file' ? file.storageKey : file.thumbnailKey;
  if (key === null) throw notFound('This photo has no thumbnail.');
  const object = await ctx.storage.get(key);
  if (!object) throw notFound('The stored bytes of this photo are missing.', 'file-missing');
  return { file, object };
}

export interface SetFileChange {
  /** The new caption (trimmed; '' clears it); absent = unchanged. */
  caption?: string;
  /** A reading of one of the set's surveys, or null to detach; absent = unchanged. */
  readingId?: number | null;
}

/** Changes a photo's caption and/or the reading it is attached to. */
export async function changeSetFile(ctx: Deps, actor: Actor, setId: number, fileId: number, change: SetFileChange): Promise<SetFileRecord> {
  return ctx.db.transaction(async (tx) => {
    await editableSet(tx, actor, setId);
    await fileOf(tx, setId, fileId);
    if (change.readingId !== undefined) await checkReading(tx, setId, change.readingId);
    const set: repo.SetFileChangeSet = {};
    if (change.caption !== undefined) set.caption = change.caption.trim();
    if (change.readingId !== undefined) set.readingId = change.readingId;
    if (Object.keys(set).length) await repo.updateSetFile(tx, fileId, set);
    return setFileView(await fileOf(tx, setId, fileId));
  });
}

/** Removes the record, then the stored photo and its thumbnail. */
export async function deleteSetFile(ctx: Deps, actor: Actor, setId: number, fileId: number): Promise<void> {
  const file = await ctx.db.transaction(async (tx) => {
    await editableSet(tx, actor, setId);
    const f = await fileOf(tx, setId, fileId);
    await repo.deleteSetFile(tx, fileId);
    return f;
  });
  await ctx.storage.delete(file.storageKey);
  if (file.thumbnailKey !== null) await ctx.storage.delete(file.thumbnailKey);
}
