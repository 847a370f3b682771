/**
 * Files on templates and stages, against the real database and BOTH storages: a folder (fs, in a
 * temporary data folder) and S3 (the AWS SDK against s3rver, the local S3 fake, started here on
 * port 0). Images are made here with sharp; the decompression bomb is a PNG written byte by byte.
 *
 * Formats: PNG chunk layout and CRC-32 per ISO/IEC 15948:2004 (PNG) §5.3 and annex D; the EXIF
 * APP1 segment starts with "Exif\0\0" (JEITA CP-3451, Exif 2.3, §4.5.4); a PDF file starts with
 * "%PDF-" (ISO 32000-1:2008 §7.5.2).
 */
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { eq } from 'drizzle-orm';
import sharp from 'sharp';
// @ts-expect-error s3rver 3.7 ships no type declarations
import S3rver from 's3rver';
import request from 'supertest';
import { createApp } from '../../api/app';
import { FsStorage, readAll, S3Storage, type Storage } from '../../api/storage/index';
import { templateFiles } from '../../schema/index';
import { apiEnv, bearer, userSession, type Session } from '../support/api-env';
import { tableState } from '../support/table-state';
import { makeTemplate } from '../support/template-fixtures';

// ---------------------------------------------------------------------------------------------
// Fixtures

const png = (w = 40, h = 30) => sharp({ create: { width: w, height: h, channels: 3, background: { r: 200, g: 120, b: 40 } } }).png().toBuffer();
const webp = () => sharp({ create: { width: 50, height: 20, channels: 4, background: { r: 0, g: 90, b: 200, alpha: 0.5 } } }).webp().toBuffer();
const gif = () => sharp({ create: { width: 16, height: 16, channels: 3, background: { r: 10, g: 200, b: 10 } } }).gif().toBuffer();

/** A JPEG carrying EXIF with a camera maker and a GPS position (invented coordinates). */
const jpegWithGps = () =>
  sharp({ create: { width: 64, height: 48, channels: 3, background: { r: 90, g: 90, b: 90 } } })
    .jpeg()
    .withExif({
      IFD0: { Make: 'Spec Camera Works', Model: 'Probe 7' },
      IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '47/1 22/1 1234/100', GPSLongitudeRef: 'E', GPSLongitude: '8/1 32/1 5678/100' },
    })
    .toBuffer();

/** A JPEG stored sideways with orientation 6 ("rotate 90° clockwise to view", Exif 2.3 Orientation tag). */
const sidewaysJpeg = () => sharp({ create: { width: 60, height: 20, channels: 3, background: { r: 255, g: 255, b: 255 } } }).jpeg().withMetadata({ orientation: 6 }).toBuffer();

/** A minimal PDF: header, one empty page, trailer (ISO 32000-1 §7.5). */
const pdf = (pad = 0) =>
  Buffer.from(
    '%PDF-1.4\n1 0 obj<</Type/Catalog/Pages 2 0 R>>endobj\n2 0 obj<</Type/Pages/Kids[3 0 R]/Count 1>>endobj\n' +
      '3 0 obj<</Type/Page/Parent 2 0 R/MediaBox[0 0 612 792]>>endobj\n' +
      `%${'x'.repeat(pad)}\ntrailer<</Root 1 0 R>>\n%%EOF\n`,
  );

const CRC_TABLE = Array.from({ length: 256 }, (_, n) => {
  let c = n;
  for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
  return c >>> 0;
});
/** CRC-32 as ISO/IEC 15948:2004 annex D. */
const crc32 = (b: Buffer) => {
  let c = 0xffffffff;
  for (const x of b) c = CRC_TABLE[(c ^ x) & 0xff] ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
};
const chunk = (type: string, data: Buffer) => {
  const len = Buffer.alloc(4);
  len.writeUInt32BE(data.length);
  const body = Buffer.concat([Buffer.from(type, 'latin1'), data]);
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(body));
  return Buffer.concat([len, body, crc]);
};
/** A tiny PNG whose header declares width × height (8-bit grey) over a few bytes of image data. */
function declaredPng(width: number, height: number): Buffer {
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  ihdr[8] = 8; // bit depth
  ihdr[9] = 0; // greyscale
  const idat = Buffer.from([0x78, 0x9c, 0x63, 0x00, 0x00, 0x00, 0x01, 0x00, 0x01]); // zlib stream of one zero byte
  return Buffer.concat([Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), chunk('IHDR', ihdr), chunk('IDAT', idat), chunk('IEND', Buffer.alloc(0))]);
}

const EXIF_MARKER = Buffer.from('Exif\0\0', 'latin1');

// ---------------------------------------------------------------------------------------------
// The two storages

interface Backend {
  name: 'fs' | 's3';
  storage: Storage;
  app: ReturnType<typeof createApp>;
  close(): Promise<void>;
}

async function fsBackend(): Promise<Backend> {
  const env = await apiEnv();
  const storage = new FsStorage(join(mkdtempSync(join(tmpdir(), 'driftmark-spec-uploads-')), 'uploads'));
  return { name: 'fs', storage, app: createApp({ config: env.config, database: env.database, outbox: env.queue, storage }), close: async () => undefined };
}

async function s3Backend(): Promise<Backend> {
  const env = await apiEnv();
  const fake = new S3rver({ port: 0, address: '127.0.0.1', silent: true, directory: mkdtempSync(join(tmpdir(), 'driftmark-spec-s3rver-')) });
  const { port } = (await fake.run()) as { port: number };
  const storage = new S3Storage({ endpoint: `http://127.0.0.1:${port}`, bucket: 'driftmark-spec', region: 'us-east-1', accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' });
  await storage.ensureBucket();
  return {
    name: 's3',
    storage,
    app: createApp({ config: env.config, database: env.database, outbox: env.queue, storage }),
    close: async () => {
      storage.close();
      await fake.close();
    },
  };
}

async function storageKeyOf(fileId: number): Promise<string | undefined> {
  const env = await apiEnv();
  const [row] = await env.database.db.select().from(templateFiles).where(eq(templateFiles.id, fileId));
  return row?.storageKey;
}

const upload = (app: Backend['app'], s: Session, templateId: number, bytes: Buffer, name: string, fields: Record<string, string> = {}, contentType?: string) => {
  let r = request(app).post(`/api/templates/${templateId}/files`).set(bearer(s));
  for (const [k, v] of Object.entries(fields)) r = r.field(k, v);
  return r.attach('file', bytes, contentType ? { filename: name, contentType } : name);
};

/** supertest collects a binary body as a Buffer with this parser. */
const binary = (res: unknown, cb: (err: Error | null, body: Buffer) => void) => {
  const stream = res as NodeJS.ReadableStream;
  const chunks: Buffer[] = [];
  stream.on('data', (c: Buffer) => chunks.push(c));
  stream.on('end', () => cb(null, Buffer.concat(chunks)));
};

for (const make of [fsBackend, s3Backend]) {
  describe(`Template files (${make === fsBackend ? 'fs' : 's3'} storage)`, () => {
    let b: Backend;
    let owner: Session;
    beforeAll(async () => {
      b = await make();
      owner = await userSession(['author']);
    });
    afterAll(async () => b.close());

    it('uploads a photo to a stage, lists it, serves it and its thumbnail, and deletes it with its stored bytes', async () => {
      const t = await makeTemplate({ ownerId: owner.user.id });
      const bytes = await png(640, 400);
      const up = await upload(b.app, owner, t.id, bytes, 'chassis top.png', { stageKey: 'st-audio' });
      expect(up.status).withContext(JSON.stringify(up.body)).toBe(201);
      expect(up.body).toEqual(
        jasmine.objectContaining({ templateId: t.id, stageKey: 'st-audio', stageName: 'Detector and first audio', name: 'chassis top.png', mediaType: 'image/png', kind: 'image', width: 640, height: 400 }),
      );
      expect(up.body.thumbnailUrl).toBe(`/api/templates/${t.id}/files/${up.body.id}/thumbnail`);

      const key = await storageKeyOf(up.body.id);
      expect(key).withContext('recorded').toBeDefined();
      const stored = await b.storage.get(key!);
      expect(stored?.mediaType).toBe('image/png');
      expect((await sharp(await readAll(stored!)).metadata()).width).toBe(640);

      const list = await request(b.app).get(`/api/templates/${t.id}/files`).set(bearer(owner));
      expect(list.status).toBe(200);
      expect(list.body.items.map((f: { id: number }) => f.id)).toEqual([up.body.id]);
      expect(list.body.items[0].bytes).toBe(stored!.size);

      const got = await request(b.app).get(up.body.url).set(bearer(owner)).buffer(true).parse(binary);
      expect(got.status).toBe(200);
      expect(got.headers['content-type']).toBe('image/png');
      expect((await sharp(got.body as Buffer).metadata()).height).toBe(400);

      const thumb = await request(b.app).get(up.body.thumbnailUrl).set(bearer(owner)).buffer(true).parse(binary);
      expect(thumb.status).toBe(200);
      expect(thumb.headers['content-type']).toBe('image/webp');
      const tm = await sharp(thumb.body as Buffer).metadata();
      expect([tm.width, tm.height]).toEqual([320, 200]);

      const del = await request(b.app).delete(up.body.url).set(bearer(owner));
      expect(del.status).toBe(204);
      expect(await b.storage.get(key!)).withContext('stored bytes removed').toBeNull();
      expect(await b.storage.get(`${key}.thumb.webp`)).withContext('thumbnail removed').toBeNull();
      expect(await storageKeyOf(up.body.id)).withContext('record removed').toBeUndefined();
      expect((await request(b.app).get(up.body.url).set(bearer(owner))).status).toBe(404);
    });

    it('uploads a PDF schematic to the whole template: no pixels, no thumbnail, served inline', async () => {
      const t = await makeTemplate({ ownerId: owner.user.id });
      const up = await upload(b.app, owner, t.id, pdf(), 'schematic.pdf');
      expect(up.status).withContext(JSON.stringify(up.body)).toBe(201);
      expect(up.body).toEqual(jasmine.objectContaining({ stageKey: null, mediaType: 'application/pdf', kind: 'pdf', width: null, height: null, thumbnailUrl: null }));
      const got = await request(b.app).get(up.body.url).set(bearer(owner)).buffer(true).parse(binary);
      expect(got.status).toBe(200);
      expect((got.body as Buffer).equals(pdf())).withContext('PDF stored as sent').toBeTrue();
      expect((await request(b.app).get(`${up.body.url}/thumbnail`).set(bearer(owner))).status).toBe(404);
    });
  });
}

describe('Template files: content, limits and headers', () => {
  let b: Backend;
  let owner: Session;
  beforeAll(async () => {
    b = await fsBackend();
    owner = await userSession(['author']);
  });

  it('takes the type from the content: a PNG named .txt and declared text/plain is stored as a PNG', async () => {
    const t = await makeTemplate({ ownerId: owner.user.id });
    const r = await upload(b.app, owner, t.id, await png(), 'notes.txt', {}, 'text/plain');
    expect(r.status).withContext(JSON.stringify(r.body)).toBe(201);
    expect(r.body.mediaType).toBe('image/png');
    const got = await request(b.app).get(r.body.url).set(bearer(owner));
    expect(got.headers['content-disposition']).toContain('filename="notes.png"');
  });

  it('refuses a text file named .png and declared image/png; an SVG; an HTML page; XML — each beside a real PNG that is taken', async () => {
    const t = await makeTemplate({ ownerId: owner.user.id });
    const refused: [string, Buffer, string][] = [
      ['a text file named .png', Buffer.from('Plate load 250k, grid leak 10M.\n'), 'parts.png'],
      ['an SVG', Buffer.from('<?xml version="1.0"?><svg xmlns="http://www.w3.org/2000/svg" width="10" height="10"><script>alert(1)</script></svg>'), 'drawing.svg'],
      ['an SVG named .png', Buffer.from('<svg xmlns="http://www.w3.org/2000/svg"><rect width="5" height="5"/></svg>'), 'drawing.png'],
      ['an HTML page', Buffer.from('<!doctype html><html><body><script>alert(document.cookie)</script></body></html>'), 'page.html'],
      ['an XML file', Buffer.from('<?xml version="1.0" encoding="UTF-8"?><parts><part ref="R1"/></parts>'), 'parts.xml'],
    ];
    const env = await apiEnv();
    const before = await tableState(env.database.db);
    for (const [what, bytes, name] of refused) {
      const r = await upload(b.app, owner, t.id, bytes, name, {}, 'image/png');
      expect(r.status).withContext(what).toBe(400);
      expect(r.body.error.code).withContext(what).toBe('unsupported-file-type');
      expect(r.body.error.details.field).withContext(what).toBe('file');
    }
    expect(await tableState(env.database.db)).withContext('nothing recorded').toEqual(before);
    for (const [name, bytes, type] of [['photo.png', await png(), 'image/png'], ['photo.webp', await webp(), 'image/webp'], ['dial.gif', await gif(), 'image/gif']] as const) {
      const ok = await upload(b.app, owner, t.id, bytes, name);
      expect(ok.status).withContext(name).toBe(201);
      expect(ok.body.mediaType).withContext(name).toBe(type);
    }
  });

  it('refuses a file over UPLOAD_MAX_BYTES with a 400 in the usual error body; a file within it is taken', async () => {
    const env = await apiEnv();
    const small = env.appWith({ UPLOAD_MAX_BYTES: '4096' });
    const t = await makeTemplate({ ownerId: owner.user.id });
    const big = await upload(small, owner, t.id, pdf(8000), 'big.pdf');
    expect(big.status).toBe(400);
    expect(big.body.error).toEqual(jasmine.objectContaining({ code: 'file-too-large', details: { field: 'file' } }));
    expect(big.body.error.message).toMatch(/larger than the limit/);
    const fits = await upload(small, owner, t.id, pdf(1000), 'fits.pdf');
    expect(fits.status).toBe(201);
  });

  it('refuses a decompression bomb (a small PNG declaring 50 000 × 50 000) from its header; an image within the pixel limit is taken', async () => {
    const t = await makeTemplate({ ownerId: owner.user.id });
    const bomb = declaredPng(50_000, 50_000);
    expect(bomb.length).toBeLessThan(100);
    const r = await upload(b.app, owner, t.id, bomb, 'bomb.png');
    expect(r.status).toBe(400);
    expect(r.body.error.code).toBe('image-too-large');
    expect(r.body.error.message).toContain('50000 × 50000');
    const env = await apiEnv();
    const tight = env.appWith({ UPLOAD_MAX_PIXELS: '250000' });
    expect((await upload(tight, owner, t.id, await png(600, 500), 'over.png')).status).withContext('600 × 500 over a 0.25 MP limit').toBe(400);
    expect((await upload(tight, owner, t.id, await png(500, 500), 'at.png')).status).withContext('500 × 500 at the limit').toBe(201);
  });

  it('strips EXIF (GPS above all) from a JPEG the original carried it in, and keeps the picture', async () => {
    const original = await jpegWithGps();
    const om = await sharp(original).metadata();
    expect(om.exif).withContext('the fixture carries EXIF').toBeDefined();
    expect(original.includes(EXIF_MARKER)).toBeTrue();
    expect(original.includes(Buffer.from('Spec Camera Works'))).toBeTrue();
    expect(om.exif!.includes(Buffer.from('N\0', 'latin1'))).withContext('GPS latitude ref in the EXIF block').toBeTrue();

    const t = await makeTemplate({ ownerId: owner.user.id });
    const r = await upload(b.app, owner, t.id, original, 'bench.jpg');
    expect(r.status).toBe(201);
    const stored = await readAll((await b.storage.get((await storageKeyOf(r.body.id))!))!);
    const sm = await sharp(stored).metadata();
    expect(sm.format).toBe('jpeg');
    expect(sm.exif).withContext('no EXIF block').toBeUndefined();
    expect(stored.includes(EXIF_MARKER)).withContext('no APP1 Exif segment').toBeFalse();
    expect(stored.includes(Buffer.from('Spec Camera Works'))).toBeFalse();
    expect([sm.width, sm.height]).toEqual([64, 48]);
  });

  it('turns a sideways JPEG upright by its orientation tag and records the upright size', async () => {
    const t = await makeTemplate({ ownerId: owner.user.id });
    const r = await upload(b.app, owner, t.id, await sidewaysJpeg(), 'sideways.jpg');
    expect(r.status).toBe(201);
    expect([r.body.width, r.body.height]).toEqual([20, 60]);
    const stored = await readAll((await b.storage.get((await storageKeyOf(r.body.id))!))!);
    const sm = await sharp(stored).metadata();
    expect([sm.width, sm.height, sm.orientation ?? 1]).toEqual([20, 60, 1]);
  });

  it('serves images and PDFs inline with nosniff and their own policy (sandboxed for images); anything else as an attachment', async () => {
    const t = await makeTemplate({ ownerId: owner.user.id });
    const image = await upload(b.app, owner, t.id, await png(), 'front.png');
    const doc = await upload(b.app, owner, t.id, pdf(), 'sheet.pdf');
    const gi = await request(b.app).get(image.body.url).set(bearer(owner));
    expect(gi.headers['content-disposition']).toMatch(/^inline; filename="front\.png"/);
    expect(gi.headers['x-content-type-options']).toBe('nosniff');
    expect(gi.headers['content-security-policy']).toBe("sandbox; default-src 'none'; img-src 'self'; style-src 'unsafe-inline'; frame-ancestors 'self'");
    const gp = await request(b.app).get(doc.body.url).set(bearer(owner));
    expect(gp.headers['content-type']).toBe('application/pdf');
    expect(gp.headers['content-disposition']).toMatch(/^inline; filename="sheet\.pdf"/);
    expect(gp.headers['x-content-type-options']).toBe('nosniff');
    expect(gp.headers['content-security-policy']).toContain("default-src 'none'");
    expect(gp.headers['content-security-policy']).not.toContain('script-src');

    // A record of another type (none can be uploaded today; an older or imported one).
    const env = await apiEnv();
    await b.storage.put(`templates/${t.id}/legacy.txt`, Buffer.from('<script>alert(1)</script>'), 'text/plain');
    const [row] = await env.database.db
      .insert(templateFiles)
      .values({ templateId: t.id, storageKey: `templates/${t.id}/legacy.txt`, originalName: 'notes.html', mediaType: 'text/plain', bytes: 25, createdBy: owner.user.id })
      .returning();
    const go = await request(b.app).get(`/api/templates/${t.id}/files/${row.id}`).set(bearer(owner));
    expect(go.status).toBe(200);
    expect(go.headers['content-disposition']).toMatch(/^attachment; filename="notes"/);
    expect(go.headers['x-content-type-options']).toBe('nosniff');
    expect(go.headers['content-security-policy']).toMatch(/^sandbox; default-src 'none'/);
  });

  it('moves a file to a stage and back to the whole template; a stage the template lacks is refused', async () => {
    const t = await makeTemplate({ ownerId: owner.user.id });
    const up = await upload(b.app, owner, t.id, await png(), 'p.png');
    const toStage = await request(b.app).patch(up.body.url).set(bearer(owner)).send({ stageKey: 'st-audio' });
    expect(toStage.status).toBe(200);
    expect(toStage.body.stageKey).toBe('st-audio');
    const unknown = await request(b.app).patch(up.body.url).set(bearer(owner)).send({ stageKey: 'st-nowhere' });
    expect(unknown.status).toBe(400);
    expect(unknown.body.error.details.field).toBe('stageKey');
    const back = await request(b.app).patch(up.body.url).set(bearer(owner)).send({ stageKey: null });
    expect(back.status).toBe(200);
    expect(back.body.stageKey).toBeNull();
    const onUpload = await upload(b.app, owner, t.id, await png(), 'q.png', { stageKey: 'st-nowhere' });
    expect(onUpload.status).toBe(400);
    expect(onUpload.body.error.details.field).toBe('stageKey');
  });
});

describe('Template files: captions', () => {
  let b: Backend;
  let owner: Session;
  beforeAll(async () => {
    b = await fsBackend();
    owner = await userSession(['author']);
  });

  async function captionOf(fileId: number): Promise<string | undefined> {
    const env = await apiEnv();
    const [row] = await env.database.db.select().from(templateFiles).where(eq(templateFiles.id, fileId));
    return row?.caption;
  }

  it('stores a caption sent with the upload, lists it, and a file sent without one has an empty caption', async () => {
    const t = await makeTemplate({ ownerId: owner.user.id });
    const text = `Under-chassis view, output stage; the 0.05 µF "tone" cap is replaced`;
    const up = await upload(b.app, owner, t.id, await png(), 'under.png', { caption: text, stageKey: 'st-audio' });
    expect(up.status).withContext(JSON.stringify(up.body)).toBe(201);
    expect(up.body.caption).toBe(text);
    expect(await captionOf(up.body.id)).toBe(text);
    const list = await request(b.app).get(`/api/templates/${t.id}/files`).set(bearer(owner));
    expect(list.body.items[0].caption).toBe(text);
    const bare = await upload(b.app, owner, t.id, pdf(), 'sheet.pdf');
    expect(bare.status).toBe(201);
    expect(bare.body.caption).toBe('');
    expect(await captionOf(bare.body.id)).toBe('');
  });

  it('changes a caption with PATCH (the stage stays), clears it, and changes stage and caption at once', async () => {
    const t = await makeTemplate({ ownerId: owner.user.id });
    const up = await upload(b.app, owner, t.id, await png(), 'top.png', { caption: 'Before', stageKey: 'st-audio' });
    const changed = await request(b.app).patch(up.body.url).set(bearer(owner)).send({ caption: '  Top view after recap  ' });
    expect(changed.status).withContext(JSON.stringify(changed.body)).toBe(200);
    expect(changed.body.caption).withContext('trimmed').toBe('Top view after recap');
    expect(changed.body.stageKey).withContext('stage unchanged').toBe('st-audio');
    expect(await captionOf(up.body.id)).toBe('Top view after recap');
    const both = await request(b.app).patch(up.body.url).set(bearer(owner)).send({ stageKey: null, caption: '' });
    expect(both.status).toBe(200);
    expect([both.body.stageKey, both.body.caption]).toEqual([null, '']);
    expect(await captionOf(up.body.id)).toBe('');
  });

  it('refuses a caption with markup, a line break or over 300 characters (the caption unchanged) beside a plain 300-character one that is taken', async () => {
    const t = await makeTemplate({ ownerId: owner.user.id });
    const up = await upload(b.app, owner, t.id, await png(), 'p.png', { caption: 'Kept' });
    for (const [what, caption] of [
      ['a tag', 'Dial <b>lamp</b>'],
      ['a script', '<script>alert(1)</script>'],
      ['a line break', 'two\nlines'],
      ['301 characters', 'c'.repeat(301)],
    ] as const) {
      const r = await request(b.app).patch(up.body.url).set(bearer(owner)).send({ caption });
      expect(r.status).withContext(what).toBe(400);
      expect(r.body.error.details.field).withContext(what).toBe('caption');
      expect(r.body.error.message).withContext(what).toMatch(/^"caption" (holds a control character or markup|must be at most 300 characters)/);
      const onUpload = await upload(b.app, owner, t.id, await png(), 'q.png', { caption });
      expect(onUpload.status).withContext(`upload: ${what}`).toBe(400);
      expect(onUpload.body.error.details.field).withContext(`upload: ${what}`).toBe('caption');
    }
    expect(await captionOf(up.body.id)).toBe('Kept');
    const plain = 'c'.repeat(299) + '<';
    const ok = await request(b.app).patch(up.body.url).set(bearer(owner)).send({ caption: plain });
    expect(ok.status).withContext(JSON.stringify(ok.body)).toBe(200);
    expect(await captionOf(up.body.id)).toBe(plain);
    const okUpload = await upload(b.app, owner, t.id, await png(), 'r.png', { caption: plain });
    expect(okUpload.status).toBe(201);
    expect(okUpload.body.caption).toBe(plain);
  });

  it('refuses an empty change and a caption that is not a string beside a change that is taken', async () => {
    const t = await makeTemplate({ ownerId: owner.user.id });
    const up = await upload(b.app, owner, t.id, await png(), 'p.png');
    const empty = await request(b.app).patch(up.body.url).set(bearer(owner)).send({});
    expect(empty.status).toBe(400);
    const notText = await request(b.app).patch(up.body.url).set(bearer(owner)).send({ caption: 42 });
    expect(notText.status).toBe(400);
    expect(notText.body.error.details.field).toBe('caption');
    const ok = await request(b.app).patch(up.body.url).set(bearer(owner)).send({ caption: 'Rear apron' });
    expect(ok.status).toBe(200);
    expect(ok.body.caption).toBe('Rear apron');
  });
});

describe('Template files: who may do what', () => {
  let b: Backend;
  let owner: Session;
  let viewer: Session;
  beforeAll(async () => {
    b = await fsBackend();
    owner = await userSession(['author']);
    viewer = await userSession(['technician']);
  });

  it('a viewer of a public template lists and reads its files but may not upload, move or delete (403)', async () => {
    const t = await makeTemplate({ ownerId: owner.user.id, published: 1, visibility: 'public' });
    const up = await upload(b.app, owner, t.id, await png(), 'ok.png');
    expect(up.status).toBe(201);
    expect((await request(b.app).get(`/api/templates/${t.id}/files`).set(bearer(viewer))).body.items.length).toBe(1);
    expect((await request(b.app).get(up.body.url).set(bearer(viewer))).status).toBe(200);
    expect((await request(b.app).get(up.body.thumbnailUrl).set(bearer(viewer))).status).toBe(200);
    const put = await upload(b.app, viewer, t.id, await png(), 'mine.png');
    expect(put.status).toBe(403);
    expect(put.body.error.code).toBe('not-owner');
    expect((await request(b.app).patch(up.body.url).set(bearer(viewer)).send({ stageKey: null })).status).toBe(403);
    expect((await request(b.app).delete(up.body.url).set(bearer(viewer))).status).toBe(403);
    expect(await storageKeyOf(up.body.id)).withContext('still there').toBeDefined();
  });

  it("someone else's private template: 404 for its files, its bytes and an upload; its owner gets 200", async () => {
    const t = await makeTemplate({ ownerId: owner.user.id });
    const up = await upload(b.app, owner, t.id, await png(), 'private.png');
    expect(up.status).toBe(201);
    for (const [what, r] of [
      ['list', await request(b.app).get(`/api/templates/${t.id}/files`).set(bearer(viewer))],
      ['bytes', await request(b.app).get(up.body.url).set(bearer(viewer))],
      ['thumbnail', await request(b.app).get(up.body.thumbnailUrl).set(bearer(viewer))],
      ['upload', await upload(b.app, viewer, t.id, await png(), 'x.png')],
      ['delete', await request(b.app).delete(up.body.url).set(bearer(viewer))],
    ] as const) {
      expect(r.status).withContext(what).toBe(404);
    }
    expect((await request(b.app).get(up.body.url).set(bearer(owner))).status).toBe(200);
  });

  it('a file id of another template is a 404 on this one', async () => {
    const a = await makeTemplate({ ownerId: owner.user.id });
    const other = await makeTemplate({ ownerId: owner.user.id });
    const up = await upload(b.app, owner, a.id, await png(), 'a.png');
    expect((await request(b.app).get(`/api/templates/${other.id}/files/${up.body.id}`).set(bearer(owner))).status).toBe(404);
    expect((await request(b.app).get(`/api/templates/${a.id}/files/${up.body.id}`).set(bearer(owner))).status).toBe(200);
  });
});

describe('Template files: bad multipart requests', () => {
  let b: Backend;
  let owner: Session;
  beforeAll(async () => {
    b = await fsBackend();
    owner = await userSession(['author']);
  });

  const raw = (templateId: number, s: Session | null, body: string | Buffer, type = 'multipart/form-data; boundary=spec-boundary') => {
    const r = request(b.app).post(`/api/templates/${templateId}/files`).set('Content-Type', type);
    return (s ? r.set(bearer(s)) : r).send(body);
  };
  const part = (name: string, value: string, filename?: string, type?: string) =>
    `--spec-boundary\r\nContent-Disposition: form-data; name="${name}"${filename ? `; filename="${filename}"` : ''}\r\n${type ? `Content-Type: ${type}\r\n` : ''}\r\n${value}\r\n`;

  it('each malformed upload is a 400 with the error body and records nothing; the valid twin is a 201', async () => {
    const env = await apiEnv();
    const t = await makeTemplate({ ownerId: owner.user.id });
    const pdfText = pdf().toString('latin1');
    const cases: [string, () => Promise<request.Response>, string][] = [
      ['truncated multipart', () => raw(t.id, owner, part('file', pdfText, 's.pdf', 'application/pdf').slice(0, 60)), '(body)'],
      ['no closing boundary', () => raw(t.id, owner, part('file', pdfText, 's.pdf', 'application/pdf')), '(body)'],
      ['a multipart type without a boundary', () => raw(t.id, owner, part('file', pdfText, 's.pdf'), 'multipart/form-data'), '(body)'],
      ['the file in the wrong field', () => raw(t.id, owner, part('upload', pdfText, 's.pdf', 'application/pdf') + '--spec-boundary--\r\n'), 'upload'],
      ['no file at all', () => raw(t.id, owner, part('stageKey', 'st-audio') + '--spec-boundary--\r\n'), 'file'],
      ['two files', () => raw(t.id, owner, part('file', pdfText, 'a.pdf') + part('file', pdfText, 'b.pdf') + '--spec-boundary--\r\n'), 'file'],
      ['an empty file', () => raw(t.id, owner, part('file', '', 'e.pdf') + '--spec-boundary--\r\n'), 'file'],
      ['a field the upload does not take', () => raw(t.id, owner, part('title', 'x') + part('file', pdfText, 's.pdf') + '--spec-boundary--\r\n'), 'title'],
      ['a caption with markup', () => raw(t.id, owner, part('caption', '<img src=x onerror=alert(1)>') + part('file', pdfText, 's.pdf') + '--spec-boundary--\r\n'), 'caption'],
      ['a caption longer than the field limit', () => raw(t.id, owner, part('caption', 'y'.repeat(3000)) + part('file', pdfText, 's.pdf') + '--spec-boundary--\r\n'), 'caption'],
      ['a stage key of the wrong shape', () => raw(t.id, owner, part('stageKey', "' OR 1=1 --") + part('file', pdfText, 's.pdf') + '--spec-boundary--\r\n'), 'stageKey'],
      ['a text file named .png', () => raw(t.id, owner, part('file', 'just words', 'photo.png', 'image/png') + '--spec-boundary--\r\n'), 'file'],
      ['JSON instead of multipart', () => raw(t.id, owner, JSON.stringify({ file: 'x' }), 'application/json'), '(body)'],
      ['no content type', () => request(b.app).post(`/api/templates/${t.id}/files`).set(bearer(owner)), '(body)'],
      ['a path id that is not a number', () => request(b.app).post('/api/templates/abc/files').set(bearer(owner)).attach('file', pdf(), 's.pdf'), 'id'],
    ];
    const before = await tableState(env.database.db);
    for (const [what, send, field] of cases) {
      const r = await send();
      expect(r.status).withContext(`${what}: ${JSON.stringify(r.body)}`).toBe(400);
      expect(typeof r.body.error?.message).withContext(what).toBe('string');
      expect(r.body.error?.details?.field).withContext(what).toBe(field);
    }
    expect(await tableState(env.database.db)).withContext('tables after the malformed uploads').toEqual(before);
    const ok = await raw(t.id, owner, part('stageKey', 'st-audio') + part('caption', 'Chassis, 1 < 2') + part('file', pdfText, 's.pdf', 'application/pdf') + '--spec-boundary--\r\n');
    expect(ok.status).withContext(JSON.stringify(ok.body)).toBe(201);
    expect(ok.body.caption).toBe('Chassis, 1 < 2');
  });

  it('a request that is not multipart is a 400 before an anonymous caller gets a 401', async () => {
    const t = await makeTemplate({ ownerId: owner.user.id });
    const r = await raw(t.id, null, '{}', 'application/json');
    expect(r.status).toBe(400);
    const anon = await request(b.app).post(`/api/templates/${t.id}/files`).attach('file', pdf(), 's.pdf');
    expect(anon.status).toBe(401);
  });
});
