/**
 * In-app notifications (issue #6 "Notifications"): each user reads only their own; someone
 * else's is a 404, the same answer as one that does not exist.
 */
import { and, desc, eq, isNull, sql } from 'drizzle-orm';
import { notifications } from '../../schema/index';
import type { Ctx } from '../context';
import type { NotificationKind, NotificationList, NotificationRecord } from '../domain/class-format';
import { notFound } from '../http/errors';

/** The newest notifications a list shows. */
export const NOTIFICATION_LIST_MAX = 100;

const recordOf = (n: typeof notifications.$inferSelect): NotificationRecord => ({
  id: n.id,
  kind: n.kind as NotificationKind,
  title: n.title,
  body: n.body,
  link: n.link,
  createdAt: n.createdAt.toISOString(),
  readAt: n.readAt?.toISOString() ?? null,
});

/** GET /api/notifications — newest first, with the count of unread ones (all of them, not only those listed). */
export async function listNotifications(ctx: Ctx, userId: number): Promise<NotificationList> {
  const [rows, [{ unread }]] = await Promise.all([
    ctx.db.select().from(notifications).where(eq(notifications.userId, userId)).orderBy(desc(notifications.createdAt), desc(notifications.id)).limit(NOTIFICATION_LIST_MAX),
    ctx.db
      .select({ unread: sql<number>`count(*)::int` })
      .from(notifications)
      .where(and(eq(notifications.userId, userId), isNull(notifications.readAt))),
  ]);
  return { items: rows.map(recordOf), unread };
}

/** POST /api/notifications/:id/read — the first reading time is kept. */
export async function markRead(ctx: Ctx, userId: number, id: number): Promise<NotificationRecord> {
  const [row] = await ctx.db
    .update(notifications)
    .set({ readAt: sql`coalesce(${notifications.readAt}, now())` })
    .where(and(eq(notifications.id, id), eq(notifications.userId, userId)))
    .returning();
  if (!row) throw notFound('No such notification.');
  return recordOf(row);
}

/** POST /api/notifications/read-all */
export async function markAllRead(ctx: Ctx, userId: number): Promise<{ marked: number }> {
  const rows = await ctx.db
    .update(notifications)
    .set({ readAt: sql`now()` })
    .where(and(eq(notifications.userId, userId), isNull(notifications.readAt)))
    .returning({ id: notifications.id });
  return { marked: rows.length };
}
