/**
 * Notifications of class events (DESIGN.md §2 "class"; the classes issue's "Notifications"): each
 * event is an in-app notification row, written in the event's own transaction, and an e-mail
 * queued through the outbox (pg-boss) once that transaction has committed — a rolled-back event
 * mails no one.
 */
import { notifications } from '../../schema/index';
import type { Ctx } from '../context';
import type { NotificationKind } from '../domain/class-format';
import type { Tx } from '../db';

export interface Notice {
  userId: number;
  kind: NotificationKind;
  title: string;
  body: string;
  /** App path, e.g. `/assignments/7`. */
  link: string;
  /** The address to mail (null: in-app only). */
  email: string | null;
}

/** Writes the in-app notifications (call inside the event's transaction). */
export async function recordNotices(tx: Tx, notices: readonly Notice[]): Promise<void> {
  if (notices.length === 0) return;
  await tx.insert(notifications).values(notices.map((n) => ({ userId: n.userId, kind: n.kind, title: n.title, body: n.body, link: n.link })));
}

/**
 * Queues the mail of the notices (call after the commit). The mail names the event and links to
 * the app; the queue retries while SMTP is down.
 */
export async function mailNotices(ctx: Pick<Ctx, 'outbox' | 'linkBase'>, notices: readonly Notice[]): Promise<void> {
  for (const n of notices) {
    if (!n.email) continue;
    await ctx.outbox.send({ to: n.email, subject: `Driftmark: ${n.title}`, text: `${n.body}\n\n${ctx.linkBase}${n.link}\n` });
  }
}
