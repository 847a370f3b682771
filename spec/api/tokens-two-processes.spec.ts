/**
 * Tokens across two API processes on one PostgreSQL (issue #7, access control): two apps built by
 * `apiEnv().appWith(...)` on the same database with the same JWT secret stand for two processes
 * behind a load balancer. Each app has its own state (route table, guards, grid caches); only
 * PostgreSQL and the secret are shared — as in production. Sign in on one, use and refresh on the
 * other; reuse, sign-out and deactivation seen from the other; failed sign-ins counted from both;
 * an expired token refused by both. Every refusal stands beside its twin that succeeds.
 */
import { eq, sql } from 'drizzle-orm';
import jwt from 'jsonwebtoken';
import request from 'supertest';
import { hashToken } from '../../api/auth/tokens';
import { refreshTokens, signInThrottle, users } from '../../schema/index';
import { apiEnv, bearer, makeUser, randomIp, SPEC_PASSWORD, uniqueEmail, type Session } from '../support/api-env';
import { clientKey, makeSurvey } from '../support/bench-fixtures';

type App = Parameters<typeof request>[0];

async function signInOn(app: App, email: string, ip = randomIp()): Promise<Session> {
  const r = await request(app).post('/api/auth/sign-in').set('X-Forwarded-For', ip).send({ email, password: SPEC_PASSWORD });
  if (r.status !== 200) throw new Error(`sign-in of ${email} answered ${r.status}: ${JSON.stringify(r.body)}`);
  return r.body as Session;
}

const refreshOn = (app: App, refreshToken: string) => request(app).post('/api/auth/refresh').send({ refreshToken });
const meOn = (app: App, s: { accessToken: string }) => request(app).get('/api/me').set(bearer(s));

async function familyRows(userId: number) {
  const env = await apiEnv();
  return env.database.db.select().from(refreshTokens).where(eq(refreshTokens.userId, userId));
}

/** An access token signed with the shared secret by hand, with the claims the API issues and a chosen `exp`. */
function handSigned(secret: string, user: { id: number; roles: string[] }, tokenVersion: number, exp: number): string {
  return jwt.sign({ roles: user.roles, tv: tokenVersion, exp }, secret, { subject: String(user.id), issuer: 'driftmark', audience: 'driftmark-api' });
}

describe('Tokens across two API processes on one PostgreSQL', () => {
  let A: App;
  let B: App;

  beforeAll(async () => {
    const env = await apiEnv();
    A = env.app;
    B = env.appWith({});
  });

  it('an access token issued by process A is accepted by process B; a process with another secret refuses it', async () => {
    const env = await apiEnv();
    const u = await makeUser(['technician']);
    const s = await signInOn(A, u.email);
    const onB = await meOn(B, s);
    expect(onB.status).toBe(200);
    expect(onB.body.id).toBe(u.id);
    expect((await meOn(A, s)).status).toBe(200);
    // A process configured with another JWT secret (a misconfigured replica) is not part of the
    // cluster: it refuses the token — the shared secret is what lets B accept it.
    const stranger = env.appWith({ JWT_SECRET: 'another-secret-another-secret-another-secret-0123' });
    const refused = await meOn(stranger, s);
    expect(refused.status).toBe(401);
    expect(refused.body.error.code).toBe('unauthorized');
  });

  it("refresh on B with A's refresh token rotates it; the new access and refresh tokens work on A", async () => {
    const u = await makeUser(['technician']);
    const s = await signInOn(A, u.email);
    const r = await refreshOn(B, s.refreshToken);
    expect(r.status).toBe(200);
    expect(r.body.user.id).toBe(u.id);
    expect(r.body.refreshToken).not.toBe(s.refreshToken);
    expect((await meOn(A, r.body)).status).toBe(200);
    // The successor made on B refreshes on A in turn.
    const again = await refreshOn(A, r.body.refreshToken);
    expect(again.status).toBe(200);
    expect((await meOn(B, again.body)).status).toBe(200);
    // One family of three tokens: the first two used, none revoked.
    const rows = await familyRows(u.id);
    expect(rows.length).toBe(3);
    expect(new Set(rows.map((t) => t.familyId)).size).toBe(1);
    expect(rows.filter((t) => t.usedAt !== null).length).toBe(2);
    expect(rows.every((t) => t.revokedAt === null)).toBeTrue();
  });

  it('within the grace window, the token already rotated on A presented again on B gets the same successor (two tabs, two processes)', async () => {
    const u = await makeUser(['technician']);
    const s = await signInOn(A, u.email);
    const first = await refreshOn(A, s.refreshToken);
    expect(first.status).toBe(200);
    const twin = await refreshOn(B, s.refreshToken);
    expect(twin.status).toBe(200);
    // B derives the same successor (HMAC with the shared secret), so the family stays whole.
    expect(twin.body.refreshToken).toBe(first.body.refreshToken);
    const next = await refreshOn(B, first.body.refreshToken);
    expect(next.status).toBe(200);
    expect((await familyRows(u.id)).every((t) => t.revokedAt === null)).toBeTrue();
  });

  it('after the grace window, reuse on B of a token rotated on A revokes the family: the newest token stops working on A too', async () => {
    const env = await apiEnv();
    const A0 = env.appWith({ REFRESH_GRACE_SECONDS: '0' });
    const B0 = env.appWith({ REFRESH_GRACE_SECONDS: '0' });
    const u = await makeUser(['technician']);
    const s = await signInOn(A0, u.email);
    const rotated = await refreshOn(A0, s.refreshToken);
    expect(rotated.status).toBe(200);
    // Past the (zero-second) grace window.
    await new Promise((r) => setTimeout(r, 1100));
    const reuse = await refreshOn(B0, s.refreshToken);
    expect(reuse.status).toBe(401);
    expect(reuse.body.error.code).toBe('token-reused');
    // The newest token of the family, never used, is refused on the process that issued it.
    const newest = await refreshOn(A0, rotated.body.refreshToken);
    expect(newest.status).toBe(401);
    expect(newest.body.error.code).toBe('session-ended');
    const rows = await familyRows(u.id);
    expect(rows.length).toBe(2);
    expect(rows.every((t) => t.revokedAt !== null)).toBeTrue();
    // Another session of the same user (its own family) is untouched and refreshes on both.
    const other = await signInOn(B0, u.email);
    const otherNext = await refreshOn(A0, other.refreshToken);
    expect(otherNext.status).toBe(200);
    expect((await refreshOn(B0, otherNext.body.refreshToken)).status).toBe(200);
  });

  it('sign-out on A ends the session: its refresh token (rotated on B) is refused on B; another session of the user still refreshes on B', async () => {
    const u = await makeUser(['technician']);
    const s = await signInOn(A, u.email);
    const kept = await signInOn(A, u.email);
    const rotated = await refreshOn(B, s.refreshToken);
    expect(rotated.status).toBe(200);
    const out = await request(A).post('/api/auth/sign-out').send({ refreshToken: rotated.body.refreshToken });
    expect(out.status).toBe(204);
    const after = await refreshOn(B, rotated.body.refreshToken);
    expect(after.status).toBe(401);
    expect(after.body.error.code).toBe('session-ended');
    // Within the grace window the original token is refused too (its successor is revoked).
    const original = await refreshOn(B, s.refreshToken);
    expect(original.status).toBe(401);
    // The twin: the user's other session is not signed out.
    const other = await refreshOn(B, kept.refreshToken);
    expect(other.status).toBe(200);
    expect(other.body.user.id).toBe(u.id);
    // In the database: the signed-out family (two tokens) all revoked; the other family untouched.
    const rows = await familyRows(u.id);
    const familyOf = (token: string) => rows.find((t) => t.tokenHash === hashToken(token))!.familyId;
    const signedOut = rows.filter((t) => t.familyId === familyOf(s.refreshToken));
    const untouched = rows.filter((t) => t.familyId === familyOf(kept.refreshToken));
    expect(signedOut.length).toBe(2);
    expect(signedOut.every((t) => t.revokedAt !== null)).toBeTrue();
    expect(untouched.length).toBe(2);
    expect(untouched.every((t) => t.revokedAt === null)).toBeTrue();
  });

  it('deactivation by an admin on A refuses the user on B at the next request — the guarded route and the folded reading save — while another user goes on', async () => {
    const env = await apiEnv();
    const admin = await signInOn(A, (await makeUser(['admin'])).email);
    const u = await makeUser(['technician']);
    const bystander = await makeUser(['technician']);
    const s = await signInOn(A, u.email);
    const bs = await signInOn(A, bystander.email);
    const survey = await makeSurvey({ ownerId: u.id });
    const bySurvey = await makeSurvey({ ownerId: bystander.id });
    const save = (app: App, who: Session, surveyId: number, text: string) =>
      request(app).post(`/api/surveys/${surveyId}/readings`).set(bearer(who)).send({ testPointKey: 'tp-r2', clientKey: clientKey(), text });
    const readingsOf = async (surveyId: number) =>
      (await env.database.db.execute<{ n: number }>(sql`SELECT count(*)::int AS n FROM readings WHERE survey_id = ${surveyId}`)).rows[0].n;

    // Before: the user works on B (this also warms B's grid for the survey: the next save is the one-statement path).
    expect((await meOn(B, s)).status).toBe(200);
    const before = await save(B, s, survey.id, '250k');
    expect(before.status).withContext(JSON.stringify(before.body)).toBe(201);
    expect(await readingsOf(survey.id)).toBe(1);

    const patch = await request(A).patch(`/api/admin/users/${u.id}`).set(bearer(admin)).send({ active: false });
    expect(patch.status).toBe(200);
    expect(patch.body.active).toBeFalse();

    // The next request on B, with the same unexpired access token, is refused.
    const me = await meOn(B, s);
    expect(me.status).toBe(401);
    expect(me.body.error.code).toBe('account-deactivated');
    const folded = await save(B, s, survey.id, '251k');
    expect(folded.status).toBe(401);
    // The folded save says why, as the guarded routes do (deactivation also bumps the token version).
    expect(folded.body.error.code).toBe('account-deactivated');
    expect(await readingsOf(survey.id)).toBe(1);
    // Nor can the session be refreshed on B.
    const refreshed = await refreshOn(B, s.refreshToken);
    expect(refreshed.status).toBe(401);
    expect(refreshed.body.error.code).toBe('account-deactivated');

    // The twin: another user's token on B still reads and saves.
    expect((await meOn(B, bs)).status).toBe(200);
    expect((await save(B, bs, bySurvey.id, '250k')).status).toBe(201);
    expect(await readingsOf(bySurvey.id)).toBe(1);

    // Reactivated (on B): the old token stays ended (its token version was bumped), a new sign-in on A works on B.
    const [row] = await env.database.db.select({ active: users.active, tokenVersion: users.tokenVersion }).from(users).where(eq(users.id, u.id));
    expect(row.active).toBeFalse();
    expect((await request(B).patch(`/api/admin/users/${u.id}`).set(bearer(admin)).send({ active: true })).status).toBe(200);
    expect((await meOn(A, s)).status).toBe(401);
    const fresh = await signInOn(A, u.email);
    expect((await meOn(B, fresh)).status).toBe(200);
    expect((await save(B, fresh, survey.id, '252k')).status).toBe(201);
    expect(await readingsOf(survey.id)).toBe(2);
  });

  // The failure count shared by alternating processes up to the account limit is in auth.spec.ts
  // ("the failure count is shared through PostgreSQL by two API processes"); these extend it.
  describe('failed sign-ins counted from both processes', () => {
    it('an account blocked by failures on A and B is refused with 429 on both; another account signs in on both', async () => {
      const env = await apiEnv();
      const u = await makeUser(['technician']);
      const other = await makeUser(['technician']);
      const limit = env.config.throttle.accountLimit;
      for (let i = 0; i < limit; i++) {
        const r = await request(i % 2 === 0 ? B : A).post('/api/auth/sign-in').set('X-Forwarded-For', randomIp()).send({ email: u.email, password: 'wrong-password' });
        expect(r.status).withContext(`failure ${i + 1}`).toBe(401);
      }
      const [row] = await env.database.db.select().from(signInThrottle).where(eq(signInThrottle.key, `account:${u.email}`));
      expect(row.failures).toBe(limit);
      for (const [name, app] of [['A', A], ['B', B]] as const) {
        const blocked = await request(app).post('/api/auth/sign-in').set('X-Forwarded-For', randomIp()).send({ email: u.email, password: SPEC_PASSWORD });
        expect(blocked.status).withContext(name).toBe(429);
        expect(Number(blocked.headers['retry-after'])).withContext(name).toBeGreaterThan(0);
      }
      // The twin: another account, right password, signs in on both.
      expect((await signInOn(A, other.email)).user.id).toBe(other.id);
      expect((await signInOn(B, other.email)).user.id).toBe(other.id);
    });

    it('failures from one client address across accounts, split over A and B, block that address on both; another address signs in', async () => {
      const env = await apiEnv();
      // Both processes with a small per-address limit (the same setting, as replicas would have).
      const A6 = env.appWith({ SIGN_IN_IP_LIMIT: '6' });
      const B6 = env.appWith({ SIGN_IN_IP_LIMIT: '6' });
      const ip = randomIp();
      for (let i = 0; i < 6; i++) {
        const r = await request(i % 2 === 0 ? A6 : B6).post('/api/auth/sign-in').set('X-Forwarded-For', ip).send({ email: uniqueEmail('probe'), password: 'wrong-password' });
        expect(r.status).withContext(`failure ${i + 1}`).toBe(401);
      }
      const [row] = await env.database.db.select().from(signInThrottle).where(eq(signInThrottle.key, `ip:${ip}`));
      expect(row.failures).toBe(6);
      const u = await makeUser(['technician']);
      for (const [name, app] of [['A', A6], ['B', B6]] as const) {
        const blocked = await request(app).post('/api/auth/sign-in').set('X-Forwarded-For', ip).send({ email: u.email, password: SPEC_PASSWORD });
        expect(blocked.status).withContext(name).toBe(429);
      }
      // The twin: the same account from another address signs in on both.
      expect((await signInOn(A6, u.email)).user.id).toBe(u.id);
      expect((await signInOn(B6, u.email)).user.id).toBe(u.id);
    });

    it("a successful sign-in on B clears the failures counted on A: the account is not blocked by A's earlier count", async () => {
      const env = await apiEnv();
      const u = await makeUser(['technician']);
      const limit = env.config.throttle.accountLimit;
      const fail = (app: App) => request(app).post('/api/auth/sign-in').set('X-Forwarded-For', randomIp()).send({ email: u.email, password: 'wrong-password' });
      for (let i = 0; i < limit - 1; i++) expect((await fail(A)).status).toBe(401);
      await signInOn(B, u.email);
      expect((await env.database.db.select().from(signInThrottle).where(eq(signInThrottle.key, `account:${u.email}`))).length).toBe(0);
      // One more failure on A is the first of a new count, not the limit: the right password still signs in on A.
      expect((await fail(A)).status).toBe(401);
      const [row] = await env.database.db.select().from(signInThrottle).where(eq(signInThrottle.key, `account:${u.email}`));
      expect(row.failures).toBe(1);
      expect((await signInOn(A, u.email)).user.id).toBe(u.id);
    });
  });

  it('an expired access token is refused on both processes; the same claims with a future expiry are accepted on both', async () => {
    const env = await apiEnv();
    const u = await makeUser(['technician']);
    const s = await signInOn(A, u.email);
    const now = Math.floor(Date.now() / 1000);
    const expired = handSigned(env.config.jwtSecret, s.user, u.tokenVersion, now - 60);
    const live = handSigned(env.config.jwtSecret, s.user, u.tokenVersion, now + 60);
    for (const [name, app] of [['A', A], ['B', B]] as const) {
      const refused = await meOn(app, { accessToken: expired });
      expect(refused.status).withContext(name).toBe(401);
      expect(refused.body.error.code).withContext(name).toBe('unauthorized');
      const ok = await meOn(app, { accessToken: live });
      expect(ok.status).withContext(name).toBe(200);
      expect(ok.body.id).withContext(name).toBe(u.id);
    }
    // The folded save route checks expiry itself too (it never reaches its statement).
    const survey = await makeSurvey({ ownerId: u.id });
    const body = () => ({ testPointKey: 'tp-r2', clientKey: clientKey(), text: '250k' });
    expect((await request(B).post(`/api/surveys/${survey.id}/readings`).set(bearer({ accessToken: expired })).send(body())).status).toBe(401);
    expect((await request(A).post(`/api/surveys/${survey.id}/readings`).set(bearer({ accessToken: expired })).send(body())).status).toBe(401);
    expect((await request(B).post(`/api/surveys/${survey.id}/readings`).set(bearer({ accessToken: live })).send(body())).status).toBe(201);
  });
});
