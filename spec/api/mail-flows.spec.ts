import { eq } from 'drizzle-orm';
import request from 'supertest';
import { invitations, passwordResets, users } from '../../schema/index';
import { apiEnv, bearer, makeUser, signIn, uniqueEmail } from '../support/api-env';

/** The token at the end of the first link in a captured mail. */
function linkToken(text: string, path: string): string {
  const m = text.match(new RegExp(`http://driftmark\\.test/${path}/([A-Za-z0-9_-]+)`));
  if (!m) throw new Error(`no /${path}/ link in mail:\n${text}`);
  return m[1];
}

describe('Password reset by e-mail', () => {
  it('mails a link that sets a new password once; the old password and old sessions stop working', async () => {
    const env = await apiEnv();
    const u = await makeUser(['technician']);
    const before = await signIn(u.email);
    const ask = await request(env.app).post('/api/auth/password-reset').send({ email: u.email });
    expect(ask.status).toBe(202);
    const mail = await env.mail.waitFor(u.email, /reset your password/);
    const token = linkToken(mail.text, 'reset-password');

    const set = await request(env.app).post('/api/auth/password-reset/confirm').send({ token, password: 'a-brand-new-password' });
    expect(set.status).toBe(204);
    expect((await signIn(u.email, 'a-brand-new-password')).user.id).toBe(u.id);
    // The old access token (older token version) and refresh token are refused.
    expect((await request(env.app).get('/api/me').set(bearer(before))).status).toBe(401);
    expect((await request(env.app).post('/api/auth/refresh').send({ refreshToken: before.refreshToken })).status).toBe(401);
    // The link works once.
    const again = await request(env.app).post('/api/auth/password-reset/confirm').send({ token, password: 'another-new-password' });
    expect(again.status).toBe(400);
    expect(again.body.error.details.field).toBe('token');
  });

  it('answers an unknown e-mail exactly as a known one and sends nothing', async () => {
    const env = await apiEnv();
    const ghost = uniqueEmail('ghost');
    const r = await request(env.app).post('/api/auth/password-reset').send({ email: ghost });
    expect(r.status).toBe(202);
    expect(r.body).toEqual({ status: 'accepted' });
    await new Promise((res) => setTimeout(res, 1500));
    expect(env.mail.messages.some((m) => m.to.includes(ghost))).toBeFalse();
    const rows = await env.database.db.select().from(passwordResets);
    expect(rows.every((row) => row.userId > 0)).toBeTrue();
  });
});

describe('Invitations', () => {
  it('an admin invites by e-mail; the single-use link creates the account with the invited roles', async () => {
    const env = await apiEnv();
    const admin = await signIn((await makeUser(['admin'], { name: 'Ines Admin' })).email);
    const email = uniqueEmail('invitee');
    const inv = await request(env.app).post('/api/admin/invitations').set(bearer(admin)).send({ email, name: 'Tomas Rell', roles: ['instructor', 'technician'] });
    expect(inv.status).toBe(201);
    expect(inv.body.roles).toEqual(['instructor', 'technician']);
    const mail = await env.mail.waitFor(email, /invited/);
    expect(mail.text).toContain('Ines Admin');
    const token = linkToken(mail.text, 'invitation');

    const info = await request(env.app).get(`/api/auth/invitations/${token}`);
    expect(info.status).toBe(200);
    expect(info.body).toEqual({ email, name: 'Tomas Rell', roles: ['instructor', 'technician'] });

    const accept = await request(env.app).post('/api/auth/invitations/accept').send({ token, name: 'Tomas Rell', password: 'chosen-password-1' });
    expect(accept.status).toBe(201);
    expect(accept.body.user.roles).toEqual(['instructor', 'technician']);
    const [row] = await env.database.db.select().from(users).where(eq(users.email, email));
    expect(row.name).toBe('Tomas Rell');
    const [invRow] = await env.database.db.select().from(invitations).where(eq(invitations.id, inv.body.id));
    expect(invRow.acceptedUserId).toBe(row.id);

    // Single use: the link is dead now.
    expect((await request(env.app).get(`/api/auth/invitations/${token}`)).status).toBe(404);
    const twice = await request(env.app).post('/api/auth/invitations/accept').send({ token, name: 'Someone Else', password: 'chosen-password-2' });
    expect(twice.status).toBe(404);
    const listed = await request(env.app).get('/api/admin/invitations').set(bearer(admin));
    expect(listed.body.items.find((i: { id: number }) => i.id === inv.body.id).status).toBe('accepted');
  });

  it('refuses to invite an e-mail that already has an account (409) and invites a new one', async () => {
    const env = await apiEnv();
    const admin = await signIn((await makeUser(['admin'])).email);
    const existing = await makeUser(['student']);
    const r = await request(env.app).post('/api/admin/invitations').set(bearer(admin)).send({ email: existing.email, roles: ['student'] });
    expect(r.status).toBe(409);
    const ok = await request(env.app).post('/api/admin/invitations').set(bearer(admin)).send({ email: uniqueEmail('new'), roles: ['student'] });
    expect(ok.status).toBe(201);
  });
});

describe('Admin user management', () => {
  it('lists and searches users, creates one, and changes roles', async () => {
    const env = await apiEnv();
    const admin = await signIn((await makeUser(['admin'])).email);
    const email = uniqueEmail('created');
    const created = await request(env.app).post('/api/admin/users').set(bearer(admin)).send({ email, name: 'Ola Benchhand', roles: ['technician'], password: 'initial-password' });
    expect(created.status).toBe(201);
    const list = await request(env.app).get('/api/admin/users').query({ q: email.slice(0, 14), pageSize: 5 }).set(bearer(admin));
    expect(list.status).toBe(200);
    expect(list.body.items.map((i: { email: string }) => i.email)).toContain(email);
    expect(list.body.total).toBeGreaterThanOrEqual(1);
    const patched = await request(env.app).patch(`/api/admin/users/${created.body.id}`).set(bearer(admin)).send({ roles: ['technician', 'author'] });
    expect(patched.status).toBe(200);
    expect(patched.body.roles).toEqual(['technician', 'author']);
    const s = await signIn(email, 'initial-password');
    expect(s.user.roles).toEqual(['technician', 'author']);
  });

  it('refuses an admin deactivating or demoting their own account (409) but allows renaming it', async () => {
    const env = await apiEnv();
    const a = await makeUser(['admin']);
    const admin = await signIn(a.email);
    expect((await request(env.app).patch(`/api/admin/users/${a.id}`).set(bearer(admin)).send({ active: false })).status).toBe(409);
    expect((await request(env.app).patch(`/api/admin/users/${a.id}`).set(bearer(admin)).send({ roles: ['technician'] })).status).toBe(409);
    const [row] = await env.database.db.select().from(users).where(eq(users.id, a.id));
    expect(row.active).toBeTrue();
    expect(row.roles).toEqual(['admin']);
    const rename = await request(env.app).patch(`/api/admin/users/${a.id}`).set(bearer(admin)).send({ name: 'Renamed Admin' });
    expect(rename.status).toBe(200);
    expect(rename.body.name).toBe('Renamed Admin');
  });

  it('answers 404 for a user that does not exist', async () => {
    const env = await apiEnv();
    const admin = await signIn((await makeUser(['admin'])).email);
    expect((await request(env.app).patch('/api/admin/users/999999').set(bearer(admin)).send({ name: 'Nobody' })).status).toBe(404);
  });
});
