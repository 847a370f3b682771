/** The storage the settings ask for: `fs` under `<dataDir>/uploads`, or `s3` with the S3_* settings. */
import { join } from 'node:path';
import type { AppConfig } from '../config';
import { FsStorage } from './fs-storage';
import { S3Storage } from './s3-storage';
import type { Storage } from './storage';

export { FsStorage } from './fs-storage';
export { S3Storage, type S3Settings } from './s3-storage';
export { readAll, type Storage, type StoredObject } from './storage';

export function storageFromConfig(config: AppConfig): Storage {
  if (config.storage === 's3') {
    if (!config.s3) throw new Error('STORAGE=s3 needs the S3_* settings');
    return new S3Storage(config.s3);
  }
  return new FsStorage(join(config.dataDir, 'uploads'));
}
