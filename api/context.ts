import type { AppConfig } from './config';
import type { Db } from './db';
import type { Outbox } from './mail/outbox';
import type { Storage } from './storage/index';

/**
 * Fault seams for specs (DESIGN.md §4 "seams for injected faults"): called by a save inside its
 * transaction just before COMMIT ('before-commit') and right after COMMIT, before answering
 * ('after-commit'). A spec delays or throws there; production passes none.
 */
export interface Faults {
  around(op: string, phase: 'before-commit' | 'after-commit'): Promise<void>;
}

/** What use cases need: never req/res. */
export interface Ctx {
  db: Db;
  config: AppConfig;
  outbox: Outbox;
  /** Absolute base for links in mail: PUBLIC_BASE_URL, or the local address. */
  linkBase: string;
  /** Where uploaded files live (fs or s3). */
  storage: Storage;
  /** Injected faults (specs only); absent in production. */
  faults?: Faults;
}
