/**
 * `npm run backup [-- --out FILE] [-- --uploads DIR]`: one archive holding a dump of the database
 * and every stored upload (layout in ./archive). Default file:
 * `<data folder>/backups/driftmark-<UTC timestamp>.tar.gz`.
 *
 * The database is DATABASE_URL, or the private cluster of `npm start` (started for the backup
 * when it is not running, and stopped again). The backup may run while the app is in use: the
 * dump is one snapshot (a REPEATABLE READ transaction exports it; the row counts of the manifest
 * and `pg_dump --snapshot` both read that snapshot), and the uploads are copied after it, so every
 * file a dumped row names is in the archive (uploads are stored before their row commits).
 */
import { randomBytes } from 'node:crypto';
import { createWriteStream, existsSync } from 'node:fs';
import { copyFile, link, mkdir, readdir, readFile, rename, rm, stat, writeFile } from 'node:fs/promises';
import { dirname, join, relative, resolve, sep } from 'node:path';
import { pipeline } from 'node:stream/promises';
import { fileURLToPath } from 'node:url';
import pg from 'pg';
import * as tar from 'tar';
import { FsStorage } from '../api/storage/fs-storage';
import type { S3Storage } from '../api/storage/s3-storage';
import type { Storage } from '../api/storage/storage';
import {
  appInfo,
  ARCHIVE_FORMAT,
  ARCHIVE_FORMAT_VERSION,
  BackupError,
  closeStorage,
  connectionOf,
  dataFolder,
  describeStorage,
  DUMP_FILE,
  MANIFEST_FILE,
  openTarget,
  parseArgs,
  pgTool,
  runMain,
  runTool,
  sha256File,
  tableCounts,
  UPLOADS_DIR,
  uploadsStorage,
  type Manifest,
  type UploadEntry,
} from './archive';

export interface BackupOptions {
  databaseUrl: string;
  /** Where the uploads are read from. */
  storage: Storage;
  /** The archive to write (refused when it exists). */
  out: string;
  log?: (s: string) => void;
  /** Called once the dump's snapshot exists, before pg_dump runs (specs write on meanwhile). */
  afterSnapshot?: () => Promise<void>;
}

export interface BackupResult {
  file: string;
  bytes: number;
  manifest: Manifest;
}

/** `driftmark-20260712T101530Z.tar.gz` */
export const defaultArchiveName = (d = new Date()) => `driftmark-${d.toISOString().replace(/[-:]/g, '').replace(/\.\d+Z$/, 'Z')}.tar.gz`;

const MEDIA_TYPE_SUFFIX = '.media-type';
const PARTIAL = /\.[0-9a-f]{12}\.partial$/;

/** The keys in a storage folder (FsStorage's layout: the bytes, and `<key>.media-type` beside them). */
async function fsKeys(root: string): Promise<string[]> {
  if (!existsSync(root)) return [];
  const entries = await readdir(root, { recursive: true, withFileTypes: true });
  return entries
    .filter((e) => e.isFile() && !e.name.endsWith(MEDIA_TYPE_SUFFIX) && !PARTIAL.test(e.name))
    .map((e) => relative(root, join(e.parentPath, e.name)).split(sep).join('/'))
    .sort();
}

async function s3Keys(s: S3Storage): Promise<string[]> {
  const { ListObjectsV2Command } = await import('@aws-sdk/client-s3');
  const keys: string[] = [];
  let token: string | undefined;
  do {
    const r = await s.client.send(new ListObjectsV2Command({ Bucket: s.settings.bucket, ContinuationToken: token }));
    for (const o of r.Contents ?? []) if (o.Key) keys.push(o.Key);
    token = r.IsTruncated ? r.NextContinuationToken : undefined;
  } while (token);
  return keys.sort();
}

/** Copies every upload into `<staging>/uploads/<key>` (a hard link for a folder when it can). */
async function stageUploads(storage: Storage, staging: string): Promise<UploadEntry[]> {
  const keys = storage instanceof FsStorage ? await fsKeys(storage.root) : storage.kind === 's3' ? await s3Keys(storage as S3Storage) : [];
  const items: UploadEntry[] = [];
  for (const key of keys) {
    const target = join(staging, UPLOADS_DIR, ...key.split('/'));
    await mkdir(dirname(target), { recursive: true });
    let mediaType: string;
    if (storage instanceof FsStorage) {
      const src = join(storage.root, ...key.split('/'));
      try {
        await link(src, target);
      } catch (e) {
        const code = (e as NodeJS.ErrnoException).code;
        if (code === 'ENOENT') continue; // deleted since the listing
        await copyFile(src, target);
      }
      mediaType = (await readFile(src + MEDIA_TYPE_SUFFIX, 'utf8').catch(() => 'application/octet-stream')).trim();
    } else {
      const o = await storage.get(key);
      if (!o) continue; // deleted since the listing
      await pipeline(o.body, createWriteStream(target));
      mediaType = o.mediaType;
    }
    items.push({ key, mediaType, bytes: (await stat(target)).size, sha256: await sha256File(target) });
  }
  return items;
}

/** Writes one archive: the database dump (one snapshot), then every upload, then the manifest. */
export async function createBackup(opts: BackupOptions): Promise<BackupResult> {
  const log = opts.log ?? (() => undefined);
  const out = resolve(opts.out);
  if (existsSync(out)) throw new BackupError(`${out} already exists: choose another --out file.`);
  await mkdir(dirname(out), { recursive: true, mode: 0o700 });
  const pgDump = pgTool('pg_dump');
  const staging = join(dirname(out), `.driftmark-backup-${randomBytes(6).toString('hex')}`);
  const partial = `${out}.partial`;
  await mkdir(join(staging, UPLOADS_DIR), { recursive: true, mode: 0o700 });
  const conn = connectionOf(opts.databaseUrl);
  const client = new pg.Client({ connectionString: opts.databaseUrl });
  try {
    try {
      await client.connect();
    } catch (e) {
      throw new BackupError(`Cannot connect to the database "${conn.database}": ${(e as Error).message}`);
    }
    // The snapshot: exported by this transaction, which stays open until pg_dump has read it.
    await client.query('BEGIN ISOLATION LEVEL REPEATABLE READ READ ONLY');
    const snapshot = (await client.query<{ s: string }>('SELECT pg_export_snapshot() AS s')).rows[0].s;
    const serverVersion = (await client.query<{ v: string }>("SELECT current_setting('server_version') AS v")).rows[0].v.split(' ')[0];
    const tables = await tableCounts(client);
    await opts.afterSnapshot?.();
    log(`Dumping ${conn.database} (PostgreSQL ${serverVersion})…`);
    await runTool(pgDump, ['--format=custom', `--snapshot=${snapshot}`, '--no-password', `--file=${join(staging, DUMP_FILE)}`, `--dbname=${conn.url}`], conn.env);
    await client.query('COMMIT');
    const dumpBytes = (await stat(join(staging, DUMP_FILE))).size;

    log(`Copying the uploads from ${describeStorage(opts.storage)}…`);
    const items = await stageUploads(opts.storage, staging);
    const manifest: Manifest = {
      format: ARCHIVE_FORMAT,
      formatVersion: ARCHIVE_FORMAT_VERSION,
      createdAt: new Date().toISOString(),
      app: appInfo(),
      database: { name: conn.database, serverVersion, dumpFile: DUMP_FILE, dumpFormat: 'custom', dumpBytes, tables },
      uploads: { source: opts.storage.kind, count: items.length, bytes: items.reduce((a, i) => a + i.bytes, 0), items },
    };
    await writeFile(join(staging, MANIFEST_FILE), JSON.stringify(manifest, null, 2) + '\n');
    // Written beside, then renamed: an archive under its name is always whole.
    // Readable by its owner only: the dump holds password hashes and every record.
    await tar.c({ gzip: true, file: partial, mode: 0o600, cwd: staging, portable: true }, [MANIFEST_FILE, DUMP_FILE, UPLOADS_DIR]);
    await rename(partial, out);
    return { file: out, bytes: (await stat(out)).size, manifest };
  } finally {
    await client.end().catch(() => undefined);
    await rm(staging, { recursive: true, force: true });
    await rm(partial, { force: true });
  }
}

async function main(): Promise<void> {
  const args = parseArgs(process.argv.slice(2), { values: ['out', 'uploads'], flags: ['help'] });
  if (args.flags.has('help') || args.positionals.length) {
    console.log('Usage: npm run backup [-- --out FILE] [-- --uploads DIR]\n  Writes one archive (database dump and uploads); default <data folder>/backups/driftmark-<UTC time>.tar.gz');
    if (args.positionals.length) throw new BackupError(`Unexpected argument ${args.positionals[0]} (did you mean --out ${args.positionals[0]}?)`);
    return;
  }
  const say = (s: string) => console.log(`[driftmark] ${s}`);
  const dataDir = dataFolder();
  const storage = await uploadsStorage(dataDir, args.values.uploads);
  const out = args.values.out ?? join(dataDir, 'backups', defaultArchiveName());
  const target = await openTarget({ dataDir, mustExist: true, log: say });
  try {
    say(`Backing up ${target.describe} and the uploads in ${describeStorage(storage)}`);
    const r = await createBackup({ databaseUrl: target.databaseUrl, storage, out, log: say });
    const t = r.manifest.database.tables;
    say(
      `Wrote ${r.file} (${(r.bytes / 1024 / 1024).toFixed(1)} MiB): database dump of ${Object.keys(t).length} tables ` +
        `(${t.users ?? 0} users, ${t.sets ?? 0} sets, ${t.surveys ?? 0} surveys, ${t.readings ?? 0} readings) and ${r.manifest.uploads.count} uploads.`,
    );
  } finally {
    target.release();
    closeStorage(storage);
  }
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) runMain(main);
