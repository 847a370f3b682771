/**
 * `npm run backup` / `npm run restore` (scripts/backup.ts, scripts/restore.ts): a backup taken
 * while readings are being written, restored into a fresh database and a fresh uploads folder,
 * holds every reading committed before the backup began (ids and values) and every upload (bytes
 * equal); a restore refuses a target that already has application tables (nothing changed) beside
 * the success into an empty one; a damaged or foreign archive is refused before anything changes.
 *
 * Databases of this spec's own on the test cluster (DATABASE_URL's server), dropped at the end.
 * Formats: a PDF starts with "%PDF-" (ISO 32000-1:2008 §7.5.2); PNG per ISO/IEC 15948:2004.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { mkdir, readFile, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { eq, inArray } from 'drizzle-orm';
import pg from 'pg';
import sharp from 'sharp';
// @ts-expect-error s3rver 3.7 ships no type declarations
import S3rver from 's3rver';
import * as tar from 'tar';
import { thumbnailKey, uploadFile } from '../../api/files/files.use-cases';
import { uploadSetFile } from '../../api/set-files/set-files.use-cases';
import { FsStorage, readAll, S3Storage, type Storage } from '../../api/storage/index';
import { setFiles, templateFiles } from '../../schema/index';
import { BackupError, type Manifest } from '../../scripts/archive';
import { createBackup, type BackupResult } from '../../scripts/backup';
import { restoreBackup } from '../../scripts/restore';
import { apiEnv, type ApiEnv } from '../support/api-env';
import { addReading, makeSurvey, type MadeSurvey } from '../support/bench-fixtures';
import { makeTemplate } from '../support/template-fixtures';

const png = () => sharp({ create: { width: 48, height: 32, channels: 3, background: { r: 90, g: 140, b: 200 } } }).png().toBuffer();
const pdf = () =>
  Buffer.from(
    '%PDF-1.4\n1 0 obj<</Type/Catalog/Pages 2 0 R>>endobj\n2 0 obj<</Type/Pages/Kids[3 0 R]/Count 1>>endobj\n' +
      '3 0 obj<</Type/Page/Parent 2 0 R/MediaBox[0 0 612 792]>>endobj\ntrailer<</Root 1 0 R>>\n%%EOF\n',
  );

interface Written {
  id: number;
  text: string;
  ohms: number;
  clientKey: string;
  /** Issued after the dump's snapshot was taken. */
  afterSnapshot: boolean;
}

interface RestoredReading {
  id: number;
  survey_id: number;
  text: string;
  ohms: number | null;
  state: string;
  client_key: string;
  test_point_key: string;
}

describe('Backup and restore', () => {
  const tag = `${process.pid}_${Date.now().toString(36)}`;
  const dbs: string[] = [];
  let env: ApiEnv;
  let admin: pg.Client;
  let dir: string;
  let source: FsStorage;
  let survey: MadeSurvey;
  let backup: BackupResult;
  /** Readings whose insert had committed when the backup was started. */
  let committedBefore: Written[];
  let written: Written[];
  let restoredUrl: string;
  let restoredUploads: FsStorage;
  /** Storage keys of this spec's uploads (files and thumbnails), with their bytes in the source. */
  const uploads = new Map<string, { bytes: Buffer; mediaType: string }>();

  const urlOf = (name: string) => env.databaseUrl.replace(/\/[^/?]+(\?.*)?$/, `/${name}`);
  async function freshDatabase(suffix: string): Promise<string> {
    const name = `driftmark_restore_${suffix}_${tag}`;
    await admin.query(`CREATE DATABASE ${name}`);
    dbs.push(name);
    return urlOf(name);
  }
  async function query<T extends pg.QueryResultRow>(url: string, sql: string, params: unknown[] = []): Promise<T[]> {
    const c = new pg.Client({ connectionString: url });
    await c.connect();
    try {
      return (await c.query<T>(sql, params)).rows;
    } finally {
      await c.end();
    }
  }

  beforeAll(async () => {
    env = await apiEnv();
    admin = new pg.Client({ connectionString: urlOf('postgres') });
    await admin.connect();
    dir = mkdtempSync(join(tmpdir(), 'driftmark-spec-backup-'));
    source = new FsStorage(join(dir, 'uploads'));
    survey = await makeSurvey();

    // Uploads through the use cases: a schematic (PDF) and a photo on a template, a set photo.
    const deps = { db: env.database.db, storage: source as Storage, config: env.config };
    const template = await makeTemplate();
    const author = { id: template.ownerId, roles: ['author'] as const };
    const f1 = await uploadFile(deps, author, template.id, { bytes: pdf(), originalName: 'service-sheet.pdf' });
    const f2 = await uploadFile(deps, author, template.id, { bytes: await png(), originalName: 'chassis-top.png' });
    const f3 = await uploadSetFile(deps, { id: survey.ownerId, roles: ['technician'] }, survey.setId, { bytes: await png(), originalName: 'under-chassis.png' });
    const templateKeys = (await env.database.db.select({ k: templateFiles.storageKey }).from(templateFiles).where(inArray(templateFiles.id, [f1.id, f2.id]))).map((r) => r.k);
    const [photo] = await env.database.db.select({ k: setFiles.storageKey, t: setFiles.thumbnailKey }).from(setFiles).where(eq(setFiles.id, f3.id));
    const keys = [...templateKeys, photo.k, photo.t!];
    for (const k of templateKeys) {
      const thumb = await source.get(thumbnailKey(k));
      thumb?.body.destroy();
      if (thumb) keys.push(thumbnailKey(k));
    }
    for (const key of new Set(keys)) {
      const o = (await source.get(key))!;
      uploads.set(key, { bytes: await readAll(o), mediaType: o.mediaType });
    }

    // A writer inserting readings one after another until told to stop.
    written = [];
    let stop = false;
    let snapshotTaken = false;
    let n = 100;
    const writer = (async () => {
      while (!stop) {
        const value = n++;
        const afterSnapshot = snapshotTaken;
        const key = `backup-spec-${tag}-${value}`;
        const id = await addReading(survey.id, { text: `${value}k`, clientKey: key });
        written.push({ id, text: `${value}k`, ohms: value * 1000, clientKey: key, afterSnapshot });
      }
    })();
    const until = async (ok: () => boolean) => {
      while (!ok()) await new Promise((r) => setTimeout(r, 5));
    };
    try {
      await until(() => written.length >= 20);
      committedBefore = [...written];
      backup = await createBackup({
        databaseUrl: env.databaseUrl,
        storage: source,
        out: join(dir, 'backups', 'driftmark-spec.tar.gz'),
        // The writer goes on while the snapshot is held: ten more readings commit after it.
        afterSnapshot: async () => {
          snapshotTaken = true;
          await until(() => written.filter((w) => w.afterSnapshot).length >= 10);
        },
      });
    } finally {
      stop = true;
      await writer;
    }

    restoredUrl = await freshDatabase('fresh');
    restoredUploads = new FsStorage(join(dir, 'restored-uploads'));
    await restoreBackup({ file: backup.file, databaseUrl: restoredUrl, storage: restoredUploads });
  });

  afterAll(async () => {
    for (const name of dbs) await admin.query(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`);
    await admin.end();
    rmSync(dir, { recursive: true, force: true });
  });

  it('writes one archive: the manifest, the custom-format dump and every upload', async () => {
    const entries: string[] = [];
    await tar.t({ file: backup.file, onReadEntry: (e) => entries.push(e.path) });
    expect(entries.slice(0, 2)).toEqual(['manifest.json', 'database.dump']);
    for (const key of uploads.keys()) expect(entries).toContain(`uploads/${key}`);
    const m = backup.manifest;
    expect(m.format).toBe('driftmark-backup');
    expect(m.formatVersion).toBe(1);
    expect(m.app.name).toBe('driftmark');
    expect(m.database.name).toBe(new URL(env.databaseUrl).pathname.slice(1));
    expect(m.uploads.source).toBe('fs');
    expect(m.uploads.count).toBe(uploads.size);
    expect(m.uploads.items.map((i) => i.key).sort()).toEqual([...uploads.keys()].sort());
    // pg_dump's custom format starts with the magic "PGDMP" (PostgreSQL docs, pg_dump --format=custom; common practice).
    const dumpHead: Buffer[] = [];
    await tar.t({ file: backup.file, filter: (p) => p === 'database.dump', onReadEntry: (e) => e.on('data', (c: Buffer) => dumpHead.push(c)) });
    expect(Buffer.concat(dumpHead).subarray(0, 5).toString('latin1')).toBe('PGDMP');
  });

  it('taken while readings were written, restores every reading committed before it began (ids and values)', async () => {
    expect(committedBefore.length).toBeGreaterThanOrEqual(20);
    const rows = await query<RestoredReading>(restoredUrl, 'SELECT id, survey_id, text, ohms, state, client_key, test_point_key FROM readings WHERE survey_id = $1', [survey.id]);
    const byId = new Map(rows.map((r) => [Number(r.id), { ...r, id: Number(r.id) }]));
    for (const w of committedBefore) {
      expect(byId.get(w.id)).withContext(`reading ${w.id}`).toEqual({ id: w.id, survey_id: survey.id, text: w.text, ohms: w.ohms, state: 'value', client_key: w.clientKey, test_point_key: 'tp-r2' });
    }
  });

  it('is one snapshot: readings written after it began are not in it, and the row counts are the manifest\'s', async () => {
    const after = written.filter((w) => w.afterSnapshot);
    expect(after.length).toBeGreaterThanOrEqual(10);
    const ids = (await query<{ id: string }>(restoredUrl, 'SELECT id FROM readings WHERE survey_id = $1', [survey.id])).map((r) => Number(r.id));
    expect(ids.length).toBeGreaterThanOrEqual(committedBefore.length);
    for (const w of after) expect(ids).withContext(`reading ${w.id} written after the snapshot`).not.toContain(w.id);
    // In the source they are all there.
    const sourceIds = (await query<{ id: number }>(env.databaseUrl, 'SELECT id FROM readings WHERE survey_id = $1', [survey.id])).map((r) => r.id);
    expect(sourceIds.length).toBe(written.length);
    const [{ n }] = await query<{ n: string }>(restoredUrl, 'SELECT count(*) AS n FROM readings');
    expect(Number(n)).toBe(backup.manifest.database.tables.readings);
    const [{ u }] = await query<{ u: string }>(restoredUrl, 'SELECT count(*) AS u FROM users');
    expect(Number(u)).toBe(backup.manifest.database.tables.users);
  });

  it('restores every upload into the fresh storage folder (bytes and media type equal) with the rows naming them', async () => {
    expect(uploads.size).toBe(5); // PDF; PNG and its thumbnail; set photo and its thumbnail
    for (const [key, want] of uploads) {
      const o = await restoredUploads.get(key);
      expect(o).withContext(key).not.toBeNull();
      expect((await readAll(o!)).equals(want.bytes)).withContext(key).toBeTrue();
      expect(o!.mediaType).withContext(key).toBe(want.mediaType);
    }
    const named = await query<{ k: string }>(restoredUrl, 'SELECT storage_key AS k FROM template_files UNION ALL SELECT storage_key FROM set_files');
    const restoredKeys = named.map((r) => r.k);
    for (const key of uploads.keys()) if (!key.endsWith('.thumb.webp')) expect(restoredKeys).toContain(key);
  });

  it('refuses a target that already has application tables and changes nothing, beside the success into an empty one; --force replaces what it holds', async () => {
    const before = await query<{ n: string }>(restoredUrl, 'SELECT count(*) AS n FROM readings');
    const untouched = new FsStorage(join(dir, 'refused-uploads'));
    await expectAsync(restoreBackup({ file: backup.file, databaseUrl: restoredUrl, storage: untouched })).toBeRejectedWithError(BackupError, /already has \d+ application tables.*Nothing was changed/s);
    expect(await query<{ n: string }>(restoredUrl, 'SELECT count(*) AS n FROM readings')).toEqual(before);
    expect(existsSync(join(dir, 'refused-uploads'))).toBeFalse();

    // The twin: an empty database of the same server takes it.
    const target = await freshDatabase('twin');
    const r = await restoreBackup({ file: backup.file, databaseUrl: target, storage: new FsStorage(join(dir, 'twin-uploads')) });
    expect(r.tables.readings).toBe(backup.manifest.database.tables.readings);
    expect(r.uploads).toBe(uploads.size);

    // --force: a table and a reading added since are gone, the counts are the archive's.
    await query(target, 'CREATE TABLE stray (id int)');
    await query(target, "INSERT INTO readings (survey_id, test_point_key, client_key, text, state, ohms, method) SELECT survey_id, test_point_key, 'stray-reading-key-0001', '1k', state, 1000, method FROM readings WHERE survey_id = $1 LIMIT 1", [survey.id]);
    const forced = await restoreBackup({ file: backup.file, databaseUrl: target, storage: new FsStorage(join(dir, 'twin-uploads')), force: true });
    expect(forced.tables.readings).toBe(backup.manifest.database.tables.readings);
    expect(await query(target, "SELECT id FROM readings WHERE client_key = 'stray-reading-key-0001'")).toEqual([]);
    expect(await query(target, "SELECT 1 FROM pg_tables WHERE tablename = 'stray'")).toEqual([]);
  });

  it('refuses a missing file, a file that is no archive, another format version and a damaged upload, before anything changes', async () => {
    const target = await freshDatabase('refused');
    const storage = new FsStorage(join(dir, 'never'));
    const attempt = (file: string) => restoreBackup({ file, databaseUrl: target, storage });
    await expectAsync(attempt(join(dir, 'no-such-backup.tar.gz'))).toBeRejectedWithError(BackupError, /No such file/);
    await writeFile(join(dir, 'notes.txt'), 'not an archive at all\n');
    await expectAsync(attempt(join(dir, 'notes.txt'))).toBeRejectedWithError(BackupError, /is not a Driftmark backup archive/);

    // The same archive with its manifest saying version 2, and with one upload's bytes changed.
    const unpacked = join(dir, 'unpacked');
    await mkdir(unpacked);
    await tar.x({ file: backup.file, cwd: unpacked });
    const manifest = JSON.parse(await readFile(join(unpacked, 'manifest.json'), 'utf8')) as Manifest;
    await writeFile(join(unpacked, 'manifest.json'), JSON.stringify({ ...manifest, formatVersion: 2 }));
    await tar.c({ gzip: true, file: join(dir, 'v2.tar.gz'), cwd: unpacked }, ['manifest.json', 'database.dump', 'uploads']);
    await expectAsync(attempt(join(dir, 'v2.tar.gz'))).toBeRejectedWithError(BackupError, /format version 2.*restores version 1 only/s);
    await writeFile(join(unpacked, 'manifest.json'), JSON.stringify(manifest));
    const victim = manifest.uploads.items[0];
    await writeFile(join(unpacked, 'uploads', victim.key), Buffer.from('tampered'));
    await tar.c({ gzip: true, file: join(dir, 'damaged.tar.gz'), cwd: unpacked }, ['manifest.json', 'database.dump', 'uploads']);
    await expectAsync(attempt(join(dir, 'damaged.tar.gz'))).toBeRejectedWithError(BackupError, /is damaged: the upload/);

    expect(await query(target, "SELECT 1 FROM pg_tables WHERE schemaname = 'public'")).toEqual([]);
    expect(existsSync(join(dir, 'never'))).toBeFalse();
    // The twin: the untouched archive goes into that same database.
    const r = await attempt(backup.file);
    expect(r.uploads).toBe(uploads.size);
  });

  it('backs up the uploads of an S3 bucket and puts them back into another', async () => {
    const fake = new S3rver({ port: 0, address: '127.0.0.1', silent: true, directory: join(dir, 's3rver') });
    const { port } = (await fake.run()) as { port: number };
    const bucket = (name: string) => new S3Storage({ endpoint: `http://127.0.0.1:${port}`, bucket: name, region: 'us-east-1', accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' });
    const from = bucket('driftmark-from');
    const to = bucket('driftmark-to');
    try {
      await from.ensureBucket();
      await to.ensureBucket();
      const photo = await png();
      await from.put('sets/1/a.png', photo, 'image/png');
      await from.put('templates/2/b.pdf', pdf(), 'application/pdf');
      const b = await createBackup({ databaseUrl: env.databaseUrl, storage: from, out: join(dir, 'backups', 's3.tar.gz') });
      expect(b.manifest.uploads.source).toBe('s3');
      expect(b.manifest.uploads.items.map((i) => [i.key, i.mediaType])).toEqual([
        ['sets/1/a.png', 'image/png'],
        ['templates/2/b.pdf', 'application/pdf'],
      ]);
      expect(await to.get('sets/1/a.png')).toBeNull();
      await restoreBackup({ file: b.file, databaseUrl: await freshDatabase('s3'), storage: to });
      expect((await readAll((await to.get('sets/1/a.png'))!)).equals(photo)).toBeTrue();
      expect((await readAll((await to.get('templates/2/b.pdf'))!)).equals(pdf())).toBeTrue();
    } finally {
      from.close();
      to.close();
      await fake.close();
    }
  });

  it('runs as `npm run backup` and `npm run restore`: an archive written, restored, and a missing file refused with exit code 1', async () => {
    const target = await freshDatabase('cli');
    const run = (script: string, args: string[], databaseUrl: string) =>
      spawnSync(process.execPath, ['--import', 'tsx', `scripts/${script}.ts`, ...args], { encoding: 'utf8', env: { ...process.env, DATABASE_URL: databaseUrl } });
    const out = join(dir, 'backups', 'cli.tar.gz');
    const b = run('backup', ['--out', out, '--uploads', join(dir, 'uploads')], env.databaseUrl);
    expect(b.status).withContext(b.stderr).toBe(0);
    expect(b.stdout).toContain(`Wrote ${out}`);
    const r = run('restore', [out, '--uploads', join(dir, 'cli-uploads')], target);
    expect(r.status).withContext(r.stderr).toBe(0);
    expect(r.stdout).toMatch(/Restored the backup of .* readings, row counts equal to the manifest's\) and 5 uploads/);
    const missing = run('restore', [join(dir, 'missing.tar.gz')], target);
    expect(missing.status).toBe(1);
    expect(missing.stderr).toContain('No such file');
  });
});
