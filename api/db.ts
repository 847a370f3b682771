import { drizzle, type NodePgDatabase } from 'drizzle-orm/node-postgres';
import pg from 'pg';
import * as schema from '../schema/index';

export type Db = NodePgDatabase<typeof schema>;
/** A Drizzle handle or a transaction: repositories take either so use cases can compose them. */
export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0] | Db;

export interface Database {
  pool: pg.Pool;
  db: Db;
  close(): Promise<void>;
}

export function createDatabase(url: string, opts: { max?: number; onError?: (err: Error) => void } = {}): Database {
  const pool = new pg.Pool({
    connectionString: url,
    max: opts.max ?? 20,
    connectionTimeoutMillis: 3000,
    idleTimeoutMillis: 30000,
  });
  // An idle client losing its server (PostgreSQL restarted) must not crash the process.
  pool.on('error', (err) => opts.onError?.(err));
  const db = drizzle(pool, { schema, casing: 'snake_case' });
  return { pool, db, close: () => pool.end() };
}
