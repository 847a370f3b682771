/**
 * A thin outbox: mail is queued in PostgreSQL (pg-boss) and sent by a worker through nodemailer,
 * so a request never waits on SMTP and a mail survives an SMTP outage (retried with back-off).
 */
import nodemailer from 'nodemailer';
import PgBoss from 'pg-boss';

export interface MailMessage {
  to: string;
  subject: string;
  text: string;
}

export interface Outbox {
  send(message: MailMessage): Promise<void>;
}

export const MAIL_QUEUE = 'mail';

export interface MailQueue extends Outbox {
  boss: PgBoss;
  stop(): Promise<void>;
}

/**
 * Starts pg-boss on the database and (unless `worker: false`) a worker that sends queued mail.
 * pg-boss keeps its own bookkeeping tables in the `pgboss` schema. Its cron scheduling is on, so
 * the same queue also runs scheduled jobs (the due-date reminders, api/classes/due-reminders.ts,
 * scheduled by api/server.ts through `boss`).
 */
export async function startMailQueue(opts: {
  databaseUrl: string;
  smtpUrl: string;
  from: string;
  worker?: boolean;
  onError: (err: Error) => void;
  pollingIntervalSeconds?: number;
}): Promise<MailQueue> {
  const boss = new PgBoss({ connectionString: opts.databaseUrl, max: 4, supervise: true, schedule: true });
  // Without an 'error' listener a database outage would crash the process.
  boss.on('error', opts.onError);
  await boss.start();
  await boss.createQueue(MAIL_QUEUE, { name: MAIL_QUEUE, retryLimit: 20, retryDelay: 5, retryBackoff: true });
  const transport = nodemailer.createTransport(opts.smtpUrl);
  if (opts.worker !== false) {
    await boss.work<MailMessage>(MAIL_QUEUE, { pollingIntervalSeconds: opts.pollingIntervalSeconds ?? 1, batchSize: 5 }, async (jobs) => {
      for (const job of jobs) {
        await transport.sendMail({ from: opts.from, to: job.data.to, subject: job.data.subject, text: job.data.text });
      }
    });
  }
  return {
    boss,
    async send(message) {
      await boss.send(MAIL_QUEUE, message);
    },
    async stop() {
      await boss.stop({ graceful: true, wait: true, timeout: 5000 });
      transport.close();
    },
  };
}
