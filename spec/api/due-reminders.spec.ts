/**
 * Due-date reminders (issue #6 "Notifications"): students of a current class who have not
 * submitted an assignment due within DUE_REMINDER_HOURS get one in-app notification and one mail
 * — exactly once; submitted and accepted surveys, removed students, assignments due later or
 * already past and archived classes get none. A moved due date gets its own reminder. The job is
 * scheduled in pg-boss by the server every 15 minutes.
 *
 * The specs run the job at a `now` in 2091, so only their own assignments fall in its window.
 */
import { and, eq, inArray } from 'drizzle-orm';
import request from 'supertest';
import { dueReminders, notifications, users } from '../../schema/index';
import { DUE_REMINDER_HOURS } from '../../api/domain/class-format';
import { DUE_REMINDERS_CRON, DUE_REMINDERS_QUEUE, DUE_REMINDERS_QUEUE_OPTIONS, sendDueReminders } from '../../api/classes/due-reminders';
import { startServer } from '../../api/server';
import { apiEnv, bearer, makeUser, signIn, testConfig } from '../support/api-env';
import { addStudent, makeAssignment, makeClass, makeClassSurvey } from '../support/class-fixtures';

const hours = (d: Date, h: number) => new Date(d.getTime() + h * 3600_000);

describe('Due-date reminders', () => {
  const now = new Date('2091-03-01T09:00:00Z');
  const deps = async () => {
    const env = await apiEnv();
    return { db: env.database.db, outbox: env.queue, linkBase: 'http://driftmark.test' };
  };

  it(`remind once, in the app and by mail, each current student who has not submitted an assignment due within ${DUE_REMINDER_HOURS} h`, async () => {
    const env = await apiEnv();
    const instructor = await makeUser(['instructor']);
    const c = await makeClass({ instructorId: instructor.id, name: 'Reminder class' });
    const a = await makeAssignment({ classId: c.id, title: 'Grid leak check', dueAt: hours(now, 24) });
    const later = await makeAssignment({ classId: c.id, setId: a.setId, dueAt: hours(now, DUE_REMINDER_HOURS + 24) });
    const past = await makeAssignment({ classId: c.id, setId: a.setId, dueAt: hours(now, -1) });
    const student = async (name: string) => addStudent(c.id, (await makeUser(['student'], { name })).id);
    const notStarted = await student('Ada Notstarted');
    const drafting = await student('Bo Drafting');
    const returned = await student('Cy Returned');
    const submitted = await student('Di Submitted');
    const accepted = await student('Ed Accepted');
    const removed = await addStudent(c.id, (await makeUser(['student'])).id, { removed: true });
    await makeClassSurvey(a.id, drafting, { state: 'draft' });
    await makeClassSurvey(a.id, returned, { state: 'returned', remeasureKeys: ['tp-r2'] });
    await makeClassSurvey(a.id, submitted, { state: 'submitted' });
    await makeClassSurvey(a.id, accepted, { state: 'accepted' });
    const archived = await makeClass({ instructorId: instructor.id, archived: true });
    await addStudent(archived.id, notStarted);
    const inArchived = await makeAssignment({ classId: archived.id, dueAt: hours(now, 12) });

    const sent = await sendDueReminders(await deps(), now);
    expect(sent).toBe(3);
    const rows = await env.database.db.select().from(dueReminders).where(inArray(dueReminders.assignmentId, [a.id, later.id, past.id, inArchived.id]));
    expect(rows.map((r) => [r.assignmentId, r.studentId])).toEqual(jasmine.arrayWithExactContents([a.id, a.id, a.id].map((id, i) => [id, [notStarted, drafting, returned][i]])));

    const notes = await env.database.db.select().from(notifications).where(and(eq(notifications.kind, 'due-soon'), inArray(notifications.userId, [notStarted, drafting, returned, submitted, accepted, removed])));
    expect(notes.map((n) => n.userId)).toEqual(jasmine.arrayWithExactContents([notStarted, drafting, returned]));
    expect(notes[0].title).toBe('“Grid leak check” is due in 24 hours');
    expect(notes[0].link).toBe(`/assignments/${a.id}`);
    expect(notes[0].body).toContain('Reminder class');

    const emailOf = async (id: number) => (await env.database.db.select({ email: users.email }).from(users).where(eq(users.id, id)))[0].email;
    const student1 = await signIn(await emailOf(notStarted));
    const mail = await env.mail.waitFor(student1.user.email, /Grid leak check/);
    await env.mail.waitFor(await emailOf(drafting), /Grid leak check/);
    await env.mail.waitFor(await emailOf(returned), /Grid leak check/);
    // Queued in the same call as the three above: none to the submitted, accepted or removed student.
    for (const id of [submitted, accepted, removed]) {
      const address = await emailOf(id);
      expect(env.mail.messages.some((m) => m.to.includes(address))).withContext(address).toBeFalse();
    }
    expect(mail.subject).toBe('Driftmark: “Grid leak check” is due in 24 hours');
    expect(mail.text).toContain(`http://driftmark.test/assignments/${a.id}`);
    const list = await request(env.app).get('/api/notifications').set(bearer(student1));
    expect(list.body.items[0].kind).toBe('due-soon');

    // Exactly once: a second run (the next quarter hour) sends nothing.
    expect(await sendDueReminders(await deps(), hours(now, 0.25))).toBe(0);
    expect((await env.database.db.select().from(dueReminders).where(eq(dueReminders.assignmentId, a.id))).length).toBe(3);
  });

  it('a due date moved by the instructor gets its own reminder; an unmoved one none', async () => {
    const env = await apiEnv();
    const instructor = await makeUser(['instructor']);
    const c = await makeClass({ instructorId: instructor.id });
    const a = await makeAssignment({ classId: c.id, dueAt: hours(now, 10) });
    const s = await addStudent(c.id);
    expect(await sendDueReminders(await deps(), now)).toBe(1);
    expect(await sendDueReminders(await deps(), now)).toBe(0);
    const teacher = await signIn(instructor.email);
    const moved = await request(env.app).patch(`/api/assignments/${a.id}`).set(bearer(teacher)).send({ dueAt: hours(now, 40).toISOString() });
    expect(moved.status).toBe(200);
    expect(await sendDueReminders(await deps(), now)).toBe(1);
    const notes = await env.database.db.select().from(notifications).where(and(eq(notifications.userId, s), eq(notifications.kind, 'due-soon')));
    expect(notes.map((n) => n.title).sort()).toEqual(['“Survey the training chassis” is due in 10 hours', '“Survey the training chassis” is due in 40 hours']);
  });

  it(`is scheduled by the server in pg-boss (queue "${DUE_REMINDERS_QUEUE}", every 15 minutes), whose worker sends the reminders`, async () => {
    const env = await apiEnv();
    const boss = env.queue.boss;
    // A run already queued (as the schedule queues one each quarter hour) for the server's worker to take when it starts.
    const c = await makeClass();
    const a = await makeAssignment({ classId: c.id, title: 'Queued reminder', dueAt: hours(new Date(), 2) });
    const student = await makeUser(['student']);
    await addStudent(c.id, student.id);
    await boss.createQueue(DUE_REMINDERS_QUEUE, DUE_REMINDERS_QUEUE_OPTIONS);
    await boss.unschedule(DUE_REMINDERS_QUEUE);
    expect((await boss.getSchedules()).some((x) => x.name === DUE_REMINDERS_QUEUE)).withContext('no schedule before the server starts').toBeFalse();
    await boss.send(DUE_REMINDERS_QUEUE, {});

    const running = await startServer({ config: testConfig({ JWT_SECRET: env.config.jwtSecret, PORT: '0', HOST: '127.0.0.1' }), databaseUrl: env.databaseUrl, smtpUrl: env.mail.url });
    try {
      const s = (await boss.getSchedules()).find((x) => x.name === DUE_REMINDERS_QUEUE);
      expect(s).withContext('the schedule the server made').toBeDefined();
      expect(s!.cron).toBe('*/15 * * * *');
      expect(DUE_REMINDERS_CRON).toBe('*/15 * * * *');
      const mail = await env.mail.waitFor(student.email, /Queued reminder/, 20_000);
      expect(mail.text).toContain(`/assignments/${a.id}`);
      expect((await env.database.db.select().from(dueReminders).where(eq(dueReminders.assignmentId, a.id))).map((r) => r.studentId)).toEqual([student.id]);
    } finally {
      await running.close();
    }
  });
});
