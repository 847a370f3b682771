/**
 * The bad-input spec: per write route, malformed requests each beside its valid twin. Every
 * malformed answer is a 4xx with the error body, never a 5xx, and the application tables are
 * unchanged (row counts and a checksum); the valid twin then succeeds.
 */
import sharp from 'sharp';
import request from 'supertest';
import { uploadFile } from '../../api/files/files.use-cases';
import { storageFromConfig } from '../../api/storage/index';
import { apiEnv, bearer, makeUser, randomIp, userSession, type Session } from '../support/api-env';
import { freshCredentials, liveInvitationToken, liveRefreshToken, liveResetToken } from '../support/api-fixtures';
import { tableState } from '../support/table-state';
import { makeTemplate, makeTubeType, sampleDocument, specTube, uniqueDesignation, withR2Tolerance } from '../support/template-fixtures';
import { owned, type Body, type WriteRoute } from '../support/bad-input-kit';
import { BENCH_BAD_INPUT } from './rows/index';

/** Free text that may legitimately hold quotes and SQL-looking words (stored verbatim, never run). */
const FREE_TEXT = ['password', 'name', 'note', 'changelog', 'reason', 'label'];
/** Fields that take text or a number alike. */
const TEXT_OR_NUMBER = ['reading'];
/** Secrets: any printable character goes. */
const SECRETS = ['password'];

const unique = (label: string) => `${label}-${Math.random().toString(36).slice(2)}@spec.example`;

const tubeRecord = () => ({ base: 'noval', heating: 'indirect', heaterVolts: 6.3, heaterAmps: 0.3, pins: [{ pin: 4, electrode: 'h', label: 'heater' }, { pin: 5, electrode: 'h', label: 'heater' }] });

const ROUTES: Record<string, WriteRoute> = {
  'POST /api/auth/sign-in': { method: 'post', path: async () => '/api/auth/sign-in', valid: async () => freshCredentials(), auth: 'none' },
  'POST /api/auth/refresh': { method: 'post', path: async () => '/api/auth/refresh', valid: async () => ({ refreshToken: await liveRefreshToken() }), auth: 'none' },
  'POST /api/auth/sign-out': { method: 'post', path: async () => '/api/auth/sign-out', valid: async () => ({ refreshToken: await liveRefreshToken() }), auth: 'none' },
  'POST /api/auth/sign-up': { method: 'post', path: async () => '/api/auth/sign-up', valid: async () => ({ email: unique('su'), name: 'Sign Up', password: 'long-enough-pw' }), auth: 'none' },
  'POST /api/auth/password-reset': { method: 'post', path: async () => '/api/auth/password-reset', valid: async () => ({ email: unique('reset') }), auth: 'none' },
  'POST /api/auth/password-reset/confirm': {
    method: 'post',
    path: async () => '/api/auth/password-reset/confirm',
    valid: async () => ({ token: await liveResetToken(), password: 'long-enough-pw' }),
    auth: 'none',
  },
  'POST /api/auth/invitations/accept': {
    method: 'post',
    path: async () => '/api/auth/invitations/accept',
    valid: async () => ({ token: await liveInvitationToken(), name: 'Invited', password: 'long-enough-pw' }),
    auth: 'none',
  },
  'POST /api/admin/users': {
    method: 'post',
    path: async () => '/api/admin/users',
    valid: async () => ({ email: unique('made'), name: 'Made', roles: ['technician'], password: 'long-enough-pw' }),
    auth: 'admin',
  },
  'PATCH /api/admin/users/:userId': {
    method: 'patch',
    path: async () => `/api/admin/users/${(await makeUser(['student'])).id}`,
    valid: async () => ({ name: 'Renamed', roles: ['student', 'technician'], active: true }),
    auth: 'admin',
    optional: ['name', 'roles', 'active'],
  },
  'POST /api/admin/invitations': { method: 'post', path: async () => '/api/admin/invitations', valid: async () => ({ email: unique('inv'), name: 'Inv', roles: ['student'] }), auth: 'admin', optional: ['name'] },
  'PUT /api/admin/settings': { method: 'put', path: async () => '/api/admin/settings', valid: async () => ({ openSignUp: true }), auth: 'admin' },
  'POST /api/calc/parse': { method: 'post', path: async () => '/api/calc/parse', valid: async () => ({ text: '4k7', serviceDataYear: 1948 }), auth: 'none', optional: ['serviceDataYear'] },
  'POST /api/calc/color-code': { method: 'post', path: async () => '/api/calc/color-code', valid: async () => ({ bands: ['yellow', 'violet', 'red', 'gold'] }), auth: 'none' },
  'POST /api/calc/verdict': {
    method: 'post',
    path: async () => '/api/calc/verdict',
    valid: async () => ({ expected: 100000, reading: '104k', tolerancePct: 10, rule: { decision: 'simple', nearLimitFraction: 0.75, bandFrom: 'template' } }),
    auth: 'none',
    optional: ['tolerancePct', 'rule'],
  },
  'POST /api/calc/network': {
    method: 'post',
    path: async () => '/api/calc/network',
    valid: async () => ({ edges: [{ id: 'R1', a: 'A', b: 'B', ohms: 1000 }], from: 'A', to: 'B', readingOhms: 990 }),
    auth: 'none',
    optional: ['readingOhms'],
  },
  'POST /api/calc/dissipation': { method: 'post', path: async () => '/api/calc/dissipation', valid: async () => ({ ohms: 100000, volts: 150 }), auth: 'none', optional: ['volts'] },
  'POST /api/tube-types': { method: 'post', path: async () => '/api/tube-types', valid: async () => ({ designation: uniqueDesignation(), ...tubeRecord() }), auth: 'admin' },
  'PUT /api/tube-types/:designation': { method: 'put', path: async () => `/api/tube-types/${await makeTubeType()}`, valid: async () => tubeRecord(), auth: 'admin' },
  'POST /api/templates': {
    method: 'post',
    path: async () => '/api/templates',
    valid: async () => ({ chassis: { maker: 'Bad Input Radio', model: 'Probe 1', kind: 'console', power: 'transformer' } }),
    auth: 'admin',
  },
  'POST /api/templates/import': { method: 'post', path: async () => '/api/templates/import', valid: async () => ({ document: sampleDocument(await specTube()) }), auth: 'admin' },
  'PUT /api/templates/:id/draft': owned('put', async (o) => {
    const t = await makeTemplate({ ownerId: o.user.id });
    return { path: `/api/templates/${t.id}/draft`, body: { revision: 1, content: withR2Tolerance(t.doc, 5) } };
  }),
  'PUT /api/templates/:id/versions/:version': owned('put', async (o) => {
    const t = await makeTemplate({ ownerId: o.user.id });
    return { path: `/api/templates/${t.id}/versions/draft`, body: { revision: 1, content: withR2Tolerance(t.doc, 5) } };
  }),
  'POST /api/templates/:id/publish': owned('post', async (o) => ({ path: `/api/templates/${(await makeTemplate({ ownerId: o.user.id })).id}/publish`, body: { changelog: 'First issue' } })),
  'POST /api/templates/:id/versions/:number/retire': owned('post', async (o) => ({
    path: `/api/templates/${(await makeTemplate({ ownerId: o.user.id, published: 1 })).id}/versions/1/retire`,
    body: { reason: 'Superseded by version 2' },
  })),
  'POST /api/templates/:id/copy': { method: 'post', path: async () => `/api/templates/${(await makeTemplate({ published: 1 })).id}/copy`, valid: async () => ({ version: 1 }), auth: 'admin' },
  'PUT /api/templates/:id/sharing': owned('put', async (o) => ({
    path: `/api/templates/${(await makeTemplate({ ownerId: o.user.id })).id}/sharing`,
    body: { visibility: 'shared', userIds: [(await makeUser(['technician'])).id] },
  })),
  'POST /api/templates/:id/corrections': {
    method: 'post',
    path: async () => `/api/templates/${(await makeTemplate({ published: 1 })).id}/corrections`,
    valid: async () => ({ versionNumber: 1, target: { kind: 'component', key: 'c-r2' }, change: { tolerancePct: 5 }, note: 'The sheet gives 5 %.' }),
    auth: 'admin',
  },
  'POST /api/templates/:id/corrections/:correctionId/decision': owned(
    'post',
    async (o) => {
      const t = await makeTemplate({ ownerId: o.user.id, published: 1, correctionBy: o.user.id });
      return { path: `/api/templates/${t.id}/corrections/${t.correctionId}/decision`, body: { decision: 'accept', note: 'Agreed.' } };
    },
    ['note'],
  ),
  // Uploads are multipart: their bad requests are in spec/api/files.spec.ts ("bad multipart requests").
  'PATCH /api/templates/:id/files/:fileId': owned(
    'patch',
    async (o) => {
      const env = await apiEnv();
      const t = await makeTemplate({ ownerId: o.user.id });
      const png = await sharp({ create: { width: 8, height: 8, channels: 3, background: { r: 9, g: 9, b: 9 } } }).png().toBuffer();
      const f = await uploadFile({ db: env.database.db, storage: storageFromConfig(env.config), config: env.config }, { id: o.user.id, roles: ['author'] }, t.id, { bytes: png, originalName: 'bad-input.png' });
      return { path: `/api/templates/${t.id}/files/${f.id}`, body: { stageKey: 'st-audio', caption: 'Output transformer, top view' } };
    },
    // Either field alone is a change; an empty object is not.
    ['stageKey', 'caption'],
    // null moves to the whole template; '' clears the caption; a caption is free text (stored, never run).
    ['stageKey as null', 'caption empty', 'caption with SQL injection'],
  ),
  ...BENCH_BAD_INPUT,
};

/** Malformed variants of a valid body: each says what is wrong with it. */
function malformedBodies(valid: Body, optional: string[] = []): [string, string | Body | unknown[] | null][] {
  const out: [string, string | Body | unknown[] | null][] = [
    ['an empty object', {}],
    ['an array instead of an object', [valid]],
    ['null', null],
    ['an unknown extra field', { ...valid, isAdmin: true }],
    ['a prototype-pollution key', JSON.parse(`{${Object.entries(valid).map(([k, v]) => `${JSON.stringify(k)}:${JSON.stringify(v)}`).join(',')},"__proto__":{"admin":true}}`)],
  ];
  let nest: Body = { x: 1 };
  for (let i = 0; i < 200; i++) nest = { x: nest };
  out.push(['deep nesting in a field', { ...valid, [Object.keys(valid)[0]]: nest }]);
  for (const [field, value] of Object.entries(valid)) {
    const rest = { ...valid };
    delete rest[field];
    if (!optional.includes(field)) out.push([`missing ${field}`, rest]);
    if (typeof value === 'number') {
      out.push([`${field} as a numeric string`, { ...valid, [field]: String(value) }]);
      out.push([`${field} as "NaN"`, { ...valid, [field]: 'NaN' }]);
      out.push([`${field} negative`, { ...valid, [field]: -Math.abs(value) - 1 }]);
      out.push([`${field} beyond any range`, { ...valid, [field]: 1e308 }]);
    } else if (!TEXT_OR_NUMBER.includes(field)) out.push([`${field} as a number`, { ...valid, [field]: 12345 }]);
    out.push([`${field} as an object`, { ...valid, [field]: { $ne: null } }]);
    out.push([`${field} as null`, { ...valid, [field]: null }]);
    if (typeof value === 'string') {
      out.push([`${field} as a huge string`, { ...valid, [field]: 'x'.repeat(100_000) }]);
      out.push([`${field} as an array of strings`, { ...valid, [field]: [value] }]);
      if (!FREE_TEXT.includes(field)) out.push([`${field} with SQL injection`, { ...valid, [field]: `' OR 1=1; DROP TABLE users; --` }]);
      if (!SECRETS.includes(field)) out.push([`${field} with a script`, { ...valid, [field]: '<script>alert(1)</script>' }]);
      out.push([`${field} with a NUL character`, { ...valid, [field]: `${value}\u0000` }]);
      out.push([`${field} empty`, { ...valid, [field]: '' }]);
    }
    if (Array.isArray(value)) {
      out.push([`${field} empty`, { ...valid, [field]: [] }]);
      out.push([`${field} with an unknown member`, { ...valid, [field]: ['superuser'] }]);
      out.push([`${field} huge`, { ...valid, [field]: Array.from({ length: 10_000 }, () => 'student') }]);
    }
    if (typeof value === 'boolean') out.push([`${field} as the string "true"`, { ...valid, [field]: 'true' }]);
  }
  return out;
}

/** Malformed requests sent by the per-route specs, counted for the floor of issue 7. */
let casesInAll = 0;

describe('Bad input on every write route', () => {
  let admin: Session;
  beforeAll(async () => {
    admin = await userSession(['admin']);
    const env = await apiEnv();
    await request(env.app).put('/api/admin/settings').set(bearer(admin)).send({ openSignUp: true });
  });
  afterAll(async () => {
    const env = await apiEnv();
    await request(env.app).put('/api/admin/settings').set(bearer(admin)).send({ openSignUp: false });
  });

  for (const [name, route] of Object.entries(ROUTES)) {
    it(`${name}: malformed requests get a 4xx with the error body and change nothing; the valid twin succeeds`, async () => {
      const env = await apiEnv();
      const headers: Record<string, string> = route.caller ? bearer(await route.caller()) : route.auth === 'admin' ? bearer(admin) : {};
      const valid = await route.valid();
      const path = await route.path();
      const cases = malformedBodies(valid, route.optional).filter(([what]) => !route.accepts?.includes(what));
      let checked = 0;
      const before = await tableState(env.database.db);
      for (const [what, body] of cases) {
        const r = await request(env.app)[route.method](path).set(headers).set('X-Forwarded-For', randomIp()).set('Content-Type', 'application/json').send(JSON.stringify(body));
        expect(r.status).withContext(what).toBeGreaterThanOrEqual(400);
        expect(r.status).withContext(what).toBeLessThan(500);
        expect(typeof r.body.error?.message).withContext(what).toBe('string');
        expect(typeof r.body.error?.code).withContext(what).toBe('string');
        checked++;
      }
      // Raw malformations: broken JSON, the wrong content type, an oversized body, bad UTF-8.
      const raw: [string, string, string | Buffer][] = [
        ['truncated JSON', 'application/json', JSON.stringify(valid).slice(0, -3)],
        ['not JSON at all', 'application/json', 'email=a&password=b'],
        ['a form content type', 'application/x-www-form-urlencoded', 'email=a%40b.c&password=whatever12'],
        ['text/plain', 'text/plain', JSON.stringify(valid)],
        ['invalid UTF-8', 'application/json', Buffer.from([0x7b, 0x22, 0x61, 0x22, 0x3a, 0x22, 0xff, 0xfe, 0x22, 0x7d])],
        ['an oversized body', 'application/json', JSON.stringify({ ...valid, pad: 'y'.repeat(env.config.bodyLimitBytes + 10) })],
      ];
      for (const [what, type, payload] of raw) {
        const r = await request(env.app)[route.method](path).set(headers).set('X-Forwarded-For', randomIp()).set('Content-Type', type).send(payload);
        expect(r.status).withContext(what).toBeGreaterThanOrEqual(400);
        expect(r.status).withContext(what).toBeLessThan(500);
        expect(typeof r.body.error?.message).withContext(what).toBe('string');
        checked++;
      }
      expect(await tableState(env.database.db)).withContext('tables after the malformed requests').toEqual(before);
      expect(checked).toBeGreaterThan(10);
      casesInAll += checked;

      const ok = await request(env.app)[route.method](path).set(headers).set('X-Forwarded-For', randomIp()).send(valid);
      expect(ok.status).withContext(`valid twin: ${JSON.stringify(ok.body).slice(0, 200)}`).toBeLessThan(300);
    });
  }

  it('sent at least 200 malformed requests in all, each beside its route’s valid twin (issue 7)', () => {
    // Runs after the per-route specs above (the API suite runs in order).
    expect(Object.keys(ROUTES).length).toBeGreaterThan(40);
    expect(casesInAll).toBeGreaterThanOrEqual(200);
  });

  it('a malformed request is a 400 before an anonymous caller gets a 401 (validation runs first)', async () => {
    const env = await apiEnv();
    const r = await request(env.app).post('/api/admin/users').send({ email: 'not-an-email' });
    expect(r.status).toBe(400);
    expect(r.body.error.details.field).toBeDefined();
    const anon = await request(env.app).post('/api/admin/users').send({ email: unique('x'), name: 'X', roles: ['student'], password: 'long-enough-pw' });
    expect(anon.status).toBe(401);
  });

  it('stores a name with quotes and SQL-looking words verbatim (it is text, never run)', async () => {
    const env = await apiEnv();
    const name = `Seán O'Hara; DROP TABLE users; --`;
    const r = await request(env.app).post('/api/admin/users').set(bearer(admin)).send({ email: unique('quote'), name, roles: ['student'], password: 'long-enough-pw' });
    expect(r.status).toBe(201);
    expect(r.body.name).toBe(name);
    const script = await request(env.app).post('/api/admin/users').set(bearer(admin)).send({ email: unique('quote'), name: '<b>Bold</b>', roles: ['student'], password: 'long-enough-pw' });
    expect(script.status).toBe(400);
    expect(script.body.error.details.field).toBe('name');
  });

  it('names the failing field in details.field', async () => {
    const env = await apiEnv();
    const r = await request(env.app).post('/api/admin/users').set(bearer(admin)).send({ email: unique('f'), name: 'F', roles: ['student', 'wizard'], password: 'long-enough-pw' });
    expect(r.status).toBe(400);
    expect(r.body.error.details.field).toBe('roles[1]');
    const bad = await request(env.app).patch('/api/admin/users/abc').set(bearer(admin)).send({ name: 'x' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.field).toBe('userId');
  });
});
