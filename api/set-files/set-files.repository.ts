/** Photos of a set: the records (the bytes live in the storage under `storageKey` and `thumbnailKey`). */
import { and, asc, eq, isNull } from 'drizzle-orm';
import { readings, setFiles, surveys, users } from '../../schema/index';
import type { Tx } from '../db';

export type SetFileRow = typeof setFiles.$inferSelect;
export type SetFileInsert = typeof setFiles.$inferInsert;

/** A record with what the list shows beside it: the linked reading's test point and survey, the uploader's name. */
export interface SetFileListed extends SetFileRow {
  testPointKey: string | null;
  surveyId: number | null;
  uploaderName: string | null;
}

const LISTED = {
  id: setFiles.id,
  setId: setFiles.setId,
  readingId: setFiles.readingId,
  storageKey: setFiles.storageKey,
  thumbnailKey: setFiles.thumbnailKey,
  originalName: setFiles.originalName,
  mimeType: setFiles.mimeType,
  bytes: setFiles.bytes,
  caption: setFiles.caption,
  uploadedBy: setFiles.uploadedBy,
  createdAt: setFiles.createdAt,
  testPointKey: readings.testPointKey,
  surveyId: readings.surveyId,
  uploaderName: users.name,
};

function listed(tx: Tx) {
  return tx.select(LISTED).from(setFiles).leftJoin(readings, eq(readings.id, setFiles.readingId)).leftJoin(users, eq(users.id, setFiles.uploadedBy));
}

export async function insertSetFile(tx: Tx, values: SetFileInsert): Promise<SetFileRow> {
  const [row] = await tx.insert(setFiles).values(values).returning();
  return row;
}

export async function listSetFiles(tx: Tx, setId: number): Promise<SetFileListed[]> {
  return listed(tx).where(eq(setFiles.setId, setId)).orderBy(asc(setFiles.id));
}

export async function findSetFile(tx: Tx, setId: number, fileId: number): Promise<SetFileListed | undefined> {
  const [row] = await listed(tx).where(and(eq(setFiles.setId, setId), eq(setFiles.id, fileId)));
  return row;
}

/** A reading of one of the set's own surveys (its id and test point), or undefined; class surveys are their students' (DEVELOPERS.md "Classes"). */
export async function readingOfSet(tx: Tx, setId: number, readingId: number): Promise<{ id: number; testPointKey: string; surveyId: number } | undefined> {
  const [row] = await tx
    .select({ id: readings.id, testPointKey: readings.testPointKey, surveyId: readings.surveyId })
    .from(readings)
    .innerJoin(surveys, eq(surveys.id, readings.surveyId))
    .where(and(eq(readings.id, readingId), eq(surveys.setId, setId), isNull(surveys.assignmentId)));
  return row;
}

export type SetFileChangeSet = Partial<Pick<SetFileInsert, 'caption' | 'readingId'>>;

export async function updateSetFile(tx: Tx, fileId: number, set: SetFileChangeSet): Promise<void> {
  await tx.update(setFiles).set(set).where(eq(setFiles.id, fileId));
}

export async function deleteSetFile(tx: Tx, fileId: number): Promise<void> {
  await tx.delete(setFiles).where(eq(setFiles.id, fileId));
}

