/**
 * The access matrix: every row of the route table × anonymous and each role. The expected answers
 * are written here by hand, apart from the code's own permission rules. A route without a row
 * fails the suite. Each refusal stands beside the permitted request that succeeds in the same run.
 */
import request from 'supertest';
import type { Role } from '../../schema/index';
import { apiEnv, bearer, makeUser, randomIp, userSession, type Session } from '../support/api-env';
import { freshCredentials, liveInvitationToken, liveRefreshToken, liveResetToken } from '../support/api-fixtures';

type Caller = 'anonymous' | Role;
const CALLERS: Caller[] = ['anonymous', 'admin', 'author', 'technician', 'instructor', 'student'];
type Expect = 'ok' | 401 | 403 | 404;

const ALL_OK: Record<Caller, Expect> = { anonymous: 'ok', admin: 'ok', author: 'ok', technician: 'ok', instructor: 'ok', student: 'ok' };
const SIGNED_IN: Record<Caller, Expect> = { ...ALL_OK, anonymous: 401 };
const ADMIN_ONLY: Record<Caller, Expect> = { anonymous: 401, admin: 'ok', author: 403, technician: 403, instructor: 403, student: 403 };

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
};

type Agent = ReturnType<typeof request>;
/** Sends a valid request for the route (fresh data each time) with the caller's headers. */
const REQUESTS: Record<string, (a: Agent, h: Record<string, string>) => Promise<request.Response>> = {
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
    it(`${route}: ${CALLERS.map((c) => `${c} ${expected[c]}`).join(', ')}`, async () => {
      const env = await apiEnv();
      expect(Object.values(expected)).withContext('every row has a permitted caller (the positive twin)').toContain('ok');
      for (const caller of CALLERS) {
        const s = sessions.get(caller);
        const r = await REQUESTS[route](request(env.app), s ? bearer(s) : {});
        const want = expected[caller];
        if (want === 'ok') expect(r.status).withContext(`${caller} → ${JSON.stringify(r.body).slice(0, 200)}`).toBeLessThan(300);
        else {
          expect(r.status).withContext(caller).toBe(want);
          expect(r.body.error?.code).withContext(caller).toBeDefined();
        }
      }
    });
  }

  afterAll(async () => {
    const env = await apiEnv();
    await request(env.app).put('/api/admin/settings').set(bearer(sessions.get('admin')!)).send({ openSignUp: false });
  });
});
