/**
 * Photos of a set (intake photos, optionally attached to one reading of the set's surveys),
 * against the real database and a folder storage in a temporary directory. Images are made here
 * with sharp.
 *
 * Formats: the EXIF APP1 segment starts with "Exif\0\0" (JEITA CP-3451, Exif 2.3, §4.5.4); a PDF
 * file starts with "%PDF-" (ISO 32000-1:2008 §7.5.2); a GIF with "GIF89a" (GIF89a specification,
 * W3C/CompuServe 1990, §17).
 */
import { mkdtempSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { eq } from 'drizzle-orm';
import sharp from 'sharp';
import request from 'supertest';
import { createApp } from '../../api/app';
import { FsStorage, readAll } from '../../api/storage/index';
import { setFiles } from '../../schema/index';
import { apiEnv, bearer, userSession, type Session } from '../support/api-env';
import { addReading, makeSet, makeSurvey } from '../support/bench-fixtures';
import { addStudent, makeAssignment, makeClass, makeClassSurvey } from '../support/class-fixtures';
import { tableState } from '../support/table-state';

const png = (w = 40, h = 30) => sharp({ create: { width: w, height: h, channels: 3, background: { r: 200, g: 120, b: 40 } } }).png().toBuffer();
const webp = () => sharp({ create: { width: 50, height: 20, channels: 4, background: { r: 0, g: 90, b: 200, alpha: 0.5 } } }).webp().toBuffer();
const gif = () => sharp({ create: { width: 16, height: 16, channels: 3, background: { r: 10, g: 200, b: 10 } } }).gif().toBuffer();
/** A JPEG carrying EXIF with a camera maker and a GPS position (invented coordinates). */
const jpegWithGps = (w = 640, h = 480) =>
  sharp({ create: { width: w, height: h, channels: 3, background: { r: 90, g: 90, b: 90 } } })
    .jpeg()
    .withExif({
      IFD0: { Make: 'Spec Camera Works', Model: 'Probe 7' },
      IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '47/1 22/1 1234/100', GPSLongitudeRef: 'E', GPSLongitude: '8/1 32/1 5678/100' },
    })
    .toBuffer();
/** A minimal PDF: header, one empty page, trailer (ISO 32000-1 §7.5). */
const pdf = () =>
  Buffer.from(
    '%PDF-1.4\n1 0 obj<</Type/Catalog/Pages 2 0 R>>endobj\n2 0 obj<</Type/Pages/Kids[3 0 R]/Count 1>>endobj\n' +
      '3 0 obj<</Type/Page/Parent 2 0 R/MediaBox[0 0 612 792]>>endobj\ntrailer<</Root 1 0 R>>\n%%EOF\n',
  );
const EXIF_MARKER = Buffer.from('Exif\0\0', 'latin1');

/** supertest collects a binary body as a Buffer with this parser. */
const binary = (res: unknown, cb: (err: Error | null, body: Buffer) => void) => {
  const stream = res as NodeJS.ReadableStream;
  const chunks: Buffer[] = [];
  stream.on('data', (c: Buffer) => chunks.push(c));
  stream.on('end', () => cb(null, Buffer.concat(chunks)));
};

/** Every file under a folder (recursively), relative names. */
function filesUnder(dir: string): string[] {
  try {
    return (readdirSync(dir, { recursive: true, withFileTypes: true }) as import('node:fs').Dirent[]).filter((d) => d.isFile()).map((d) => join(d.parentPath, d.name));
  } catch {
    return [];
  }
}

interface SetPhoto {
  id: number;
  setId: number;
  caption: string;
  readingId: number | null;
  testPointKey: string | null;
  surveyId: number | null;
  name: string;
  mimeType: string;
  bytes: number;
  uploadedBy: { id: number; name: string } | null;
  createdAt: string;
  url: string;
  thumbnailUrl: string | null;
}

describe('Photos of a set', () => {
  let app: ReturnType<typeof createApp>;
  let storage: FsStorage;
  let root: string;
  let owner: Session;

  beforeAll(async () => {
    const env = await apiEnv();
    root = join(mkdtempSync(join(tmpdir(), 'driftmark-spec-set-photos-')), 'uploads');
    storage = new FsStorage(root);
    app = createApp({ config: env.config, database: env.database, outbox: env.queue, storage });
    owner = await userSession(['technician']);
  });

  const upload = (s: Session, setId: number, bytes: Buffer, name: string, fields: Record<string, string> = {}, contentType?: string) => {
    let r = request(app).post(`/api/sets/${setId}/files`).set(bearer(s));
    for (const [k, v] of Object.entries(fields)) r = r.field(k, v);
    return r.attach('file', bytes, contentType ? { filename: name, contentType } : name);
  };
  const rowOf = async (fileId: number) => {
    const env = await apiEnv();
    const [row] = await env.database.db.select().from(setFiles).where(eq(setFiles.id, fileId));
    return row;
  };

  it('uploads an intake photo with a caption, lists it, serves it and its thumbnail with their headers, without its EXIF', async () => {
    const set = await makeSet({ ownerId: owner.user.id });
    const up = await upload(owner, set.id, await jpegWithGps(640, 480), 'chassis top.jpg', { caption: 'Chassis top at intake' });
    expect(up.status).withContext(JSON.stringify(up.body)).toBe(201);
    const photo = up.body as SetPhoto;
    expect(photo).toEqual(
      jasmine.objectContaining({
        setId: set.id,
        caption: 'Chassis top at intake',
        readingId: null,
        testPointKey: null,
        name: 'chassis top.jpg',
        mimeType: 'image/jpeg',
        uploadedBy: { id: owner.user.id, name: owner.user.name },
        url: `/api/sets/${set.id}/files/${photo.id}`,
        thumbnailUrl: `/api/sets/${set.id}/files/${photo.id}/thumbnail`,
      }),
    );
    expect(Number.isNaN(Date.parse(photo.createdAt))).toBeFalse();

    const row = await rowOf(photo.id);
    expect(row.storageKey).toMatch(new RegExp(`^sets/${set.id}/[0-9a-f-]{36}\\.jpg$`));
    expect(row.thumbnailKey).toBe(`${row.storageKey}.thumb.webp`);
    const stored = await storage.get(row.storageKey);
    expect(stored?.size).toBe(photo.bytes);

    const list = await request(app).get(`/api/sets/${set.id}/files`).set(bearer(owner));
    expect(list.status).toBe(200);
    expect(list.body.setId).toBe(set.id);
    expect(list.body.items).toEqual([photo]);

    const got = await request(app).get(photo.url).set(bearer(owner)).buffer(true).parse(binary);
    expect(got.status).toBe(200);
    expect(got.headers['content-type']).toBe('image/jpeg');
    expect(got.headers['x-content-type-options']).toBe('nosniff');
    expect(got.headers['content-security-policy']).toBe("sandbox; default-src 'none'; img-src 'self'; style-src 'unsafe-inline'; frame-ancestors 'self'");
    expect(got.headers['content-disposition']).toMatch(/^inline; filename="chassis top\.jpg"/);
    expect(got.headers['cache-control']).toBe('private, no-store');
    const body = got.body as Buffer;
    expect((await sharp(body).metadata()).width).toBe(640);
    expect(body.includes(EXIF_MARKER)).withContext('EXIF (with the GPS position) stripped').toBeFalse();
    expect(body.includes(Buffer.from('Spec Camera Works'))).toBeFalse();

    const thumb = await request(app).get(photo.thumbnailUrl!).set(bearer(owner)).buffer(true).parse(binary);
    expect(thumb.status).toBe(200);
    expect(thumb.headers['content-type']).toBe('image/webp');
    expect(thumb.headers['x-content-type-options']).toBe('nosniff');
    expect(thumb.headers['content-disposition']).toMatch(/^inline; filename="thumbnail-chassis top\.webp"/);
    const tm = await sharp(thumb.body as Buffer).metadata();
    expect([tm.width, tm.height]).toEqual([320, 240]);
  });

  it('changes a caption, clears it, and refuses markup in it (the caption unchanged) beside a plain one that is taken', async () => {
    const set = await makeSet({ ownerId: owner.user.id });
    const up = await upload(owner, set.id, await png(), 'dial.png', { caption: 'Dial' });
    const path = `/api/sets/${set.id}/files/${up.body.id}`;
    const ok = await request(app).patch(path).set(bearer(owner)).send({ caption: '  Dial glass cracked at 1400 kc  ' });
    expect(ok.status).toBe(200);
    expect(ok.body.caption).toBe('Dial glass cracked at 1400 kc');
    const bad = await request(app).patch(path).set(bearer(owner)).send({ caption: '<b>Dial</b>' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.field).toBe('caption');
    expect(bad.body.error.message).toMatch(/markup/);
    expect((await rowOf(up.body.id)).caption).toBe('Dial glass cracked at 1400 kc');
    const cleared = await request(app).patch(path).set(bearer(owner)).send({ caption: '' });
    expect(cleared.status).toBe(200);
    expect(cleared.body.caption).toBe('');
    const empty = await request(app).patch(path).set(bearer(owner)).send({});
    expect(empty.status).toBe(400);
  });

  it("attaches a photo to a reading of the set's survey (upload and PATCH); a reading of another set is refused beside it; null detaches", async () => {
    const set = await makeSet({ ownerId: owner.user.id });
    const survey = await makeSurvey({ setId: set.id });
    const reading = await addReading(survey.id, { testPointKey: 'tp-r2', text: '310k' });
    const other = await makeSet({ ownerId: owner.user.id });
    const foreign = await addReading((await makeSurvey({ setId: other.id })).id, { testPointKey: 'tp-r1', text: '9.8M' });

    const env = await apiEnv();
    const before = await tableState(env.database.db);
    const filesBefore = filesUnder(root).length;
    const refused = await upload(owner, set.id, await png(), 'r2.png', { readingId: String(foreign) });
    expect(refused.status).toBe(400);
    expect(refused.body.error.details.field).toBe('readingId');
    expect(await tableState(env.database.db)).withContext('nothing recorded').toEqual(before);
    expect(filesUnder(root).length).withContext('nothing stored').toBe(filesBefore);

    const linked = await upload(owner, set.id, await png(), 'r2.png', { readingId: String(reading), caption: 'R2 body scorched' });
    expect(linked.status).withContext(JSON.stringify(linked.body)).toBe(201);
    expect(linked.body).toEqual(jasmine.objectContaining({ readingId: reading, testPointKey: 'tp-r2', surveyId: survey.id }));

    const plain = await upload(owner, set.id, await png(), 'front.png');
    const path = `/api/sets/${set.id}/files/${plain.body.id}`;
    const badPatch = await request(app).patch(path).set(bearer(owner)).send({ readingId: foreign });
    expect(badPatch.status).toBe(400);
    expect(badPatch.body.error.details.field).toBe('readingId');
    expect((await rowOf(plain.body.id)).readingId).toBeNull();
    const unknown = await request(app).patch(path).set(bearer(owner)).send({ readingId: foreign + 1_000_000 });
    expect(unknown.status).toBe(400);
    const goodPatch = await request(app).patch(path).set(bearer(owner)).send({ readingId: reading });
    expect(goodPatch.status).toBe(200);
    expect(goodPatch.body).toEqual(jasmine.objectContaining({ readingId: reading, testPointKey: 'tp-r2', caption: '' }));

    const list = await request(app).get(`/api/sets/${set.id}/files`).set(bearer(owner));
    expect(list.body.items.map((p: SetPhoto) => [p.id, p.testPointKey])).toEqual([
      [linked.body.id, 'tp-r2'],
      [plain.body.id, 'tp-r2'],
    ]);

    const detached = await request(app).patch(path).set(bearer(owner)).send({ readingId: null });
    expect(detached.status).toBe(200);
    expect(detached.body).toEqual(jasmine.objectContaining({ readingId: null, testPointKey: null, surveyId: null }));
  });

  it("refuses a class survey's reading of a training set (the student's, not the set's) beside the set's own survey's reading", async () => {
    const klass = await makeClass({ instructorId: owner.user.id });
    const assignment = await makeAssignment({ classId: klass.id, reference: true });
    const studentId = await addStudent(klass.id);
    const classSurvey = await makeClassSurvey(assignment.id, studentId);
    const theirs = await addReading(classSurvey, { testPointKey: 'tp-r2', text: '300k' });
    const own = await addReading(assignment.referenceSurveyId!, { testPointKey: 'tp-r2', text: '305k' });
    const refused = await upload(owner, assignment.setId, await png(), 'r2.png', { readingId: String(theirs) });
    expect(refused.status).toBe(400);
    expect(refused.body.error.details.field).toBe('readingId');
    const linked = await upload(owner, assignment.setId, await png(), 'r2.png', { readingId: String(own) });
    expect(linked.status).withContext(JSON.stringify(linked.body)).toBe(201);
  });

  it('deletes a photo with its stored bytes and thumbnail; the other photo stays', async () => {
    const set = await makeSet({ ownerId: owner.user.id });
    const a = await upload(owner, set.id, await png(), 'a.png');
    const b = await upload(owner, set.id, await webp(), 'b.webp');
    const row = await rowOf(a.body.id);
    expect(await storage.get(row.storageKey)).not.toBeNull();
    expect(await storage.get(row.thumbnailKey!)).not.toBeNull();
    const del = await request(app).delete(a.body.url).set(bearer(owner));
    expect(del.status).toBe(204);
    expect(await rowOf(a.body.id)).withContext('record removed').toBeUndefined();
    expect(await storage.get(row.storageKey)).withContext('stored bytes removed').toBeNull();
    expect(await storage.get(row.thumbnailKey!)).withContext('thumbnail removed').toBeNull();
    expect((await request(app).get(a.body.url).set(bearer(owner))).status).toBe(404);
    expect((await request(app).delete(a.body.url).set(bearer(owner))).status).toBe(404);
    const list = await request(app).get(`/api/sets/${set.id}/files`).set(bearer(owner));
    expect(list.body.items.map((p: SetPhoto) => p.id)).toEqual([b.body.id]);
    expect((await request(app).get(b.body.url).set(bearer(owner))).status).toBe(200);
  });

  it('is a 404 on every route for a stranger (nothing stored, nothing changed) and works for a user the set is shared with and for an admin', async () => {
    const stranger = await userSession(['technician']);
    const friend = await userSession(['technician']);
    const admin = await userSession(['admin']);
    const set = await makeSet({ ownerId: owner.user.id, sharedWith: [friend.user.id] });
    const up = await upload(owner, set.id, await png(), 'front.png', { caption: 'Front' });
    const path = `/api/sets/${set.id}/files/${up.body.id}`;

    const env = await apiEnv();
    const before = await tableState(env.database.db);
    const filesBefore = filesUnder(root).length;
    const answers = [
      await upload(stranger, set.id, await png(), 'mine.png'),
      await request(app).get(`/api/sets/${set.id}/files`).set(bearer(stranger)),
      await request(app).get(path).set(bearer(stranger)),
      await request(app).get(`${path}/thumbnail`).set(bearer(stranger)),
      await request(app).patch(path).set(bearer(stranger)).send({ caption: 'Mine now' }),
      await request(app).delete(path).set(bearer(stranger)),
    ];
    expect(answers.map((r) => r.status)).toEqual([404, 404, 404, 404, 404, 404]);
    expect(answers.map((r) => r.body?.error?.code)).toEqual(Array(6).fill('not-found'));
    expect(await tableState(env.database.db)).toEqual(before);
    expect(filesUnder(root).length).toBe(filesBefore);
    // The photo's id under another set's address is a 404 too, even for that set's owner.
    const elsewhere = await makeSet({ ownerId: stranger.user.id });
    expect((await request(app).get(`/api/sets/${elsewhere.id}/files/${up.body.id}`).set(bearer(stranger))).status).toBe(404);

    const anonymous = await request(app).get(`/api/sets/${set.id}/files`);
    expect(anonymous.status).toBe(401);

    expect((await request(app).get(path).set(bearer(friend))).status).toBe(200);
    const byFriend = await upload(friend, set.id, await png(), 'back.png');
    expect(byFriend.status).toBe(201);
    expect(byFriend.body.uploadedBy).toEqual({ id: friend.user.id, name: friend.user.name });
    expect((await request(app).patch(path).set(bearer(admin)).send({ caption: 'Front, checked' })).status).toBe(200);
    const list = await request(app).get(`/api/sets/${set.id}/files`).set(bearer(admin));
    expect(list.body.items.map((p: SetPhoto) => p.caption)).toEqual(['Front, checked', '']);
  });

  it('refuses a PDF, a GIF, an SVG and a text file named .jpg with a 4xx storing nothing; JPEG, PNG and WebP are taken', async () => {
    const set = await makeSet({ ownerId: owner.user.id });
    const refused: [string, Buffer, string][] = [
      ['a PDF', pdf(), 'schematic.pdf'],
      ['a GIF', await gif(), 'dial.gif'],
      ['an SVG', Buffer.from('<svg xmlns="http://www.w3.org/2000/svg" width="10" height="10"><script>alert(1)</script></svg>'), 'dial.svg'],
      ['a text file named .jpg', Buffer.from('Plate load 250k, grid leak 10M.\n'), 'parts.jpg'],
    ];
    const env = await apiEnv();
    const before = await tableState(env.database.db);
    const filesBefore = filesUnder(root).length;
    for (const [what, bytes, name] of refused) {
      const r = await upload(owner, set.id, bytes, name, { caption: what }, 'image/jpeg');
      expect(r.status).withContext(what).toBe(400);
      expect(r.body.error.code).withContext(what).toBe('unsupported-file-type');
      expect(r.body.error.details.field).withContext(what).toBe('file');
    }
    expect(await tableState(env.database.db)).withContext('nothing recorded').toEqual(before);
    expect(filesUnder(root).length).withContext('nothing stored').toBe(filesBefore);
    for (const [name, bytes, type] of [['p.png', await png(), 'image/png'], ['w.webp', await webp(), 'image/webp'], ['j.jpg', await jpegWithGps(64, 48), 'image/jpeg']] as const) {
      const ok = await upload(owner, set.id, bytes, name);
      expect(ok.status).withContext(name).toBe(201);
      expect(ok.body.mimeType).withContext(name).toBe(type);
    }
    // Each stored object is its bytes and a media-type note beside them (api/storage/fs-storage.ts).
    expect(filesUnder(root).length).withContext('three photos and three thumbnails').toBe(filesBefore + 12);
  });

  it('checks the request before reading the body: not multipart is a 400, anonymous a 401; a bad readingId or an unknown field a 400; within the size limit is taken, over it refused', async () => {
    const set = await makeSet({ ownerId: owner.user.id });
    const json = await request(app).post(`/api/sets/${set.id}/files`).set(bearer(owner)).send({ file: 'x' });
    expect(json.status).toBe(400);
    expect(json.body.error.code).toBe('not-multipart');
    const anon = await request(app).post(`/api/sets/${set.id}/files`).attach('file', await png(), 'a.png');
    expect(anon.status).toBe(401);
    const badId = await upload(owner, set.id, await png(), 'a.png', { readingId: 'R2' });
    expect(badId.status).toBe(400);
    expect(badId.body.error.details.field).toBe('readingId');
    const extra = await upload(owner, set.id, await png(), 'a.png', { stageKey: 'st-audio' });
    expect(extra.status).toBe(400);
    expect(extra.body.error.details.field).toBe('stageKey');
    const noFile = await request(app).post(`/api/sets/${set.id}/files`).set(bearer(owner)).field('caption', 'nothing attached');
    expect(noFile.status).toBe(400);
    expect(noFile.body.error.code).toBe('no-file');

    const env = await apiEnv();
    const small = env.appWith({ UPLOAD_MAX_BYTES: '4096' });
    const big = await request(small).post(`/api/sets/${set.id}/files`).set(bearer(owner)).attach('file', await png(400, 400).then((b) => sharp(b).png({ compressionLevel: 0 }).toBuffer()), 'big.png');
    expect(big.status).toBe(400);
    expect(big.body.error).toEqual(jasmine.objectContaining({ code: 'file-too-large', details: { field: 'file' } }));
    const fits = await request(small).post(`/api/sets/${set.id}/files`).set(bearer(owner)).attach('file', await png(), 'fits.png');
    expect(fits.status).toBe(201);
  });
});
