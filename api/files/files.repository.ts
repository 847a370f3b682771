/** Template files: the records (the bytes live in the storage under `storageKey`). */
import { and, asc, eq } from 'drizzle-orm';
import { templateFiles } from '../../schema/index';
import type { Tx } from '../db';

export type FileRow = typeof templateFiles.$inferSelect;
export type FileInsert = typeof templateFiles.$inferInsert;

export async function insertFile(tx: Tx, values: FileInsert): Promise<FileRow> {
  const [row] = await tx.insert(templateFiles).values(values).returning();
  return row;
}

export async function listFiles(tx: Tx, templateId: number): Promise<FileRow[]> {
  return tx.select().from(templateFiles).where(eq(templateFiles.templateId, templateId)).orderBy(asc(templateFiles.id));
}

export async function findFile(tx: Tx, templateId: number, fileId: number): Promise<FileRow | undefined> {
  const [row] = await tx.select().from(templateFiles).where(and(eq(templateFiles.templateId, templateId), eq(templateFiles.id, fileId)));
  return row;
}

export type FileChangeSet = Partial<Pick<FileInsert, 'stageKey' | 'caption'>>;

export async function updateFile(tx: Tx, fileId: number, set: FileChangeSet): Promise<FileRow> {
  const [row] = await tx.update(templateFiles).set(set).where(eq(templateFiles.id, fileId)).returning();
  return row;
}

export async function deleteFile(tx: Tx, fileId: number): Promise<void> {
  await tx.delete(templateFiles).where(eq(templateFiles.id, fileId));
}
