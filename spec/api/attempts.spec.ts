/**
 * Assignments as each side sees them, the student's class survey and its submission (issue #6):
 * GET /api/assignments/:id (the instructor's queue; a student's own view), POST
 * /api/assignments/:id/survey (one survey per student and assignment), POST
 * /api/surveys/:id/submit (the readings frozen as the next attempt; the instructor notified in the
 * app and by mail) and GET /api/assignments/:id/attempts. Each refusal beside its success.
 */
import { eq, sql } from 'drizzle-orm';
import request from 'supertest';
import { attempts, notifications, readings, surveys } from '../../schema/index';
import { apiEnv, bearer, userSession, type Session } from '../support/api-env';
import { addReading, makeMeterProfile } from '../support/bench-fixtures';
import { addStudent, makeAssignment, makeClass, makeClassSurvey } from '../support/class-fixtures';
import { addDays } from '../support/time';

interface World {
  instructor: Session;
  a: Session;
  b: Session;
  outsider: Session;
  admin: Session;
  classId: number;
  assignmentId: number;
  referenceSurveyId: number | null;
}

async function world(opts: { dueAt?: Date } = {}): Promise<World> {
  const [instructor, a, b, outsider, admin] = await Promise.all([userSession(['instructor']), userSession(['student']), userSession(['student']), userSession(['student']), userSession(['admin'])]);
  const cls = await makeClass({ instructorId: instructor.user.id });
  await addStudent(cls.id, a.user.id);
  await addStudent(cls.id, b.user.id);
  const asg = await makeAssignment({ classId: cls.id, reference: true, title: 'Grid leak and plate load', dueAt: opts.dueAt, rule: { decision: 'simple', nearLimitFraction: 0.8, bandFrom: 'template' } });
  return { instructor, a, b, outsider, admin, classId: cls.id, assignmentId: asg.id, referenceSurveyId: asg.referenceSurveyId };
}

async function stateOf(surveyId: number): Promise<string> {
  const env = await apiEnv();
  return (await env.database.db.select({ s: surveys.state }).from(surveys).where(eq(surveys.id, surveyId)))[0].s;
}

describe('GET /api/assignments/:id', () => {
  it('the instructor (and an admin) get the queue and the reference; a student their own view; another student and a stranger 404', async () => {
    const env = await apiEnv();
    const w = await world();
    const surveyA = await makeClassSurvey(w.assignmentId, w.a.user.id, { state: 'submitted' });

    const inst = await request(env.app).get(`/api/assignments/${w.assignmentId}`).set(bearer(w.instructor));
    expect(inst.status).toBe(200);
    expect(inst.body.referenceSurveyId).toBe(w.referenceSurveyId);
    expect(inst.body.queue.length).toBe(2);
    const rowA = inst.body.queue.find((q: { student: { id: number } }) => q.student.id === w.a.user.id);
    expect(rowA.status).toBe('submitted');
    expect(rowA.surveyId).toBe(surveyA);
    expect(inst.body.queue.find((q: { student: { id: number } }) => q.student.id === w.b.user.id).status).toBe('not-started');
    expect(inst.body.myAttempts).toEqual([]);
    const admin = await request(env.app).get(`/api/assignments/${w.assignmentId}`).set(bearer(w.admin));
    expect(admin.status).toBe(200);
    expect(admin.body.queue.length).toBe(2);

    const student = await request(env.app).get(`/api/assignments/${w.assignmentId}`).set(bearer(w.a));
    expect(student.status).toBe(200);
    expect(student.body.referenceSurveyId).toBeNull();
    expect(student.body.queue).toEqual([]);
    expect(student.body.myStatus).toBe('submitted');
    expect(student.body.mySurveyId).toBe(surveyA);
    expect(student.body.set.label).toBe('Training chassis A');
    expect(typeof student.body.set.hotChassis).toBe('boolean');
    const b = await request(env.app).get(`/api/assignments/${w.assignmentId}`).set(bearer(w.b));
    expect(b.body.myStatus).toBe('not-started');
    expect(b.body.mySurveyId).toBeNull();

    for (const s of [w.outsider, await userSession(['instructor'])]) {
      const r = await request(env.app).get(`/api/assignments/${w.assignmentId}`).set(bearer(s));
      expect(r.status).toBe(404);
      expect(r.body.error.code).toBe('not-found');
    }
  });
});

describe('POST /api/assignments/:id/survey', () => {
  it('starts one class survey per student (201, then 200 with the same id), on the training set with the assignment\u2019s version and rule', async () => {
    const env = await apiEnv();
    const w = await world();
    const first = await request(env.app).post(`/api/assignments/${w.assignmentId}/survey`).set(bearer(w.a)).send({});
    expect(first.status).withContext(JSON.stringify(first.body)).toBe(201);
    const again = await request(env.app).post(`/api/assignments/${w.assignmentId}/survey`).set(bearer(w.a)).send({});
    expect(again.status).toBe(200);
    expect(again.body.surveyId).toBe(first.body.surveyId);
    const [row] = await env.database.db.select().from(surveys).where(eq(surveys.id, first.body.surveyId));
    expect(row.assignmentId).toBe(w.assignmentId);
    expect(row.startedBy).toBe(w.a.user.id);
    expect(row.purpose).toBe('assignment');
    expect(row.state).toBe('draft');
    expect(row.rule).toEqual({ decision: 'simple', nearLimitFraction: 0.8, bandFrom: 'template' });
    expect(row.carriedFromSurveyId).toBeNull();
    const view = await request(env.app).get(`/api/surveys/${first.body.surveyId}`).set(bearer(w.a));
    expect(view.status).toBe(200);
    expect(view.body.classwork.title).toBe('Grid leak and plate load');
    expect(view.body.classwork.attemptCount).toBe(0);
    // B's survey is B's own.
    const b = await request(env.app).post(`/api/assignments/${w.assignmentId}/survey`).set(bearer(w.b)).send({});
    expect(b.status).toBe(201);
    expect(b.body.surveyId).not.toBe(first.body.surveyId);
  });

  it('two starts at once make one survey', async () => {
    const env = await apiEnv();
    const w = await world();
    const [x, y] = await Promise.all([
      request(env.app).post(`/api/assignments/${w.assignmentId}/survey`).set(bearer(w.a)).send({}),
      request(env.app).post(`/api/assignments/${w.assignmentId}/survey`).set(bearer(w.a)).send({}),
    ]);
    expect([x.status, y.status].sort()).toEqual([200, 201]);
    expect(x.body.surveyId).toBe(y.body.surveyId);
    const n = await env.database.db.execute<{ n: number }>(sql`SELECT count(*)::int AS n FROM surveys WHERE assignment_id = ${w.assignmentId}`);
    expect(n.rows[0].n).toBe(1);
  });

  it('takes the student\u2019s own meter profile (another\u2019s is a 400)', async () => {
    const env = await apiEnv();
    const w = await world();
    const theirs = await makeMeterProfile({ ownerId: w.instructor.user.id });
    const bad = await request(env.app).post(`/api/assignments/${w.assignmentId}/survey`).set(bearer(w.a)).send({ meterProfileId: theirs.id });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.field).toBe('meterProfileId');
    const mine = await makeMeterProfile({ ownerId: w.a.user.id, name: 'Student DMM' });
    const ok = await request(env.app).post(`/api/assignments/${w.assignmentId}/survey`).set(bearer(w.a)).send({ meterProfileId: mine.id });
    expect(ok.status).toBe(201);
    const view = await request(env.app).get(`/api/surveys/${ok.body.surveyId}`).set(bearer(w.a));
    expect(view.body.survey.meter.name).toBe('Student DMM');
  });

  it('the instructor and an admin may not (403); a student of another class, a removed student and a stranger get 404', async () => {
    const env = await apiEnv();
    const w = await world();
    for (const s of [w.instructor, w.admin]) expect((await request(env.app).post(`/api/assignments/${w.assignmentId}/survey`).set(bearer(s)).send({})).status).toBe(403);
    const removed = await userSession(['student']);
    await addStudent(w.classId, removed.user.id, { removed: true });
    for (const s of [w.outsider, removed, await userSession(['technician'])]) expect((await request(env.app).post(`/api/assignments/${w.assignmentId}/survey`).set(bearer(s)).send({})).status).toBe(404);
    const n = await env.database.db.execute<{ n: number }>(sql`SELECT count(*)::int AS n FROM surveys WHERE assignment_id = ${w.assignmentId}`);
    expect(n.rows[0].n).toBe(0);
    expect((await request(env.app).post(`/api/assignments/${w.assignmentId}/survey`).set(bearer(w.a)).send({})).status).toBe(201);
  });
});

describe('POST /api/surveys/:id/submit', () => {
  it('freezes the readings as attempt 1, the survey waits for review, and the instructor is told in the app and by mail', async () => {
    const env = await apiEnv();
    const w = await world();
    const surveyA = await makeClassSurvey(w.assignmentId, w.a.user.id);
    const r1 = await addReading(surveyA, { testPointKey: 'tp-r2', text: '250k' });
    await addReading(surveyA, { testPointKey: 'tp-r1', text: '9.8M' });
    const r = await request(env.app).post(`/api/surveys/${surveyA}/submit`).set(bearer(w.a));
    expect(r.status).withContext(JSON.stringify(r.body)).toBe(200);
    expect(r.body.number).toBe(1);
    expect(r.body.surveyId).toBe(surveyA);
    expect(r.body.student.id).toBe(w.a.user.id);
    expect(r.body.late).toBeFalse();
    expect(r.body.review).toBeNull();
    expect(await stateOf(surveyA)).toBe('submitted');

    // Frozen: a later change of the stored reading does not change the attempt.
    await env.database.db.update(readings).set({ text: '1k', ohms: 1000 }).where(eq(readings.id, r1));
    const [att] = await env.database.db.select().from(attempts).where(eq(attempts.id, r.body.id));
    const frozen = (att.readings as { id: number; text: string }[]).find((x) => x.id === r1)!;
    expect(frozen.text).toBe('250k');
    expect((att.readings as unknown[]).length).toBe(2);
    expect((att.context as { conditions: { tubesIn: boolean } }).conditions.tubesIn).toBeTrue();

    const notes = await env.database.db.select().from(notifications).where(eq(notifications.userId, w.instructor.user.id));
    expect(notes.length).toBe(1);
    expect(notes[0].kind).toBe('submission');
    expect(notes[0].link).toBe(`/attempts/${r.body.id}/review`);
    const mail = await env.mail.waitFor(w.instructor.user.email, /submitted/);
    expect(mail.text).toContain(`/attempts/${r.body.id}/review`);
    // Nothing for the student.
    expect((await env.database.db.select().from(notifications).where(eq(notifications.userId, w.a.user.id))).length).toBe(0);

    const view = await request(env.app).get(`/api/surveys/${surveyA}`).set(bearer(w.a));
    expect(view.body.survey.editable).toBeFalse();
    expect(view.body.classwork.attemptCount).toBe(1);
  });

  it('refuses a second submission (409), an empty survey (409), the instructor (403) and another student (404); nothing frozen', async () => {
    const env = await apiEnv();
    const w = await world();
    const empty = await makeClassSurvey(w.assignmentId, w.b.user.id);
    const none = await request(env.app).post(`/api/surveys/${empty}/submit`).set(bearer(w.b));
    expect(none.status).toBe(409);
    expect(none.body.error.code).toBe('nothing-to-submit');

    const surveyA = await makeClassSurvey(w.assignmentId, w.a.user.id);
    await addReading(surveyA, { testPointKey: 'tp-r2' });
    expect((await request(env.app).post(`/api/surveys/${surveyA}/submit`).set(bearer(w.instructor))).status).toBe(403);
    expect((await request(env.app).post(`/api/surveys/${surveyA}/submit`).set(bearer(w.b))).status).toBe(404);
    expect((await request(env.app).post(`/api/surveys/${surveyA}/submit`).set(bearer(w.admin))).status).toBe(403);
    const count = async () => (await env.database.db.execute<{ n: number }>(sql`SELECT count(*)::int AS n FROM attempts WHERE assignment_id = ${w.assignmentId}`)).rows[0].n;
    expect(await count()).toBe(0);
    expect((await request(env.app).post(`/api/surveys/${surveyA}/submit`).set(bearer(w.a))).status).toBe(200);
    const twice = await request(env.app).post(`/api/surveys/${surveyA}/submit`).set(bearer(w.a));
    expect(twice.status).toBe(409);
    expect(twice.body.error.code).toBe('survey-not-draft');
    expect(await count()).toBe(1);
  });

  it('an ordinary survey is completed, not submitted (409); a student removed from the class keeps reading but may not submit (403)', async () => {
    const env = await apiEnv();
    const w = await world();
    const own = await request(env.app).post(`/api/surveys/${w.referenceSurveyId}/submit`).set(bearer(w.instructor));
    expect(own.status).toBe(409);
    expect(own.body.error.code).toBe('not-class-survey');
    const surveyA = await makeClassSurvey(w.assignmentId, w.a.user.id);
    await addReading(surveyA, { testPointKey: 'tp-r2' });
    await addStudent(w.classId, w.a.user.id, { removed: true });
    const gone = await request(env.app).post(`/api/surveys/${surveyA}/submit`).set(bearer(w.a));
    expect(gone.status).toBe(403);
    expect(gone.body.error.code).toBe('not-member');
    expect((await request(env.app).get(`/api/surveys/${surveyA}`).set(bearer(w.a))).status).toBe(200);
    await addStudent(w.classId, w.a.user.id);
    expect((await request(env.app).post(`/api/surveys/${surveyA}/submit`).set(bearer(w.a))).status).toBe(200);
  });

  it('a returned survey is submitted again as attempt 2 (re-measure keys closed); a submission after the due date is late', async () => {
    const env = await apiEnv();
    const w = await world({ dueAt: addDays(new Date(), -1) });
    const surveyA = await makeClassSurvey(w.assignmentId, w.a.user.id, { state: 'returned', remeasureKeys: ['tp-r2'] });
    await addReading(surveyA, { testPointKey: 'tp-r2' });
    const env2 = env.database.db;
    await env2.insert(attempts).values({ surveyId: surveyA, assignmentId: w.assignmentId, studentId: w.a.user.id, number: 1, readings: [], context: {} });
    const r = await request(env.app).post(`/api/surveys/${surveyA}/submit`).set(bearer(w.a));
    expect(r.status).toBe(200);
    expect(r.body.number).toBe(2);
    expect(r.body.late).toBeTrue();
    const [row] = await env2.select().from(surveys).where(eq(surveys.id, surveyA));
    expect(row.state).toBe('submitted');
    expect(row.remeasureKeys).toBeNull();
  });
});

describe('GET /api/assignments/:id/attempts', () => {
  it('gives the instructor every attempt of every student, newest first; a student of the class gets 403, a stranger 404', async () => {
    const env = await apiEnv();
    const w = await world();
    const surveyA = await makeClassSurvey(w.assignmentId, w.a.user.id);
    const surveyB = await makeClassSurvey(w.assignmentId, w.b.user.id);
    await addReading(surveyA, { testPointKey: 'tp-r2' });
    await addReading(surveyB, { testPointKey: 'tp-r2' });
    const a1 = await request(env.app).post(`/api/surveys/${surveyA}/submit`).set(bearer(w.a));
    const b1 = await request(env.app).post(`/api/surveys/${surveyB}/submit`).set(bearer(w.b));
    const list = await request(env.app).get(`/api/assignments/${w.assignmentId}/attempts`).set(bearer(w.instructor));
    expect(list.status).toBe(200);
    expect(list.body.items.map((x: { id: number }) => x.id)).toEqual([b1.body.id, a1.body.id]);
    expect((await request(env.app).get(`/api/assignments/${w.assignmentId}/attempts`).set(bearer(w.admin))).body.items.length).toBe(2);
    expect((await request(env.app).get(`/api/assignments/${w.assignmentId}/attempts`).set(bearer(w.a))).status).toBe(403);
    expect((await request(env.app).get(`/api/assignments/${w.assignmentId}/attempts`).set(bearer(w.outsider))).status).toBe(404);
    // The student's own attempts are on their view of the assignment.
    const mine = await request(env.app).get(`/api/assignments/${w.assignmentId}`).set(bearer(w.a));
    expect(mine.body.myAttempts.map((x: { id: number }) => x.id)).toEqual([a1.body.id]);
  });
});
