import type { AppConfig } from './config';
import type { Db } from './db';
import type { Outbox } from './mail/outbox';
import type { Storage } from './storage/index';

/** What use cases need: never req/res. */
export interface Ctx {
  db: Db;
  config: AppConfig;
  outbox: Outbox;
  /** Absolute base for links in mail: PUBLIC_BASE_URL, or the local address. */
  linkBase: string;
  /** Where uploaded files live (fs or s3). */
  storage: Storage;
}
