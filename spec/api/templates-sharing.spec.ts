/** Who sees a template: private (owner and admins), shared with named users, public. */
import { eq } from 'drizzle-orm';
import request from 'supertest';
import { templateShares } from '../../schema/index';
import { apiEnv, bearer, makeUser, userSession, type Session } from '../support/api-env';

type Caller = Session & { id: number };
import { makeTemplate } from '../support/template-fixtures';

describe('Template sharing', () => {
  let owner: Caller;
  let friend: Caller;
  let stranger: Caller;
  beforeAll(async () => {
    owner = await userSession(['author']);
    friend = await userSession(['technician']);
    stranger = await userSession(['student']);
  });

  const status = async (s: Session, id: number, path = '') => (await request((await apiEnv()).app).get(`/api/templates/${id}${path}`).set(bearer(s))).status;
  const inLibrary = async (s: Session, id: number) => {
    const r = await request((await apiEnv()).app).get('/api/templates?pageSize=100&sort=updated').set(bearer(s));
    return (r.body.items as { id: number }[]).some((t) => t.id === id);
  };

  it('private: another user gets 404 and does not find it in the library; the owner gets 200 and finds it', async () => {
    const t = await makeTemplate({ ownerId: owner.id, published: 1 });
    expect(await status(friend, t.id)).toBe(404);
    expect(await status(friend, t.id, '/versions/1')).toBe(404);
    expect(await status(friend, t.id, '/export?version=1')).toBe(404);
    expect(await inLibrary(friend, t.id)).toBe(false);
    expect(await status(owner, t.id)).toBe(200);
    expect(await inLibrary(owner, t.id)).toBe(true);
  });

  it('shared with a named user: that user gets 200 and finds it, anyone else still 404', async () => {
    const env = await apiEnv();
    const t = await makeTemplate({ ownerId: owner.id, published: 1 });
    const r = await request(env.app).put(`/api/templates/${t.id}/sharing`).set(bearer(owner)).send({ visibility: 'shared', userIds: [friend.id] });
    expect(r.status).toBe(200);
    expect(r.body.sharedWith).toEqual([{ id: friend.id, name: friend.user.name }]);
    expect(await status(friend, t.id)).toBe(200);
    expect(await status(friend, t.id, '/versions/1')).toBe(200);
    expect(await inLibrary(friend, t.id)).toBe(true);
    expect(await status(stranger, t.id)).toBe(404);
    expect(await inLibrary(stranger, t.id)).toBe(false);
    const rows = await env.database.db.select().from(templateShares).where(eq(templateShares.templateId, t.id));
    expect(rows.map((x) => x.userId)).toEqual([friend.id]);
    // Back to private: the share is gone.
    await request(env.app).put(`/api/templates/${t.id}/sharing`).set(bearer(owner)).send({ visibility: 'private', userIds: [] });
    expect(await status(friend, t.id)).toBe(404);
  });

  it('public: every signed-in user gets 200 and finds it once a version is published; anonymous 401', async () => {
    const env = await apiEnv();
    const t = await makeTemplate({ ownerId: owner.id, published: 1, visibility: 'public' });
    for (const s of [friend, stranger]) {
      expect(await status(s, t.id)).toBe(200);
      expect(await inLibrary(s, t.id)).toBe(true);
    }
    expect((await request(env.app).get(`/api/templates/${t.id}`)).status).toBe(401);
    // A public template with nothing published is not in others' library (there is nothing to use).
    const unpublished = await makeTemplate({ ownerId: owner.id, visibility: 'public' });
    expect(await inLibrary(friend, unpublished.id)).toBe(false);
    expect(await inLibrary(owner, unpublished.id)).toBe(true);
  });

  it('others who can see a template do not see its draft (403); the owner and an admin do', async () => {
    const t = await makeTemplate({ ownerId: owner.id, published: 1, changedDraft: true, visibility: 'public' });
    expect(await status(friend, t.id, '/draft')).toBe(403);
    expect(await status(friend, t.id, '/versions/draft')).toBe(403);
    const view = await request((await apiEnv()).app).get(`/api/templates/${t.id}`).set(bearer(friend));
    expect(view.body.draft).toBeUndefined();
    expect(view.body.sharedWith).toBeUndefined();
    expect(await status(owner, t.id, '/draft')).toBe(200);
    expect(await status(await userSession(['admin']), t.id, '/draft')).toBe(200);
  });

  it('only the owner changes the sharing: a user who can see it gets 403, one who cannot 404', async () => {
    const env = await apiEnv();
    const t = await makeTemplate({ ownerId: owner.id, published: 1, visibility: 'public' });
    const seen = await request(env.app).put(`/api/templates/${t.id}/sharing`).set(bearer(friend)).send({ visibility: 'private', userIds: [] });
    expect(seen.status).toBe(403);
    const priv = await makeTemplate({ ownerId: owner.id, published: 1 });
    const unseen = await request(env.app).put(`/api/templates/${priv.id}/sharing`).set(bearer(friend)).send({ visibility: 'public', userIds: [] });
    expect(unseen.status).toBe(404);
    const ok = await request(env.app).put(`/api/templates/${priv.id}/sharing`).set(bearer(owner)).send({ visibility: 'public', userIds: [] });
    expect(ok.status).toBe(200);
  });

  it('refuses contradictory or unknown shares with the field named', async () => {
    const env = await apiEnv();
    const t = await makeTemplate({ ownerId: owner.id });
    const put = (body: object) => request(env.app).put(`/api/templates/${t.id}/sharing`).set(bearer(owner)).send(body);
    const gone = await makeUser(['technician'], { active: false });
    const cases: [object, string][] = [
      [{ visibility: 'shared', userIds: [] }, 'userIds'],
      [{ visibility: 'public', userIds: [friend.id] }, 'userIds'],
      [{ visibility: 'shared', userIds: [friend.id, owner.id] }, 'userIds[1]'],
      [{ visibility: 'shared', userIds: [friend.id, 2147480000] }, 'userIds[1]'],
      [{ visibility: 'shared', userIds: [gone.id] }, 'userIds[0]'],
    ];
    for (const [body, field] of cases) {
      const r = await put(body);
      expect([r.status, r.body.error?.details?.field]).withContext(JSON.stringify(body)).toEqual([400, field]);
    }
    expect((await env.database.db.select().from(templateShares).where(eq(templateShares.templateId, t.id))).length).toBe(0);
    expect((await put({ visibility: 'shared', userIds: [friend.id, stranger.id] })).status).toBe(200);
  });
});
