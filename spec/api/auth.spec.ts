import { eq } from 'drizzle-orm';
import jwt from 'jsonwebtoken';
import request from 'supertest';
import { refreshTokens, signInThrottle, users } from '../../schema/index';
import { apiEnv, bearer, makeUser, randomIp, signIn, SPEC_PASSWORD, uniqueEmail } from '../support/api-env';

describe('Sign-in, tokens and sign-out', () => {
  it('POST /api/auth/sign-in with the right password answers the tokens and the user', async () => {
    const env = await apiEnv();
    const u = await makeUser(['technician', 'author'], { name: 'Lena Quist' });
    const r = await request(env.app).post('/api/auth/sign-in').set('X-Forwarded-For', randomIp()).send({ email: u.email.toUpperCase(), password: SPEC_PASSWORD });
    expect(r.status).toBe(200);
    expect(r.body.user).toEqual({ id: u.id, email: u.email, name: 'Lena Quist', roles: ['technician', 'author'] });
    expect(typeof r.body.accessToken).toBe('string');
    expect(r.body.refreshToken).toMatch(/^[A-Za-z0-9_-]{40,}$/);
    const me = await request(env.app).get('/api/me').set(bearer(r.body));
    expect(me.status).toBe(200);
    expect(me.body.email).toBe(u.email);
  });

  it('a wrong password and an unknown e-mail get the same 401 message, and nothing reveals which', async () => {
    const env = await apiEnv();
    const u = await makeUser(['technician']);
    const wrong = await request(env.app).post('/api/auth/sign-in').set('X-Forwarded-For', randomIp()).send({ email: u.email, password: 'not-the-password' });
    const unknown = await request(env.app).post('/api/auth/sign-in').set('X-Forwarded-For', randomIp()).send({ email: uniqueEmail('ghost'), password: 'not-the-password' });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.body.error.message).toBe(unknown.body.error.message);
    expect(wrong.body.error.code).toBe(unknown.body.error.code);
  });

  it('GET /api/me refuses a missing, forged, expired or garbled token with 401', async () => {
    const env = await apiEnv();
    const s = await signIn((await makeUser(['technician'])).email);
    const forged = jwt.sign({ roles: ['admin'], tv: 0 }, 'not-the-secret-not-the-secret-123', { subject: String(s.user.id), issuer: 'driftmark', audience: 'driftmark-api' });
    const expired = jwt.sign({ roles: s.user.roles, tv: 0, exp: Math.floor(Date.now() / 1000) - 60 }, env.config.jwtSecret, {
      subject: String(s.user.id),
      issuer: 'driftmark',
      audience: 'driftmark-api',
    });
    for (const header of [undefined, `Bearer ${forged}`, `Bearer ${expired}`, 'Bearer abc.def.ghi', s.accessToken]) {
      const r = header ? await request(env.app).get('/api/me').set('Authorization', header) : await request(env.app).get('/api/me');
      expect(r.status).withContext(String(header)).toBe(401);
      expect(r.body.error.code).toBeDefined();
    }
    // The positive twin: the same token in the Bearer scheme is accepted.
    expect((await request(env.app).get('/api/me').set(bearer(s))).status).toBe(200);
  });

  it('refresh rotates the token; the old one used again after the grace window revokes the family', async () => {
    const env = await apiEnv();
    const app = env.appWith({ REFRESH_GRACE_SECONDS: '0' });
    const s = await signIn((await makeUser(['technician'])).email);
    const r1 = await request(app).post('/api/auth/refresh').send({ refreshToken: s.refreshToken });
    expect(r1.status).toBe(200);
    expect(r1.body.refreshToken).not.toBe(s.refreshToken);
    expect((await request(app).get('/api/me').set(bearer(r1.body))).status).toBe(200);
    await new Promise((r) => setTimeout(r, 1100));
    const reuse = await request(app).post('/api/auth/refresh').send({ refreshToken: s.refreshToken });
    expect(reuse.status).toBe(401);
    expect(reuse.body.error.code).toBe('token-reused');
    // The whole family is revoked: the successor no longer refreshes either.
    const successor = await request(app).post('/api/auth/refresh').send({ refreshToken: r1.body.refreshToken });
    expect(successor.status).toBe(401);
    const rows = await env.database.db.select().from(refreshTokens).where(eq(refreshTokens.userId, s.user.id));
    expect(rows.length).toBe(2);
    expect(rows.every((t) => t.revokedAt !== null)).toBeTrue();
  });

  it('two tabs refreshing with the same token within the grace window both get the same successor', async () => {
    const env = await apiEnv();
    const s = await signIn((await makeUser(['technician'])).email);
    const [a, b] = await Promise.all([
      request(env.app).post('/api/auth/refresh').send({ refreshToken: s.refreshToken }),
      request(env.app).post('/api/auth/refresh').send({ refreshToken: s.refreshToken }),
    ]);
    expect(a.status).toBe(200);
    expect(b.status).toBe(200);
    expect(a.body.refreshToken).toBe(b.body.refreshToken);
    const next = await request(env.app).post('/api/auth/refresh').send({ refreshToken: a.body.refreshToken });
    expect(next.status).toBe(200);
  });

  it('sign-out revokes the session: its refresh token is refused afterwards', async () => {
    const env = await apiEnv();
    const s = await signIn((await makeUser(['technician'])).email);
    const out = await request(env.app).post('/api/auth/sign-out').send({ refreshToken: s.refreshToken });
    expect(out.status).toBe(204);
    const r = await request(env.app).post('/api/auth/refresh').send({ refreshToken: s.refreshToken });
    expect(r.status).toBe(401);
  });

  it('a deactivated user is refused at the next request, and cannot refresh or sign in', async () => {
    const env = await apiEnv();
    const admin = await signIn((await makeUser(['admin'])).email);
    const u = await makeUser(['technician']);
    const s = await signIn(u.email);
    expect((await request(env.app).get('/api/me').set(bearer(s))).status).toBe(200);
    const patch = await request(env.app).patch(`/api/admin/users/${u.id}`).set(bearer(admin)).send({ active: false });
    expect(patch.status).toBe(200);
    expect(patch.body.active).toBeFalse();
    expect((await request(env.app).get('/api/me').set(bearer(s))).status).toBe(401);
    const refreshed = await request(env.app).post('/api/auth/refresh').send({ refreshToken: s.refreshToken });
    expect(refreshed.status).toBe(401);
    expect(refreshed.body.error.code).toBe('account-deactivated');
    const again = await request(env.app).post('/api/auth/sign-in').set('X-Forwarded-For', randomIp()).send({ email: u.email, password: SPEC_PASSWORD });
    expect(again.status).toBe(401);
    expect(again.body.error.code).toBe('account-deactivated');
    // Reactivated: signs in again.
    await request(env.app).patch(`/api/admin/users/${u.id}`).set(bearer(admin)).send({ active: true });
    expect((await signIn(u.email)).user.id).toBe(u.id);
  });

  it('repeated failures on one account are answered 429 with Retry-After; another account is not affected', async () => {
    const env = await apiEnv();
    const u = await makeUser(['technician']);
    const other = await makeUser(['technician']);
    const limit = env.config.throttle.accountLimit;
    for (let i = 0; i < limit; i++) {
      const r = await request(env.app).post('/api/auth/sign-in').set('X-Forwarded-For', randomIp()).send({ email: u.email, password: 'wrong-password' });
      expect(r.status).toBe(401);
    }
    const blocked = await request(env.app).post('/api/auth/sign-in').set('X-Forwarded-For', randomIp()).send({ email: u.email, password: SPEC_PASSWORD });
    expect(blocked.status).toBe(429);
    expect(Number(blocked.headers['retry-after'])).toBeGreaterThan(0);
    const [row] = await env.database.db.select().from(signInThrottle).where(eq(signInThrottle.key, `account:${u.email}`));
    expect(row.failures).toBe(limit);
    // Positive twin: another account signs in fine.
    expect((await signIn(other.email)).user.id).toBe(other.id);
  });

  it('failures from one client address across accounts are answered 429; another address is not affected', async () => {
    const env = await apiEnv();
    const ip = randomIp();
    const limit = env.config.throttle.ipLimit;
    for (let i = 0; i < limit; i++) {
      await request(env.app).post('/api/auth/sign-in').set('X-Forwarded-For', ip).send({ email: uniqueEmail('probe'), password: 'wrong-password' });
    }
    const u = await makeUser(['technician']);
    const blocked = await request(env.app).post('/api/auth/sign-in').set('X-Forwarded-For', ip).send({ email: u.email, password: SPEC_PASSWORD });
    expect(blocked.status).toBe(429);
    const ok = await request(env.app).post('/api/auth/sign-in').set('X-Forwarded-For', randomIp()).send({ email: u.email, password: SPEC_PASSWORD });
    expect(ok.status).toBe(200);
  });

  it('the failure count is shared through PostgreSQL by two API processes on one database', async () => {
    const env = await apiEnv();
    const second = env.appWith({});
    const u = await makeUser(['technician']);
    const limit = env.config.throttle.accountLimit;
    for (let i = 0; i < limit; i++) {
      const app = i % 2 === 0 ? env.app : second;
      await request(app).post('/api/auth/sign-in').set('X-Forwarded-For', randomIp()).send({ email: u.email, password: 'wrong-password' });
    }
    const blocked = await request(second).post('/api/auth/sign-in').set('X-Forwarded-For', randomIp()).send({ email: u.email, password: SPEC_PASSWORD });
    expect(blocked.status).toBe(429);
  });

  it('a successful sign-in clears the account\'s failures', async () => {
    const env = await apiEnv();
    const u = await makeUser(['technician']);
    await request(env.app).post('/api/auth/sign-in').set('X-Forwarded-For', randomIp()).send({ email: u.email, password: 'wrong-password' });
    await signIn(u.email);
    const rows = await env.database.db.select().from(signInThrottle).where(eq(signInThrottle.key, `account:${u.email}`));
    expect(rows.length).toBe(0);
  });
});

describe('Self sign-up', () => {
  it('is refused with 403 while the instance setting is off, and creates a technician once it is on', async () => {
    const env = await apiEnv();
    const admin = await signIn((await makeUser(['admin'])).email);
    await request(env.app).put('/api/admin/settings').set(bearer(admin)).send({ openSignUp: false });
    const email = uniqueEmail('hobbyist');
    const closed = await request(env.app).post('/api/auth/sign-up').send({ email, name: 'Mira Hobb', password: 'long-enough-pw' });
    expect(closed.status).toBe(403);
    expect((await env.database.db.select().from(users).where(eq(users.email, email))).length).toBe(0);
    expect((await request(env.app).get('/api/settings/public')).body).toEqual({ openSignUp: false });

    await request(env.app).put('/api/admin/settings').set(bearer(admin)).send({ openSignUp: true });
    expect((await request(env.app).get('/api/settings/public')).body).toEqual({ openSignUp: true });
    const open = await request(env.app).post('/api/auth/sign-up').send({ email, name: 'Mira Hobb', password: 'long-enough-pw' });
    expect(open.status).toBe(201);
    expect(open.body.user.roles).toEqual(['technician']);
    const dup = await request(env.app).post('/api/auth/sign-up').send({ email, name: 'Mira Again', password: 'long-enough-pw' });
    expect(dup.status).toBe(409);
    await request(env.app).put('/api/admin/settings').set(bearer(admin)).send({ openSignUp: false });
  });
});
