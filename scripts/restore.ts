/**
 * `npm run restore -- FILE [--force] [--uploads DIR]`: brings an archive of `npm run backup` back
 * into a fresh database — DATABASE_URL (created when the server has no such database), or the
 * private cluster of `npm start` (created and started when missing, stopped again when this
 * started it) — and its uploads back into the storage (`<data folder>/uploads`, the S3 bucket of
 * STORAGE=s3, or `--uploads DIR`).
 *
 * Everything is checked before anything changes: the archive (format, version, the dump, every
 * upload's size and SHA-256) and the target, which must have no application table unless
 * `--force` (then every non-system schema is dropped first, in the same transaction as the
 * restore). The database is restored in one transaction (`pg_restore` → `psql
 * --single-transaction`, stopping on the first error): whole or not at all. Afterwards the row
 * counts are compared with the manifest's.
 */
import { spawn } from 'node:child_process';
import { existsSync, statSync } from 'node:fs';
import { mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import pg from 'pg';
import * as tar from 'tar';
import type { Storage } from '../api/storage/storage';
import {
  applicationTables,
  ARCHIVE_FORMAT,
  ARCHIVE_FORMAT_VERSION,
  BackupError,
  closeStorage,
  connectionOf,
  dataFolder,
  describeStorage,
  MANIFEST_FILE,
  openTarget,
  parseArgs,
  pgTool,
  runMain,
  sha256File,
  tableCounts,
  UPLOADS_DIR,
  uploadsStorage,
  type Manifest,
  type Target,
} from './archive';

export interface RestoreOptions {
  file: string;
  /** The target, or a function giving it once the archive has been checked (e.g. starting a cluster). */
  databaseUrl: string | (() => Promise<string>);
  /** Where the uploads go. */
  storage: Storage;
  /** Replace what the target database holds (refused otherwise when it has application tables). */
  force?: boolean;
  log?: (s: string) => void;
}

export interface RestoreResult {
  manifest: Manifest;
  tables: Record<string, number>;
  uploads: number;
}

/** Unpacks and checks an archive into `dir`; returns its manifest. Changes nothing elsewhere. */
export async function readArchive(file: string, dir: string): Promise<Manifest> {
  const path = resolve(file);
  if (!existsSync(path)) throw new BackupError(`No such file: ${path}`);
  if (!statSync(path).isFile()) throw new BackupError(`${path} is not a file.`);
  try {
    await tar.x({ file: path, cwd: dir, strict: true, gzip: true });
  } catch (e) {
    throw new BackupError(`${path} is not a Driftmark backup archive (not a readable .tar.gz file: ${(e as Error).message}).`);
  }
  let manifest: Manifest;
  try {
    manifest = JSON.parse(await readFile(join(dir, MANIFEST_FILE), 'utf8')) as Manifest;
  } catch {
    throw new BackupError(`${path} is not a Driftmark backup archive (no readable ${MANIFEST_FILE} inside).`);
  }
  if (manifest?.format !== ARCHIVE_FORMAT) throw new BackupError(`${path} is not a Driftmark backup archive (its manifest's format is ${JSON.stringify(manifest?.format)}).`);
  if (manifest.formatVersion !== ARCHIVE_FORMAT_VERSION) {
    throw new BackupError(
      `${path} is a Driftmark backup of format version ${JSON.stringify(manifest.formatVersion)}, made by Driftmark ${manifest.app?.version ?? '?'}; ` +
        `this Driftmark (${manifest.formatVersion > ARCHIVE_FORMAT_VERSION ? 'older' : 'newer'}) restores version ${ARCHIVE_FORMAT_VERSION} only.`,
    );
  }
  const dump = join(dir, manifest.database.dumpFile);
  if (!existsSync(dump) || statSync(dump).size !== manifest.database.dumpBytes) throw new BackupError(`${path} is damaged: the database dump is missing or not the size the manifest says.`);
  for (const item of manifest.uploads.items) {
    const f = join(dir, UPLOADS_DIR, ...item.key.split('/'));
    if (!existsSync(f) || statSync(f).size !== item.bytes || (await sha256File(f)) !== item.sha256) {
      throw new BackupError(`${path} is damaged: the upload ${item.key} is missing or its bytes differ from the manifest's.`);
    }
  }
  return manifest;
}

/** SQL run before the dump, in its transaction, when --force: every non-system schema goes. */
const DROP_EVERYTHING = `
DO $$
DECLARE s text;
BEGIN
  FOR s IN SELECT nspname FROM pg_namespace WHERE nspname NOT LIKE 'pg\\_%' AND nspname <> 'information_schema' LOOP
    EXECUTE format('DROP SCHEMA %I CASCADE', s);
  END LOOP;
  CREATE SCHEMA public;
END $$;
`;

/** pg_restore writes the dump as SQL into psql, which runs it (and the prelude) in one transaction. */
function restoreDump(dump: string, databaseUrl: string, prelude: string | null): Promise<void> {
  const conn = connectionOf(databaseUrl);
  const env = { ...process.env, ...conn.env };
  return new Promise((resolvePromise, reject) => {
    const producer = spawn(pgTool('pg_restore'), ['--no-owner', '--no-acl', '--exit-on-error', '--file=-', dump], { env, stdio: ['ignore', 'pipe', 'pipe'] });
    const preludeArgs = prelude ? ['--file', prelude] : [];
    const consumer = spawn(pgTool('psql'), ['--no-psqlrc', '--quiet', '--no-password', '--set=ON_ERROR_STOP=1', '--single-transaction', ...preludeArgs, '--file=-', `--dbname=${conn.url}`], {
      env,
      stdio: ['pipe', 'ignore', 'pipe'],
    });
    producer.stdout.pipe(consumer.stdin);
    let errors = '';
    producer.stderr.on('data', (c: Buffer) => (errors += c.toString()));
    consumer.stderr.on('data', (c: Buffer) => (errors += c.toString()));
    let producerCode: number | null = null;
    producer.on('close', (code) => (producerCode = code));
    producer.on('error', reject);
    consumer.on('error', reject);
    consumer.on('close', (code) => {
      if (code === 0 && producerCode === 0) resolvePromise();
      else reject(new BackupError(`Restoring the database failed (nothing of it was kept: one transaction):\n${errors.trim()}`));
    });
  });
}

/** Restores an archive into `databaseUrl` (which must be free of application tables unless `force`) and `storage`. */
export async function restoreBackup(opts: RestoreOptions): Promise<RestoreResult> {
  const log = opts.log ?? (() => undefined);
  const staging = await mkdtemp(join(tmpdir(), 'driftmark-restore-'));
  try {
    const manifest = await readArchive(opts.file, staging);
    const databaseUrl = typeof opts.databaseUrl === 'string' ? opts.databaseUrl : await opts.databaseUrl();
    const conn = connectionOf(databaseUrl);
    await ensureDatabase(databaseUrl);
    const client = new pg.Client({ connectionString: databaseUrl });
    await client.connect();
    try {
      const existing = await applicationTables(client);
      if (existing.length && !opts.force) {
        throw new BackupError(
          `The database "${conn.database}" already has ${existing.length} application tables (${existing.slice(0, 4).join(', ')}${existing.length > 4 ? ', …' : ''}): ` +
            'a restore goes into a fresh database. Nothing was changed. Point DATABASE_URL at a new database, or add --force to replace everything it holds.',
        );
      }
      log(`Putting back ${manifest.uploads.count} uploads into ${describeStorage(opts.storage)}…`);
      for (const item of manifest.uploads.items) {
        await opts.storage.put(item.key, await readFile(join(staging, UPLOADS_DIR, ...item.key.split('/'))), item.mediaType);
      }
      log(`Restoring the database dump of "${manifest.database.name}" (${manifest.createdAt}) into "${conn.database}"${existing.length ? ' (replacing what it held: --force)' : ''}…`);
      let prelude: string | null = null;
      if (existing.length) {
        prelude = join(staging, 'drop-everything.sql');
        await writeFile(prelude, DROP_EVERYTHING);
      }
      await restoreDump(join(staging, manifest.database.dumpFile), databaseUrl, prelude);
      const tables = await tableCounts(client);
      const differ = Object.entries(manifest.database.tables).filter(([t, n]) => tables[t] !== n);
      if (differ.length) throw new BackupError(`The restored database differs from the manifest: ${differ.map(([t, n]) => `${t} ${tables[t] ?? 'missing'} rows, expected ${n}`).join('; ')}`);
      return { manifest, tables, uploads: manifest.uploads.count };
    } finally {
      await client.end().catch(() => undefined);
    }
  } finally {
    await rm(staging, { recursive: true, force: true });
  }
}

/** Creates the target database when the server has none of that name. */
async function ensureDatabase(databaseUrl: string): Promise<void> {
  const { database } = connectionOf(databaseUrl);
  const probe = new pg.Client({ connectionString: databaseUrl });
  try {
    await probe.connect();
    return;
  } catch (e) {
    if ((e as { code?: string }).code !== '3D000') throw new BackupError(`Cannot connect to the database "${database}": ${(e as Error).message}`);
  } finally {
    await probe.end().catch(() => undefined);
  }
  const u = new URL(databaseUrl);
  u.pathname = '/postgres';
  const admin = new pg.Client({ connectionString: u.toString() });
  await admin.connect();
  try {
    await admin.query(`CREATE DATABASE "${database.replace(/"/g, '""')}"`);
  } finally {
    await admin.end();
  }
}

async function main(): Promise<void> {
  const args = parseArgs(process.argv.slice(2), { values: ['uploads'], flags: ['force', 'help'] });
  if (args.flags.has('help') || args.positionals.length !== 1) {
    const usage = 'Usage: npm run restore -- FILE [--force] [--uploads DIR]\n  Restores an archive of `npm run backup` into a fresh database (DATABASE_URL, or the private cluster) and its uploads into the storage.';
    if (args.flags.has('help')) return console.log(usage);
    throw new BackupError(`${args.positionals.length ? 'One archive file, please.' : 'Which archive? Name the file.'}\n${usage}`);
  }
  const say = (s: string) => console.log(`[driftmark] ${s}`);
  const dataDir = dataFolder();
  const storage = await uploadsStorage(dataDir, args.values.uploads);
  let target: Target | null = null;
  // The archive is checked before any cluster is made or started.
  const open = async () => {
    target = await openTarget({ dataDir, mustExist: false, log: say });
    return target.databaseUrl;
  };
  try {
    const r = await restoreBackup({ file: args.positionals[0], databaseUrl: open, storage, force: args.flags.has('force'), log: say });
    const t = r.tables;
    say(
      `Restored the backup of ${r.manifest.createdAt} (Driftmark ${r.manifest.app.version}) into ${(target as Target | null)?.describe}: ${Object.keys(t).length} tables ` +
        `(${t.users ?? 0} users, ${t.sets ?? 0} sets, ${t.surveys ?? 0} surveys, ${t.readings ?? 0} readings, row counts equal to the manifest's) ` +
        `and ${r.uploads} uploads (${r.manifest.uploads.bytes} bytes) into ${describeStorage(storage)}.`,
    );
  } finally {
    (target as Target | null)?.release();
    closeStorage(storage);
  }
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) runMain(main);
