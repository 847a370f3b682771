/**
 * The access matrix: every row of the route table × anonymous and each role. The expected answers
 * are written here by hand, apart from the code's own permission rules. A route without a row
 * fails the suite. Each refusal stands beside the permitted request that succeeds in the same run.
 */
import sharp from 'sharp';
import request from 'supertest';
import { uploadFile } from '../../api/files/files.use-cases';
import { storageFromConfig } from '../../api/storage/index';
import { apiEnv, bearer, makeUser, randomIp, userSession, type Session } from '../support/api-env';
import { freshCredentials, liveInvitationToken, liveRefreshToken, liveResetToken } from '../support/api-fixtures';
import { makeTemplate, makeTubeType, sampleDocument, specTube, uniqueDesignation } from '../support/template-fixtures';
import { ADMIN_ONLY, ALL_OK, AUTHOR_ADMIN, CALLERS, flat, OWNER_WRITES, SEE_TEMPLATE, show, SIGNED_IN, type Caller, type Expect, type MatrixRequest, type Plain } from '../support/matrix-kit';
import { BENCH_MATRIX, BENCH_REQUESTS } from './rows/index';

/** Hand-written expectations, one row per route. */
const MATRIX: Record<string, Record<Caller, Expect>> = {
  'GET /api/health': ALL_OK,
  'POST /api/auth/sign-in': ALL_OK,
  'POST /api/auth/refresh': ALL_OK,
  'POST /api/auth/sign-out': ALL_OK,
  'POST /api/auth/sign-up': ALL_OK,
  'POST /api/auth/password-reset': ALL_OK,
  'POST /api/auth/password-reset/confirm': ALL_OK,
  'GET /api/auth/invitations/:token': ALL_OK,
  'POST /api/auth/invitations/accept': ALL_OK,
  'GET /api/me': SIGNED_IN,
  'GET /api/settings/public': ALL_OK,
  'GET /api/admin/users': ADMIN_ONLY,
  'POST /api/admin/users': ADMIN_ONLY,
  'PATCH /api/admin/users/:userId': ADMIN_ONLY,
  'GET /api/admin/invitations': ADMIN_ONLY,
  'POST /api/admin/invitations': ADMIN_ONLY,
  'GET /api/admin/settings': ADMIN_ONLY,
  'PUT /api/admin/settings': ADMIN_ONLY,
  'POST /api/calc/parse': ALL_OK,
  'POST /api/calc/color-code': ALL_OK,
  'GET /api/calc/preferred': ALL_OK,
  'POST /api/calc/verdict': ALL_OK,
  'POST /api/calc/network': ALL_OK,
  'POST /api/calc/dissipation': ALL_OK,
  'GET /api/tube-types': SIGNED_IN,
  'GET /api/tube-types/:designation': SIGNED_IN,
  'POST /api/tube-types': AUTHOR_ADMIN,
  'PUT /api/tube-types/:designation': { ...AUTHOR_ADMIN, admin: { own: 'ok', others: 'ok' }, author: { own: 'ok', others: 403 } },
  'GET /api/schemas/template.json': ALL_OK,
  'GET /api/templates': SIGNED_IN,
  'POST /api/templates': AUTHOR_ADMIN,
  'POST /api/templates/import': AUTHOR_ADMIN,
  'GET /api/templates/:id': SEE_TEMPLATE,
  'GET /api/templates/:id/draft': SEE_TEMPLATE,
  'PUT /api/templates/:id/draft': OWNER_WRITES,
  'GET /api/templates/:id/versions/:version': SEE_TEMPLATE,
  'GET /api/templates/:id/versions/:version/network': SEE_TEMPLATE,
  'PUT /api/templates/:id/versions/:version': OWNER_WRITES,
  'POST /api/templates/:id/publish': OWNER_WRITES,
  'POST /api/templates/:id/versions/:number/retire': OWNER_WRITES,
  'GET /api/templates/:id/diff': SEE_TEMPLATE,
  'GET /api/templates/:id/export': SEE_TEMPLATE,
  'POST /api/templates/:id/copy': SEE_TEMPLATE,
  'PUT /api/templates/:id/sharing': OWNER_WRITES,
  'POST /api/templates/:id/corrections': SEE_TEMPLATE,
  'GET /api/templates/:id/corrections': SEE_TEMPLATE,
  'POST /api/templates/:id/corrections/:correctionId/decision': OWNER_WRITES,
  'POST /api/templates/:id/files': OWNER_WRITES,
  'GET /api/templates/:id/files': SEE_TEMPLATE,
  'GET /api/templates/:id/files/:fileId': SEE_TEMPLATE,
  'GET /api/templates/:id/files/:fileId/thumbnail': SEE_TEMPLATE,
  'PATCH /api/templates/:id/files/:fileId': OWNER_WRITES,
  'DELETE /api/templates/:id/files/:fileId': OWNER_WRITES,
  ...BENCH_MATRIX,
};

const smallPng = () => sharp({ create: { width: 8, height: 8, channels: 3, background: { r: 1, g: 2, b: 3 } } }).png().toBuffer();
/** A template of `ownerId`'s with one image file, stored where the app under test keeps its files. */
async function templateWithFile(ownerId?: number): Promise<{ id: number; fileId: number }> {
  const env = await apiEnv();
  const t = await makeTemplate({ ownerId });
  const f = await uploadFile({ db: env.database.db, storage: storageFromConfig(env.config), config: env.config }, { id: t.ownerId, roles: ['author'] }, t.id, { bytes: await smallPng(), originalName: 'matrix.png' });
  return { id: t.id, fileId: f.id };
}

/**
 * Sends a valid request for the route (fresh data each time) with the caller's headers. `ownerId`
 * (object-level rows) is whose object to build: the caller's for `own`, another user's for
 * `others`; absent, the object belongs to a fresh author.
 */
const REQUESTS: Record<string, MatrixRequest> = {
  'GET /api/health': async (a, h) => a.get('/api/health').set(h),
  'POST /api/auth/sign-in': async (a, h) => a.post('/api/auth/sign-in').set(h).set('X-Forwarded-For', randomIp()).send(await freshCredentials()),
  'POST /api/auth/refresh': async (a, h) => a.post('/api/auth/refresh').set(h).send({ refreshToken: await liveRefreshToken() }),
  'POST /api/auth/sign-out': async (a, h) => a.post('/api/auth/sign-out').set(h).send({ refreshToken: await liveRefreshToken() }),
  'POST /api/auth/sign-up': async (a, h) => a.post('/api/auth/sign-up').set(h).send({ email: `signup-${Math.random().toString(36).slice(2)}@spec.example`, name: 'New Hobbyist', password: 'long-enough-pw' }),
  'POST /api/auth/password-reset': async (a, h) => a.post('/api/auth/password-reset').set(h).send({ email: 'someone@spec.example' }),
  'POST /api/auth/password-reset/confirm': async (a, h) => a.post('/api/auth/password-reset/confirm').set(h).send({ token: await liveResetToken(), password: 'new-password-here' }),
  'GET /api/auth/invitations/:token': async (a, h) => a.get(`/api/auth/invitations/${await liveInvitationToken()}`).set(h),
  'POST /api/auth/invitations/accept': async (a, h) => a.post('/api/auth/invitations/accept').set(h).send({ token: await liveInvitationToken(), name: 'Invited Person', password: 'new-password-here' }),
  'GET /api/me': async (a, h) => a.get('/api/me').set(h),
  'GET /api/settings/public': async (a, h) => a.get('/api/settings/public').set(h),
  'GET /api/admin/users': async (a, h) => a.get('/api/admin/users').set(h),
  'POST /api/admin/users': async (a, h) => a.post('/api/admin/users').set(h).send({ email: `made-${Math.random().toString(36).slice(2)}@spec.example`, name: 'Made User', roles: ['technician'], password: 'long-enough-pw' }),
  'PATCH /api/admin/users/:userId': async (a, h) => a.patch(`/api/admin/users/${(await makeUser(['student'])).id}`).set(h).send({ name: 'Renamed Student' }),
  'GET /api/admin/invitations': async (a, h) => a.get('/api/admin/invitations').set(h),
  'POST /api/admin/invitations': async (a, h) => a.post('/api/admin/invitations').set(h).send({ email: `inv-${Math.random().toString(36).slice(2)}@spec.example`, roles: ['student'] }),
  'GET /api/admin/settings': async (a, h) => a.get('/api/admin/settings').set(h),
  'PUT /api/admin/settings': async (a, h) => a.put('/api/admin/settings').set(h).send({ openSignUp: true }),
  'POST /api/calc/parse': async (a, h) => a.post('/api/calc/parse').set(h).send({ text: '4k7' }),
  'POST /api/calc/color-code': async (a, h) => a.post('/api/calc/color-code').set(h).send({ bands: ['brown', 'black', 'yellow', 'silver'] }),
  'GET /api/calc/preferred': async (a, h) => a.get('/api/calc/preferred?ohms=47000&series=E12').set(h),
  'POST /api/calc/verdict': async (a, h) => a.post('/api/calc/verdict').set(h).send({ expected: 4700, reading: '4k9', tolerancePct: 10 }),
  'POST /api/calc/network': async (a, h) => a.post('/api/calc/network').set(h).send({ edges: [{ id: 'R1', a: 'A', b: 'B', ohms: 1000 }], from: 'A', to: 'B' }),
  'POST /api/calc/dissipation': async (a, h) => a.post('/api/calc/dissipation').set(h).send({ ohms: 1000, volts: 10 }),
  'GET /api/tube-types': async (a, h) => a.get('/api/tube-types?q=SPEC').set(h),
  'GET /api/tube-types/:designation': async (a, h) => a.get(`/api/tube-types/${await specTube()}`).set(h),
  'POST /api/tube-types': async (a, h) =>
    a.post('/api/tube-types').set(h).send({ designation: uniqueDesignation(), base: 'noval', heating: 'indirect', heaterVolts: 6.3, heaterAmps: 0.3, pins: [{ pin: 4, electrode: 'h', label: 'heater' }, { pin: 5, electrode: 'h', label: 'heater' }] }),
  'PUT /api/tube-types/:designation': async (a, h, ownerId) =>
    a.put(`/api/tube-types/${await makeTubeType(ownerId)}`).set(h).send({ base: 'noval', heating: 'indirect', heaterVolts: 6.3, heaterAmps: 0.3, pins: [{ pin: 4, electrode: 'h', label: 'heater' }, { pin: 5, electrode: 'h', label: 'heater' }] }),
  'GET /api/schemas/template.json': async (a, h) => a.get('/api/schemas/template.json').set(h),
  'GET /api/templates': async (a, h) => a.get('/api/templates?sort=updated&pageSize=5').set(h),
  'POST /api/templates': async (a, h) => a.post('/api/templates').set(h).send({ chassis: { maker: 'Matrix Radio Co.', model: 'Probe', kind: 'portable', power: 'battery' } }),
  'POST /api/templates/import': async (a, h) => a.post('/api/templates/import').set(h).send({ document: sampleDocument(await specTube()) }),
  'GET /api/templates/:id': async (a, h, ownerId) => a.get(`/api/templates/${(await makeTemplate({ ownerId })).id}`).set(h),
  'GET /api/templates/:id/draft': async (a, h, ownerId) => a.get(`/api/templates/${(await makeTemplate({ ownerId })).id}/draft`).set(h),
  'PUT /api/templates/:id/draft': async (a, h, ownerId) => {
    const t = await makeTemplate({ ownerId });
    return a.put(`/api/templates/${t.id}/draft`).set(h).send({ revision: 1, content: t.doc });
  },
  'GET /api/templates/:id/versions/:version': async (a, h, ownerId) => a.get(`/api/templates/${(await makeTemplate({ ownerId, published: 1 })).id}/versions/1`).set(h),
  'GET /api/templates/:id/versions/:version/network': async (a, h, ownerId) => a.get(`/api/templates/${(await makeTemplate({ ownerId, published: 1 })).id}/versions/1/network`).set(h),
  'PUT /api/templates/:id/versions/:version': async (a, h, ownerId) => {
    const t = await makeTemplate({ ownerId });
    return a.put(`/api/templates/${t.id}/versions/draft`).set(h).send({ revision: 1, content: t.doc });
  },
  'POST /api/templates/:id/publish': async (a, h, ownerId) => a.post(`/api/templates/${(await makeTemplate({ ownerId })).id}/publish`).set(h).send({ changelog: 'First issue' }),
  'POST /api/templates/:id/versions/:number/retire': async (a, h, ownerId) =>
    a.post(`/api/templates/${(await makeTemplate({ ownerId, published: 1 })).id}/versions/1/retire`).set(h).send({ reason: 'Superseded' }),
  'GET /api/templates/:id/diff': async (a, h, ownerId) => a.get(`/api/templates/${(await makeTemplate({ ownerId, published: 2 })).id}/diff?from=1&to=2`).set(h),
  'GET /api/templates/:id/export': async (a, h, ownerId) => a.get(`/api/templates/${(await makeTemplate({ ownerId, published: 1 })).id}/export?version=1`).set(h),
  'POST /api/templates/:id/copy': async (a, h, ownerId) => a.post(`/api/templates/${(await makeTemplate({ ownerId, published: 1 })).id}/copy`).set(h).send({ version: 1 }),
  'PUT /api/templates/:id/sharing': async (a, h, ownerId) => a.put(`/api/templates/${(await makeTemplate({ ownerId })).id}/sharing`).set(h).send({ visibility: 'public', userIds: [] }),
  'POST /api/templates/:id/corrections': async (a, h, ownerId) =>
    a
      .post(`/api/templates/${(await makeTemplate({ ownerId, published: 1 })).id}/corrections`)
      .set(h)
      .send({ versionNumber: 1, target: { kind: 'component', key: 'c-r1' }, change: { tolerancePct: 10 }, note: 'Silver band.' }),
  'GET /api/templates/:id/corrections': async (a, h, ownerId) => a.get(`/api/templates/${(await makeTemplate({ ownerId, published: 1 })).id}/corrections`).set(h),
  'POST /api/templates/:id/corrections/:correctionId/decision': async (a, h, ownerId) => {
    const owner = ownerId ?? (await makeUser(['author'])).id;
    const t = await makeTemplate({ ownerId: owner, published: 1, correctionBy: owner });
    return a.post(`/api/templates/${t.id}/corrections/${t.correctionId}/decision`).set(h).send({ decision: 'accept', note: 'Agreed.' });
  },
  'POST /api/templates/:id/files': async (a, h, ownerId) => a.post(`/api/templates/${(await makeTemplate({ ownerId })).id}/files`).set(h).attach('file', await smallPng(), 'matrix.png'),
  'GET /api/templates/:id/files': async (a, h, ownerId) => a.get(`/api/templates/${(await templateWithFile(ownerId)).id}/files`).set(h),
  'GET /api/templates/:id/files/:fileId': async (a, h, ownerId) => {
    const t = await templateWithFile(ownerId);
    return a.get(`/api/templates/${t.id}/files/${t.fileId}`).set(h);
  },
  'GET /api/templates/:id/files/:fileId/thumbnail': async (a, h, ownerId) => {
    const t = await templateWithFile(ownerId);
    return a.get(`/api/templates/${t.id}/files/${t.fileId}/thumbnail`).set(h);
  },
  'PATCH /api/templates/:id/files/:fileId': async (a, h, ownerId) => {
    const t = await templateWithFile(ownerId);
    return a.patch(`/api/templates/${t.id}/files/${t.fileId}`).set(h).send({ stageKey: 'st-audio' });
  },
  'DELETE /api/templates/:id/files/:fileId': async (a, h, ownerId) => {
    const t = await templateWithFile(ownerId);
    return a.delete(`/api/templates/${t.id}/files/${t.fileId}`).set(h);
  },
  ...BENCH_REQUESTS,
};

describe('Access matrix', () => {
  const sessions = new Map<Caller, Session>();

  beforeAll(async () => {
    for (const c of CALLERS) if (c !== 'anonymous') sessions.set(c, await userSession([c]));
    const env = await apiEnv();
    await request(env.app).put('/api/admin/settings').set(bearer(sessions.get('admin')!)).send({ openSignUp: true });
  });

  it('has a hand-written row for every route of the route table, and no row for a route that does not exist', async () => {
    const env = await apiEnv();
    const keys = env.app.routeTable.map((r) => `${r.method.toUpperCase()} ${r.path}`);
    const missing = keys.filter((k) => !(k in MATRIX) || !(k in REQUESTS));
    expect(missing).withContext('routes without a matrix row').toEqual([]);
    expect(Object.keys(MATRIX).filter((k) => !keys.includes(k))).withContext('rows without a route').toEqual([]);
  });

  for (const [route, expected] of Object.entries(MATRIX)) {
    it(`${route}: ${CALLERS.map((c) => `${c} ${show(expected[c])}`).join(', ')}`, async () => {
      const env = await apiEnv();
      expect(Object.values(expected).flatMap(flat)).withContext('every row has a permitted caller (the positive twin)').toContain('ok');
      for (const caller of CALLERS) {
        const s = sessions.get(caller);
        const e = expected[caller];
        const runs: [string, Plain, number | undefined][] =
          typeof e === 'object' ? [['own', e.own, s!.user.id], ['others', e.others, (await makeUser(['author'])).id]] : [['', e, undefined]];
        for (const [whose, want, ownerId] of runs) {
          const label = whose ? `${caller} (${whose})` : caller;
          const r = await REQUESTS[route](request(env.app), s ? bearer(s) : {}, ownerId);
          if (want === 'ok') expect(r.status).withContext(`${label} → ${JSON.stringify(r.body).slice(0, 200)}`).toBeLessThan(300);
          else {
            expect(r.status).withContext(label).toBe(want);
            expect(r.body.error?.code).withContext(label).toBeDefined();
          }
        }
      }
    });
  }

  afterAll(async () => {
    const env = await apiEnv();
    await request(env.app).put('/api/admin/settings').set(bearer(sessions.get('admin')!)).send({ openSignUp: false });
  });
});
