/**
 * Files on a template and on its stages: schematics (PDF or image) and photos.
 *
 * Access follows the template (templates.use-cases `visible`/`ownerOnly`): whoever may see the
 * template lists and reads its files; only the owner uploads, moves and deletes (anyone else who
 * can see it gets a 403); someone else's private template is a 404.
 */
import { randomUUID } from 'node:crypto';
import type { TemplateDocument } from '../domain/template-format';
import type { Db, Tx } from '../db';
import { badRequest, notFound } from '../http/errors';
import type { Storage, StoredObject } from '../storage/index';
import { findDraft, latestSnapshot } from '../templates/templates.repository';
import { ownerOnly, visible, type Actor } from '../templates/templates.use-cases';
import * as repo from './files.repository';
import { EXTENSIONS, PDF, prepareUpload, THUMBNAIL_TYPE } from './media';

type Deps = { db: Db; storage: Storage; config: { upload: { maxPixels: number } } };

/** The thumbnail sits beside the file in the storage. */
export const thumbnailKey = (storageKey: string) => `${storageKey}.thumb.webp`;

/** The stages of the template as its owner last shaped them (draft, else the newest version). */
async function stagesOf(tx: Tx, templateId: number): Promise<Map<string, string>> {
  const stages = new Map<string, string>();
  for (const v of [await findDraft(tx, templateId), await latestSnapshot(tx, templateId)]) {
    for (const s of (v?.content as TemplateDocument | undefined)?.stages ?? []) if (!stages.has(s.key)) stages.set(s.key, s.name);
  }
  return stages;
}

async function checkStage(tx: Tx, templateId: number, stageKey: string | null | undefined): Promise<void> {
  if (stageKey === null || stageKey === undefined) return;
  if (!(await stagesOf(tx, templateId)).has(stageKey)) throw badRequest(`This template has no stage "${stageKey}".`, 'stageKey', 'validation');
}

export function fileView(f: repo.FileRow, stages: Map<string, string>) {
  const base = `/api/templates/${f.templateId}/files/${f.id}`;
  const image = f.mediaType.startsWith('image/');
  return {
    id: f.id,
    templateId: f.templateId,
    stageKey: f.stageKey,
    stageName: f.stageKey !== null ? (stages.get(f.stageKey) ?? null) : null,
    name: f.originalName,
    caption: f.caption,
    mediaType: f.mediaType,
    kind: image ? ('image' as const) : f.mediaType === PDF ? ('pdf' as const) : ('other' as const),
    bytes: f.bytes,
    width: f.width,
    height: f.height,
    url: base,
    thumbnailUrl: image ? `${base}/thumbnail` : null,
    createdBy: f.createdBy,
    createdAt: f.createdAt.toISOString(),
  };
}

/** Before the body is read: may this caller upload to the template at all? (404, then 403.) */
export async function checkCanUpload(ctx: Deps, actor: Actor, templateId: number): Promise<void> {
  ownerOnly(await visible(ctx.db, actor, templateId), 'add files');
}

export interface Upload {
  bytes: Buffer;
  originalName: string;
  stageKey?: string;
  /** One line of plain text (checked at the edge); trimmed; '' or absent = none. */
  caption?: string;
}

/** Checks the content, prepares it (images re-encoded, thumbnail), stores it and records it. */
export async function uploadFile(ctx: Deps, actor: Actor, templateId: number, u: Upload) {
  ownerOnly(await visible(ctx.db, actor, templateId), 'add files');
  await checkStage(ctx.db, templateId, u.stageKey);
  const p = await prepareUpload(u.bytes, ctx.config.upload.maxPixels);
  const key = `templates/${templateId}/${randomUUID()}.${EXTENSIONS[p.mediaType] ?? 'bin'}`;
  await ctx.storage.put(key, p.bytes, p.mediaType);
  if (p.thumbnail) await ctx.storage.put(thumbnailKey(key), p.thumbnail, THUMBNAIL_TYPE);
  try {
    return await ctx.db.transaction(async (tx) => {
      ownerOnly(await visible(tx, actor, templateId, true), 'add files');
      const row = await repo.insertFile(tx, {
        templateId,
        stageKey: u.stageKey ?? null,
        storageKey: key,
        originalName: u.originalName,
        caption: (u.caption ?? '').trim(),
        mediaType: p.mediaType,
        bytes: p.bytes.length,
        width: p.width,
        height: p.height,
        createdBy: actor.id,
      });
      return fileView(row, await stagesOf(tx, templateId));
    });
  } catch (e) {
    // Nothing recorded: nothing kept.
    await ctx.storage.delete(key).catch(() => undefined);
    if (p.thumbnail) await ctx.storage.delete(thumbnailKey(key)).catch(() => undefined);
    throw e;
  }
}

export async function listFiles(ctx: Deps, actor: Actor, templateId: number) {
  await visible(ctx.db, actor, templateId);
  const stages = await stagesOf(ctx.db, templateId);
  return { templateId, items: (await repo.listFiles(ctx.db, templateId)).map((f) => fileView(f, stages)) };
}

async function fileOf(tx: Tx, templateId: number, fileId: number): Promise<repo.FileRow> {
  const f = await repo.findFile(tx, templateId, fileId);
  if (!f) throw notFound('No such file on this template.');
  return f;
}

/** The stored bytes of a file (or of its thumbnail) with its record. */
export async function openFile(ctx: Deps, actor: Actor, templateId: number, fileId: number, which: 'file' | 'thumbnail'): Promise<{ file: repo.FileRow; object: StoredObject }> {
  await visible(ctx.db, actor, templateId);
  const file = await fileOf(ctx.db, templateId, fileId);
  if (which === 'thumbnail' && !file.mediaType.startsWith('image/')) throw notFound('This file has no thumbnail (only images have one).');
  const object = await ctx.storage.get(which === 'file' ? file.storageKey : thumbnailKey(file.storageKey));
  if (!object) throw notFound('The stored bytes of this file are missing.', 'file-missing');
  return { file, object };
}

export interface FileChange {
  /** A stage, or null for the whole template; absent = where it is. */
  stageKey?: string | null;
  /** The new caption (trimmed; '' clears it); absent = unchanged. */
  caption?: string;
}

/** Moves a file to a stage or to the whole template (`stageKey: null`) and/or changes its caption. */
export async function changeFile(ctx: Deps, actor: Actor, templateId: number, fileId: number, change: FileChange) {
  return ctx.db.transaction(async (tx) => {
    ownerOnly(await visible(tx, actor, templateId, true), 'change its files');
    const file = await fileOf(tx, templateId, fileId);
    if (change.stageKey !== undefined) await checkStage(tx, templateId, change.stageKey);
    const set: repo.FileChangeSet = {};
    if (change.stageKey !== undefined) set.stageKey = change.stageKey;
    if (change.caption !== undefined) set.caption = change.caption.trim();
    const row = Object.keys(set).length ? await repo.updateFile(tx, fileId, set) : file;
    return fileView(row, await stagesOf(tx, templateId));
  });
}

/** Removes the record, then the stored object and its thumbnail. */
export async function deleteFile(ctx: Deps, actor: Actor, templateId: number, fileId: number): Promise<void> {
  const file = await ctx.db.transaction(async (tx) => {
    ownerOnly(await visible(tx, actor, templateId, true), 'delete its files');
    const f = await fileOf(tx, templateId, fileId);
    await repo.deleteFile(tx, fileId);
    return f;
  });
  await ctx.storage.delete(file.storageKey);
  if (file.mediaType.startsWith('image/')) await ctx.storage.delete(thumbnailKey(file.storageKey));
}
