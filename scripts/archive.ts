/**
 * What `npm run backup` and `npm run restore` share: the archive's layout and manifest, the
 * PostgreSQL client tools (pg_dump, pg_restore, psql from the cluster's own binaries), the target
 * (DATABASE_URL, or the private cluster of `npm start`, started for the job and stopped again when
 * it was not running), the uploads' storage, and a small argument reader.
 *
 * The archive (one gzipped tar file):
 *   manifest.json     format "driftmark-backup", formatVersion, createdAt, app, database, uploads
 *   database.dump     `pg_dump --format=custom` of the whole database
 *   uploads/<key>     every stored upload, by its storage key (media type and SHA-256 in the manifest)
 */
import { spawn } from 'node:child_process';
import { createHash } from 'node:crypto';
import { createReadStream, existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import pg from 'pg';
import { ConfigError, loadConfig } from '../api/config';
import { FsStorage } from '../api/storage/fs-storage';
import type { Storage } from '../api/storage/storage';
import { chooseDataDir, findPgBin, portInUse, PROJECT_ROOT, startCluster, stopCluster, type Cluster } from './cluster';

export const ARCHIVE_FORMAT = 'driftmark-backup';
export const ARCHIVE_FORMAT_VERSION = 1;
export const MANIFEST_FILE = 'manifest.json';
export const DUMP_FILE = 'database.dump';
export const UPLOADS_DIR = 'uploads';

/** A refusal or a problem the user can act on: printed as one message, exit code 1. */
export class BackupError extends Error {}

export interface UploadEntry {
  key: string;
  mediaType: string;
  bytes: number;
  sha256: string;
}

export interface Manifest {
  format: typeof ARCHIVE_FORMAT;
  formatVersion: number;
  createdAt: string;
  app: { name: string; version: string };
  database: {
    name: string;
    serverVersion: string;
    dumpFile: string;
    dumpFormat: 'custom';
    dumpBytes: number;
    /** Rows per table of the `public` schema, counted in the dump's own snapshot. */
    tables: Record<string, number>;
  };
  uploads: { source: 'fs' | 's3'; count: number; bytes: number; items: UploadEntry[] };
}

export function appInfo(): { name: string; version: string } {
  const p = JSON.parse(readFileSync(join(PROJECT_ROOT, 'package.json'), 'utf8')) as { name: string; version: string };
  return { name: p.name, version: p.version };
}

/** A PostgreSQL client tool from the same binaries as the private cluster (newest installed server). */
export function pgTool(name: 'pg_dump' | 'pg_restore' | 'psql'): string {
  const bin = findPgBin();
  if (!bin || !existsSync(join(bin, name))) {
    throw new BackupError(`${name} was not found under /usr/lib/postgresql: install Debian's postgresql package (apt-get install -y postgresql).`);
  }
  return join(bin, name);
}

/** The URL without its password (for a command line) and the password apart (for PGPASSWORD). */
export function connectionOf(url: string): { url: string; env: NodeJS.ProcessEnv; database: string } {
  const u = new URL(url);
  const password = decodeURIComponent(u.password);
  u.password = '';
  const database = decodeURIComponent(u.pathname.replace(/^\//, '')) || 'postgres';
  return { url: u.toString(), env: password ? { PGPASSWORD: password } : {}, database };
}

/** Runs a client tool (never as the postgres user: only the server refuses root). */
export function runTool(file: string, args: string[], env: NodeJS.ProcessEnv): Promise<void> {
  return new Promise((resolve, reject) => {
    const child = spawn(file, args, { env: { ...process.env, ...env }, stdio: ['ignore', 'ignore', 'pipe'] });
    let stderr = '';
    child.stderr.on('data', (c: Buffer) => (stderr += c.toString()));
    child.on('error', (e) => reject(new BackupError(`${file} could not run: ${e.message}`)));
    child.on('close', (code) => (code === 0 ? resolve() : reject(new BackupError(`${file.split('/').pop()} failed (exit ${code}):\n${stderr.trim()}`))));
  });
}

export async function sha256File(file: string): Promise<string> {
  const h = createHash('sha256');
  for await (const c of createReadStream(file)) h.update(c as Buffer);
  return h.digest('hex');
}

/** Tables of every schema but PostgreSQL's own (public, drizzle's migration log, the job queue…). */
export async function applicationTables(client: pg.Client): Promise<string[]> {
  const r = await client.query<{ name: string }>(
    `SELECT schemaname || '.' || tablename AS name FROM pg_tables
      WHERE schemaname NOT LIKE 'pg\\_%' AND schemaname <> 'information_schema' ORDER BY 1`,
  );
  return r.rows.map((x) => x.name);
}

/** Rows per table of the `public` schema (the application's tables), by table name. */
export async function tableCounts(client: pg.Client): Promise<Record<string, number>> {
  const t = await client.query<{ tablename: string }>(`SELECT tablename FROM pg_tables WHERE schemaname = 'public' ORDER BY tablename`);
  const counts: Record<string, number> = {};
  for (const { tablename } of t.rows) {
    const r = await client.query<{ n: string }>(`SELECT count(*) AS n FROM public."${tablename.replace(/"/g, '""')}"`);
    counts[tablename] = Number(r.rows[0].n);
  }
  return counts;
}

export interface Target {
  databaseUrl: string;
  /** Where it came from, for messages. */
  describe: string;
  /** Stops the private cluster when this job started it. */
  release(): void;
}

/**
 * The database to work on: `databaseUrl` (or DATABASE_URL), else the private cluster of
 * `npm start` in the data folder on DRIFTMARK_PG_PORT — started when it is not running (and
 * stopped again by `release`). `mustExist`: refuse when there is no cluster yet (backup).
 */
export async function openTarget(opts: { databaseUrl?: string; dataDir: string; mustExist: boolean; log: (s: string) => void }): Promise<Target> {
  const url = opts.databaseUrl ?? process.env.DATABASE_URL;
  if (url) {
    const { database } = connectionOf(url);
    const u = new URL(url);
    return { databaseUrl: url, describe: `database "${database}" on ${u.hostname}:${u.port || 5432} (DATABASE_URL)`, release: () => undefined };
  }
  const pgDir = join(opts.dataDir, 'pg');
  if (opts.mustExist && !existsSync(join(pgDir, 'PG_VERSION'))) {
    throw new BackupError(`There is no private PostgreSQL cluster in ${pgDir} and DATABASE_URL is not set: nothing to back up. (Set DRIFTMARK_DATA_DIR or DATABASE_URL.)`);
  }
  const port = Number(process.env.DRIFTMARK_PG_PORT || 15432);
  if (!Number.isInteger(port) || port < 1024 || port > 65535) throw new BackupError(`DRIFTMARK_PG_PORT must be a port number (got "${process.env.DRIFTMARK_PG_PORT}")`);
  const wasRunning = existsSync(join(pgDir, 'postmaster.pid')) && (await portInUse(port));
  const cluster: Cluster = await startCluster({ dataDir: opts.dataDir, port, log: opts.log });
  if (!wasRunning) opts.log(`Started the private PostgreSQL cluster in ${pgDir} for this job (stopped again at the end).`);
  return {
    databaseUrl: cluster.url,
    describe: `database "${cluster.database}" of the private cluster ${pgDir} (127.0.0.1:${port})`,
    release: () => {
      if (!wasRunning) stopCluster(cluster);
    },
  };
}

/** The data folder as `npm start` chooses it (DRIFTMARK_DATA_DIR, `.data/`, or the durable fallback). */
export const dataFolder = (): string => chooseDataDir();

/**
 * The uploads' storage: an explicit folder (`--uploads DIR`), else what the settings say
 * (STORAGE=fs: `<data folder>/uploads`; STORAGE=s3: the S3_* bucket).
 */
export async function uploadsStorage(dataDir: string, uploadsDir?: string): Promise<Storage> {
  if (uploadsDir) return new FsStorage(uploadsDir);
  let config;
  try {
    // The JWT secret plays no part here: a stand-in keeps loadConfig from writing one.
    config = loadConfig({ ...process.env, JWT_SECRET: process.env.JWT_SECRET || 'x'.repeat(32) }, { dataDir, appDistDir: '' });
  } catch (e) {
    if (e instanceof ConfigError) throw new BackupError(e.message);
    throw e;
  }
  // As api/storage storageFromConfig; the S3 SDK is loaded only when it is used.
  if (config.storage === 's3' && config.s3) return new (await import('../api/storage/s3-storage')).S3Storage(config.s3);
  return new FsStorage(join(dataDir, 'uploads'));
}

export const describeStorage = (s: Storage): string => (s instanceof FsStorage ? `the folder ${s.root}` : `the S3 bucket ${(s as { settings?: { bucket: string } }).settings?.bucket ?? ''}`);

/** Closes an S3 client (a folder has nothing to close). */
export const closeStorage = (s: Storage): void => (s as { close?: () => void }).close?.();

/** `--name value`, `--name=value`, `--flag` and positionals; unknown options are refused. */
export function parseArgs(argv: string[], known: { values: string[]; flags: string[] }): { values: Record<string, string>; flags: Set<string>; positionals: string[] } {
  const values: Record<string, string> = {};
  const flags = new Set<string>();
  const positionals: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (!a.startsWith('--')) {
      positionals.push(a);
      continue;
    }
    const [name, inline] = a.slice(2).split(/=(.*)/s, 2);
    if (known.flags.includes(name)) flags.add(name);
    else if (known.values.includes(name)) {
      const v = inline ?? argv[++i];
      if (v === undefined || v === '') throw new BackupError(`--${name} needs a value`);
      values[name] = v;
    } else throw new BackupError(`Unknown option --${name} (known: ${[...known.values, ...known.flags].map((k) => `--${k}`).join(', ')})`);
  }
  return { values, flags, positionals };
}

/** Runs a command-line main: a BackupError is one line and exit 1; anything else its stack. */
export function runMain(main: () => Promise<void>): void {
  main().then(
    () => process.exit(0),
    (e) => {
      if (e instanceof BackupError) console.error(`[driftmark] ${e.message}`);
      else console.error(e);
      process.exit(1);
    },
  );
}
