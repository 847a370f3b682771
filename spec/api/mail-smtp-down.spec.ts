/**
 * SMTP down: mail waits in the queue and goes out when the server returns (issue 7, "Faults").
 *
 * The spec runs a mail queue of its own (the production `startMailQueue`, production retry
 * settings) in a database of its own, so that the suite's shared queue worker cannot take its
 * jobs, and points it at a port where its own mail fake was listening and has been stopped.
 * The app is the real one (`createApp`) on the suite's database with this queue as its outbox.
 */
import pg from 'pg';
import request from 'supertest';
import { createApp } from '../../api/app';
import { startMailFake, type MailFake } from '../../api/mail/mail-fake';
import { MAIL_QUEUE, startMailQueue, type MailQueue } from '../../api/mail/outbox';
import { apiEnv, bearer, makeUser, randomIp, signIn, testConfig, uniqueEmail } from '../support/api-env';

interface JobRow {
  id: string;
  state: string;
  retry_count: number;
  output: unknown;
}

/** The pg-boss jobs of the mail queue addressed to `to` (pg-boss keeps them in `pgboss.job`). */
async function jobsTo(client: pg.Client, to: string): Promise<JobRow[]> {
  const r = await client.query<JobRow>(`SELECT id, state, retry_count, output FROM pgboss.job WHERE name = $1 AND data->>'to' = $2`, [MAIL_QUEUE, to]);
  return r.rows;
}

/** Polls until `check` answers true (a state to reach, not a time to assert). */
async function until(what: string, check: () => Promise<boolean>, timeoutMs = 15_000): Promise<void> {
  const end = Date.now() + timeoutMs;
  while (!(await check())) {
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

describe('SMTP down', () => {
  const name = `driftmark_spec_smtp_down_${process.pid}`;
  let admin: pg.Client;
  let queueDb: pg.Client;
  let queue: MailQueue;
  let stopped: MailFake;
  let back: MailFake | undefined;

  beforeAll(async () => {
    const url = process.env.DATABASE_URL!;
    admin = new pg.Client({ connectionString: url.replace(/\/[^/]+$/, '/postgres') });
    await admin.connect();
    await admin.query(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`);
    await admin.query(`CREATE DATABASE ${name}`);
    const queueUrl = url.replace(/\/[^/]+$/, `/${name}`);
    // A mail fake of the spec's own, stopped at once: its port is now closed.
    stopped = await startMailFake();
    await stopped.close();
    const env = await apiEnv();
    queue = await startMailQueue({ databaseUrl: queueUrl, smtpUrl: stopped.url, from: env.config.mailFrom, onError: () => undefined, pollingIntervalSeconds: 0.5 });
    queueDb = new pg.Client({ connectionString: queueUrl });
    await queueDb.connect();
  });

  afterAll(async () => {
    await queue?.stop();
    await back?.close();
    await queueDb?.end();
    await admin.query(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`);
    await admin.end();
  });

  it('a password reset and an invitation answer normally, their mail waits in the queue, and each goes out exactly once when SMTP returns', async () => {
    const env = await apiEnv();
    const app = createApp({ config: testConfig({ JWT_SECRET: env.config.jwtSecret }), database: env.database, outbox: queue });
    const user = await makeUser(['technician'], { name: 'Petra Vane' });
    const boss = await signIn((await makeUser(['admin'], { name: 'Orrin Admin' })).email);
    const invitee = uniqueEmail('invitee');

    // The actions answer as they do with SMTP up.
    const reset = await request(app).post('/api/auth/password-reset').set('X-Forwarded-For', randomIp()).send({ email: user.email });
    expect(reset.status).toBe(202);
    expect(reset.body).toEqual({ status: 'accepted' });
    const invite = await request(app).post('/api/admin/invitations').set(bearer(boss)).send({ email: invitee, name: 'Ada Quill', roles: ['technician'] });
    expect(invite.status).toBe(201);

    // Each mail is one job; the worker tried it, SMTP refused the connection, and the job waits for its retry.
    await until('both jobs to fail once and wait for a retry', async () => {
      const jobs = [...(await jobsTo(queueDb, user.email)), ...(await jobsTo(queueDb, invitee))];
      return jobs.length === 2 && jobs.every((j) => j.state === 'retry');
    });
    for (const to of [user.email, invitee]) {
      const [job, ...more] = await jobsTo(queueDb, to);
      expect(more.length).withContext(to).toBe(0);
      expect(job.state).withContext(to).toBe('retry');
      expect(JSON.stringify(job.output)).withContext(to).toMatch(/ECONNREFUSED/);
    }
    // Nothing was delivered anywhere meanwhile (nor by the suite's shared queue).
    expect(stopped.messages.length).toBe(0);
    expect(env.mail.messages.some((m) => m.to.includes(user.email) || m.to.includes(invitee))).toBeFalse();

    // SMTP returns on the same port: the retry delivers both.
    back = await startMailFake({ port: stopped.port });
    const resetMail = await back.waitFor(user.email, /reset your password/, 20_000);
    const inviteMail = await back.waitFor(invitee, /invited/, 20_000);
    expect(inviteMail.text).toContain('Orrin Admin');

    await until('both jobs to complete', async () => {
      const jobs = [...(await jobsTo(queueDb, user.email)), ...(await jobsTo(queueDb, invitee))];
      return jobs.length === 2 && jobs.every((j) => j.state === 'completed');
    });
    for (const to of [user.email, invitee]) {
      const jobs = await jobsTo(queueDb, to);
      expect(jobs.length).withContext(to).toBe(1);
      // One failed attempt while SMTP was down, then the one that was delivered.
      expect(jobs[0].retry_count).withContext(to).toBe(1);
      expect(back.messages.filter((m) => m.to.includes(to)).length).withContext(to).toBe(1);
    }

    // The mail that waited still works: its link sets the new password.
    const token = resetMail.text.match(/http:\/\/driftmark\.test\/reset-password\/([A-Za-z0-9_-]+)/)?.[1];
    expect(token).toBeDefined();
    const confirm = await request(app).post('/api/auth/password-reset/confirm').send({ token, password: 'after-the-outage-1' });
    expect(confirm.status).toBe(204);
    expect((await signIn(user.email, 'after-the-outage-1')).user.id).toBe(user.id);
  }, 45_000);

  it('with SMTP up, the same queue delivers a reset on its first attempt (the twin of the outage)', async () => {
    const env = await apiEnv();
    const app = createApp({ config: testConfig({ JWT_SECRET: env.config.jwtSecret }), database: env.database, outbox: queue });
    back ??= await startMailFake({ port: stopped.port });
    const user = await makeUser(['technician']);
    const reset = await request(app).post('/api/auth/password-reset').set('X-Forwarded-For', randomIp()).send({ email: user.email });
    expect(reset.status).toBe(202);
    await back.waitFor(user.email, /reset your password/, 10_000);
    await until('the job to complete', async () => {
      const jobs = await jobsTo(queueDb, user.email);
      return jobs.length === 1 && jobs[0].state === 'completed';
    });
    const jobs = await jobsTo(queueDb, user.email);
    expect(jobs.length).toBe(1);
    expect(jobs[0].retry_count).toBe(0);
    expect(back.messages.filter((m) => m.to.includes(user.email)).length).toBe(1);
  });
});
