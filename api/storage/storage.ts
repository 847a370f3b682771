/**
 * Where uploaded bytes live: a folder under the data folder (`STORAGE=fs`, the default) or an
 * S3-compatible bucket (`STORAGE=s3`). Use cases see only this interface; the database keeps the
 * key, the media type and the size beside the record.
 */
import type { Readable } from 'node:stream';

export interface StoredObject {
  body: Readable;
  mediaType: string;
  /** Bytes, when the backend knows it (both do). */
  size: number | null;
}

export interface Storage {
  readonly kind: 'fs' | 's3';
  /** Writes (or replaces) the object at `key`. */
  put(key: string, bytes: Buffer, mediaType: string): Promise<void>;
  /** The object, or null when there is none at `key`. */
  get(key: string): Promise<StoredObject | null>;
  /** Removes the object; removing one that is not there is not an error. */
  delete(key: string): Promise<void>;
}

/** Keys are ours (never a user's file name): segments of [A-Za-z0-9._-], no `.` or `..` segment. */
const KEY = /^(?!.*(^|\/)\.{1,2}(\/|$))[A-Za-z0-9._-]+(\/[A-Za-z0-9._-]+)*$/;

export function checkKey(key: string): string {
  if (key.length > 512 || !KEY.test(key)) throw new Error(`Storage key not allowed: ${JSON.stringify(key.slice(0, 80))}`);
  return key;
}

/** Reads a whole object into memory (specs and small objects). */
export async function readAll(o: StoredObject): Promise<Buffer> {
  const chunks: Buffer[] = [];
  for await (const c of o.body) chunks.push(Buffer.isBuffer(c) ? c : Buffer.from(c as Uint8Array));
  return Buffer.concat(chunks);
}
