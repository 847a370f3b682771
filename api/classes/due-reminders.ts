/**
 * Due-date reminders (issue #6 "Notifications"): a job of the pg-boss queue, scheduled every
 * 15 minutes (api/server.ts), reminds each current student of an assignment due within
 * DUE_REMINDER_HOURS who has not submitted (nor been accepted) — in the app and by mail, exactly
 * once per assignment and student: the `due_reminders` row is written in the same transaction as
 * the notification, and a second run (or a second process) finds it there. A returned survey
 * counts as not submitted. Archived classes are left alone.
 */
import { sql } from 'drizzle-orm';
import type PgBoss from 'pg-boss';
import type { Ctx } from '../context';
import { DUE_REMINDER_HOURS } from '../domain/class-format';
import { mailNotices, recordNotices, type Notice } from './notify';

export const DUE_REMINDERS_QUEUE = 'due-reminders';
/** Every 15 minutes (cron, UTC). */
export const DUE_REMINDERS_CRON = '*/15 * * * *';

/** One job at a time; a failed run is retried a few times a minute apart (the next quarter hour runs anyway). */
export const DUE_REMINDERS_QUEUE_OPTIONS: PgBoss.Queue = { name: DUE_REMINDERS_QUEUE, retryLimit: 3, retryDelay: 60, policy: 'singleton' };

type Deps = Pick<Ctx, 'db' | 'outbox' | 'linkBase'>;

/** Sends the reminders due at `now`; answers how many went out. */
export async function sendDueReminders(ctx: Deps, now: Date = new Date()): Promise<number> {
  const horizon = new Date(now.getTime() + DUE_REMINDER_HOURS * 3600_000);
  const notices = await ctx.db.transaction(async (tx) => {
    const r = await tx.execute<{ assignment_id: number; student_id: number; title: string; due_at: string | Date; class_name: string; name: string; email: string }>(sql`
      WITH due AS (
        SELECT a.id AS assignment_id, m.student_id, a.title, a.due_at, c.name AS class_name
        FROM assignments a
          JOIN classes c ON c.id = a.class_id AND c.archived_at IS NULL
          JOIN class_members m ON m.class_id = a.class_id AND m.removed_at IS NULL
        WHERE a.due_at > ${now.toISOString()}::timestamptz AND a.due_at <= ${horizon.toISOString()}::timestamptz
          AND NOT EXISTS (SELECT 1 FROM surveys sv WHERE sv.assignment_id = a.id AND sv.started_by = m.student_id AND sv.state IN ('submitted', 'accepted'))
      ), sent AS (
        INSERT INTO due_reminders (assignment_id, student_id, sent_at)
        SELECT assignment_id, student_id, ${now.toISOString()}::timestamptz FROM due
        ON CONFLICT DO NOTHING
        RETURNING assignment_id, student_id
      )
      SELECT due.assignment_id, due.student_id, due.title, due.due_at, due.class_name, u.name, u.email
      FROM sent JOIN due USING (assignment_id, student_id) JOIN users u ON u.id = sent.student_id AND u.active`);
    const notices: Notice[] = r.rows.map((x) => {
      const due = new Date(x.due_at);
      const hours = Math.max(1, Math.round((due.getTime() - now.getTime()) / 3600_000));
      return {
        userId: x.student_id,
        kind: 'due-soon',
        title: `“${x.title}” is due in ${hours} hour${hours === 1 ? '' : 's'}`,
        body: `Your survey for “${x.title}” (${x.class_name}) is due on ${due.toISOString().slice(0, 16).replace('T', ' ')} UTC and has not been submitted yet.`,
        link: `/assignments/${x.assignment_id}`,
        email: x.email,
      };
    });
    await recordNotices(tx, notices);
    return notices;
  });
  await mailNotices(ctx, notices);
  return notices.length;
}

/**
 * Makes the queue, its 15-minute schedule (pg-boss keeps one schedule per queue name, so every
 * API process may call this) and, unless `worker: false`, a worker that runs the job.
 */
export async function scheduleDueReminders(boss: PgBoss, ctx: Deps, opts: { worker?: boolean; onError?: (err: Error) => void } = {}): Promise<void> {
  await boss.createQueue(DUE_REMINDERS_QUEUE, DUE_REMINDERS_QUEUE_OPTIONS);
  await boss.schedule(DUE_REMINDERS_QUEUE, DUE_REMINDERS_CRON, {}, { tz: 'UTC' });
  if (opts.worker !== false) {
    await boss.work(DUE_REMINDERS_QUEUE, { pollingIntervalSeconds: 30 }, async () => {
      try {
        await sendDueReminders(ctx);
      } catch (e) {
        opts.onError?.(e as Error);
        throw e;
      }
    });
  }
}
