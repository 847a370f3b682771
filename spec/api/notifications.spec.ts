/**
 * In-app notifications (issue #6 "Notifications"): each user lists, reads and marks only their
 * own; someone else's is a 404 and stays unread.
 */
import { eq } from 'drizzle-orm';
import request from 'supertest';
import { notifications } from '../../schema/index';
import type { NotificationList } from '../../api/domain/class-format';
import { recordNotices, type Notice } from '../../api/classes/notify';
import { apiEnv, bearer, userSession } from '../support/api-env';

const notice = (userId: number, title: string): Notice => ({ userId, kind: 'review-done', title, body: `${title} — body`, link: '/attempts/1/review', email: null });

async function seed(userId: number, titles: string[]): Promise<number[]> {
  const env = await apiEnv();
  const ids: number[] = [];
  for (const t of titles) {
    await recordNotices(env.database.db, [notice(userId, t)]);
    const [row] = await env.database.db.select({ id: notifications.id }).from(notifications).where(eq(notifications.title, t));
    ids.push(row.id);
  }
  return ids;
}

const uniq = (s: string) => `${s} ${Math.random().toString(36).slice(2, 8)}`;

describe('Notifications', () => {
  it('lists only my own, newest first, with the unread count; anonymous 401', async () => {
    const env = await apiEnv();
    const me = await userSession(['student']);
    const other = await userSession(['student']);
    const [t1, t2] = [uniq('Reviewed: first'), uniq('Reviewed: second')];
    await seed(me.user.id, [t1, t2]);
    await seed(other.user.id, [uniq('Not yours')]);
    const r = await request(env.app).get('/api/notifications').set(bearer(me));
    expect(r.status).toBe(200);
    const list = r.body as NotificationList;
    expect(list.items.map((n) => n.title)).toEqual([t2, t1]);
    expect(list.unread).toBe(2);
    expect(list.items[0]).toEqual(jasmine.objectContaining({ kind: 'review-done', body: `${t2} — body`, link: '/attempts/1/review', readAt: null }));
    expect((await request(env.app).get('/api/notifications')).status).toBe(401);
  });

  it('marks one of mine read (the first time is kept); someone else’s is a 404 and stays unread', async () => {
    const env = await apiEnv();
    const me = await userSession(['student']);
    const other = await userSession(['instructor']);
    const [mine] = await seed(me.user.id, [uniq('Mine')]);
    const [theirs] = await seed(other.user.id, [uniq('Theirs')]);
    const refused = await request(env.app).post(`/api/notifications/${theirs}/read`).set(bearer(me));
    expect(refused.status).toBe(404);
    expect((await env.database.db.select().from(notifications).where(eq(notifications.id, theirs)))[0].readAt).toBeNull();

    const ok = await request(env.app).post(`/api/notifications/${mine}/read`).set(bearer(me));
    expect(ok.status).toBe(200);
    expect(ok.body.id).toBe(mine);
    expect(ok.body.readAt).not.toBeNull();
    const again = await request(env.app).post(`/api/notifications/${mine}/read`).set(bearer(me));
    expect(again.body.readAt).toBe(ok.body.readAt);
    expect((await request(env.app).get('/api/notifications').set(bearer(me))).body.unread).toBe(0);
  });

  it('marks all of mine read and none of anyone else’s', async () => {
    const env = await apiEnv();
    const me = await userSession(['student']);
    const other = await userSession(['student']);
    await seed(me.user.id, [uniq('A'), uniq('B'), uniq('C')]);
    await seed(other.user.id, [uniq('D')]);
    const r = await request(env.app).post('/api/notifications/read-all').set(bearer(me));
    expect(r.status).toBe(200);
    expect(r.body.marked).toBe(3);
    expect((await request(env.app).get('/api/notifications').set(bearer(me))).body.unread).toBe(0);
    expect((await request(env.app).get('/api/notifications').set(bearer(other))).body.unread).toBe(1);
  });

  it('lists the newest 100 and counts every unread one', async () => {
    const env = await apiEnv();
    const me = await userSession(['student']);
    await recordNotices(env.database.db, Array.from({ length: 105 }, (_, i) => notice(me.user.id, `Bulk ${i}`)));
    const r = await request(env.app).get('/api/notifications').set(bearer(me));
    expect(r.body.items.length).toBe(100);
    expect(r.body.unread).toBe(105);
  });
});
