/** Uploads in a folder (by default `<dataDir>/uploads`): the bytes, and the media type beside them. */
import { createReadStream } from 'node:fs';
import { mkdir, readFile, rename, rm, stat, writeFile } from 'node:fs/promises';
import { randomBytes } from 'node:crypto';
import { dirname, join } from 'node:path';
import { checkKey, type Storage, type StoredObject } from './storage';

const TYPE_SUFFIX = '.media-type';

export class FsStorage implements Storage {
  readonly kind = 'fs' as const;
  constructor(readonly root: string) {}

  private path(key: string): string {
    return join(this.root, ...checkKey(key).split('/'));
  }

  async put(key: string, bytes: Buffer, mediaType: string): Promise<void> {
    const file = this.path(key);
    await mkdir(dirname(file), { recursive: true });
    // Write beside, then rename: a reader never sees half a file.
    const tmp = `${file}.${randomBytes(6).toString('hex')}.partial`;
    await writeFile(tmp, bytes, { mode: 0o640 });
    await writeFile(file + TYPE_SUFFIX, mediaType, { mode: 0o640 });
    await rename(tmp, file);
  }

  async get(key: string): Promise<StoredObject | null> {
    const file = this.path(key);
    let size: number;
    try {
      size = (await stat(file)).size;
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code === 'ENOENT') return null;
      throw e;
    }
    const mediaType = (await readFile(file + TYPE_SUFFIX, 'utf8').catch(() => 'application/octet-stream')).trim();
    return { body: createReadStream(file), mediaType, size };
  }

  async delete(key: string): Promise<void> {
    const file = this.path(key);
    await rm(file, { force: true });
    await rm(file + TYPE_SUFFIX, { force: true });
  }
}
