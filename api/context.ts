import type { AppConfig } from './config';
import type { Db } from './db';
import type { Outbox } from './mail/outbox';

/** What use cases need: never req/res. */
export interface Ctx {
  db: Db;
  config: AppConfig;
  outbox: Outbox;
  /** Absolute base for links in mail: PUBLIC_BASE_URL, or the local address. */
  linkBase: string;
}
