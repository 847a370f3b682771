/**
 * Reviews (issue #6 item 4; DESIGN.md §3.9): the attempt side by side with the reference survey
 * (E_n agreement where method and conditions match, states by state, the prediction and its error,
 * the hints), comments on readings before the decision, and the decision — returned with the test
 * points to re-measure, or accepted — with the student notified. The student reads their own
 * review; the reference, the comparison and the suggestion show to them once accepted.
 */
import { eq, sql } from 'drizzle-orm';
import request from 'supertest';
import { normalisedError } from '../../api/domain/agreement';
import { notifications, readings, surveys } from '../../schema/index';
import { apiEnv, bearer, userSession, type Session } from '../support/api-env';
import { addReading, clientKey, makeMeterProfile, makeSurvey, SAMPLE_CONDITIONS } from '../support/bench-fixtures';
import { addStudent, makeAssignment, makeClass, makeClassSurvey } from '../support/class-fixtures';

interface World {
  instructor: Session;
  a: Session;
  b: Session;
  admin: Session;
  stranger: Session;
  classId: number;
  assignmentId: number;
  referenceSurveyId: number;
  surveyA: number;
  attemptId: number;
}

type Row = {
  testPointKey: string;
  student: { reading: { id: number; text: string } | null; verdict: string | null; uncertaintyOhms: number | null };
  reference: { reading: { text: string } | null; uncertaintyOhms: number | null } | null;
  comparison: { agreement: string; en: number | null; reason: string | null; verdictAgreement: boolean | null } | null;
  prediction: { text: string; ohms: number | null; errorPct: number | null } | null;
  hints: string[];
  comments: { text: string }[];
  remeasureRequested: boolean;
};

/**
 * A class with students A and B; the reference (the instructor's complete survey with the worked
 * meter): R2 250 kΩ, R1 10 MΩ. A's class survey (the student's own meter profile of the same
 * kind): R2 as given, R1 2 MΩ (far low: fingers across the probes), submitted as attempt 1.
 */
async function world(r2 = '251k', opts: { studentConditions?: Partial<typeof SAMPLE_CONDITIONS>; r2Method?: 'lead-lifted' } = {}): Promise<World> {
  const env = await apiEnv();
  const db = env.database.db;
  const [instructor, a, b, admin, stranger] = await Promise.all([userSession(['instructor']), userSession(['student']), userSession(['student']), userSession(['admin']), userSession(['technician'])]);
  const cls = await makeClass({ instructorId: instructor.user.id, name: 'Thursday bench, group C' });
  await addStudent(cls.id, a.user.id);
  await addStudent(cls.id, b.user.id);
  const asg = await makeAssignment({ classId: cls.id, predictFirst: true, title: 'Audio stage survey' });
  const ref = await makeSurvey({ setId: asg.setId, state: 'complete' });
  await addReading(ref.id, { testPointKey: 'tp-r2', text: '250k' });
  await addReading(ref.id, { testPointKey: 'tp-r1', text: '10M' });
  await db.execute(sql`UPDATE assignments SET reference_survey_id = ${ref.id} WHERE id = ${asg.id}`);

  const surveyA = await makeClassSurvey(asg.id, a.user.id);
  const meter = await makeMeterProfile({ ownerId: a.user.id });
  const [m] = await db.execute<{ meter: unknown }>(sql`SELECT meter FROM surveys WHERE id = ${ref.id}`).then((r) => r.rows);
  await db
    .update(surveys)
    .set({ meterProfileId: meter.id, meter: m.meter, conditions: { ...SAMPLE_CONDITIONS, ...(opts.studentConditions ?? {}) } })
    .where(eq(surveys.id, surveyA));
  const r2id = await addReading(surveyA, { testPointKey: 'tp-r2', text: r2, ...(opts.r2Method ? { method: opts.r2Method, liftedEnd: 1 } : {}), enteredBy: a.user.id });
  await db.update(readings).set({ prediction: '200k' }).where(eq(readings.id, r2id));
  await addReading(surveyA, { testPointKey: 'tp-r1', text: '2M', enteredBy: a.user.id });
  const sub = await request(env.app).post(`/api/surveys/${surveyA}/submit`).set(bearer(a));
  if (sub.status !== 200) throw new Error(`submit: ${sub.status} ${JSON.stringify(sub.body)}`);
  return { instructor, a, b, admin, stranger, classId: cls.id, assignmentId: asg.id, referenceSurveyId: ref.id, surveyA, attemptId: sub.body.id };
}

const rowOf = (body: { rows: Row[] }, key: string) => body.rows.find((r) => r.testPointKey === key)!;

describe('GET /api/attempts/:id/review', () => {
  it('the instructor sees each reading beside the reference with E_n (as the domain computes it), verdicts, the prediction\u2019s error and hints', async () => {
    const env = await apiEnv();
    const w = await world('251k');
    const r = await request(env.app).get(`/api/attempts/${w.attemptId}/review`).set(bearer(w.instructor));
    expect(r.status).withContext(JSON.stringify(r.body).slice(0, 300)).toBe(200);
    expect(r.body.referenceShown).toBeTrue();
    expect(r.body.referenceSurveyId).toBe(w.referenceSurveyId);
    expect(r.body.surveyState).toBe('submitted');
    expect(r.body.assignment.predictFirst).toBeTrue();
    expect(r.body.assignment.classId).toBe(w.classId);
    expect(r.body.assignment.className).toBe('Thursday bench, group C');
    expect(r.body.attempt.number).toBe(1);

    const r2 = rowOf(r.body, 'tp-r2');
    expect(r2.student.reading!.text).toBe('251k');
    expect(r2.reference!.reading!.text).toBe('250k');
    expect(r2.student.uncertaintyOhms).toBeGreaterThan(0);
    const en = normalisedError({ ohms: 251000, U: r2.student.uncertaintyOhms! }, { ohms: 250000, U: r2.reference!.uncertaintyOhms! });
    expect(r2.comparison!.en).toBeCloseTo(en.en, 9);
    expect(r2.comparison!.agreement).toBe('agree');
    expect(r2.comparison!.verdictAgreement).toBeTrue();
    // Predicted 200k, measured 251k: (200 − 251) / 251 = −20.3 %.
    expect(r2.prediction!.text).toBe('200k');
    expect(r2.prediction!.errorPct).toBeCloseTo(((200000 - 251000) / 251000) * 100, 6);
    expect(r2.hints).toEqual([]);

    const r1 = rowOf(r.body, 'tp-r1');
    expect(r1.comparison!.agreement).toBe('disagree');
    expect(r1.comparison!.en).toBeGreaterThan(1);
    expect(r1.hints).toContain('fingers-across-probes');
    // The chart reading neither took: not comparable, with its reason.
    const chart = rowOf(r.body, 'tp-v1p');
    expect(chart.student.reading).toBeNull();
    expect(chart.comparison!.agreement).toBe('not-comparable');
    expect(chart.comparison!.reason).toBe('no-reference');
    expect(r.body.counts.agree).toBe(1);
    expect(r.body.counts.disagree).toBe(1);
    expect(r.body.suggestedScore).toBe(50);
    expect(r.body.attempts.length).toBe(1);
  });

  it('a reading taken another way, or in circuit under other conditions, is not comparable (with the reason); the same method and conditions compare', async () => {
    const env = await apiEnv();
    const lifted = await world('251k', { r2Method: 'lead-lifted' });
    const a = await request(env.app).get(`/api/attempts/${lifted.attemptId}/review`).set(bearer(lifted.instructor));
    expect(rowOf(a.body, 'tp-r2').comparison!.reason).toBe('method-differs');
    const tubesOut = await world('251k', { studentConditions: { tubesIn: false } });
    const b = await request(env.app).get(`/api/attempts/${tubesOut.attemptId}/review`).set(bearer(tubesOut.instructor));
    expect(rowOf(b.body, 'tp-r2').comparison!.reason).toBe('conditions-differ');
    expect(b.body.conditions.differences.length).toBe(1);
    expect(b.body.suggestedScore).toBeNull();
    const same = await world('120k');
    const c = await request(env.app).get(`/api/attempts/${same.attemptId}/review`).set(bearer(same.instructor));
    expect(rowOf(c.body, 'tp-r2').comparison!.agreement).toBe('disagree');
    expect(c.body.conditions.differences).toEqual([]);
  });

  it('its student reads it without the reference, comparison or suggestion until accepted; then with them. Another student and a stranger get 404; an admin reads it all', async () => {
    const env = await apiEnv();
    const w = await world();
    const mine = await request(env.app).get(`/api/attempts/${w.attemptId}/review`).set(bearer(w.a));
    expect(mine.status).toBe(200);
    expect(mine.body.referenceShown).toBeFalse();
    expect(mine.body.assignment.className).toBe('Thursday bench, group C');
    expect(mine.body.referenceSurveyId).toBeNull();
    expect(mine.body.suggestedScore).toBeNull();
    expect(mine.body.conditions.reference).toBeNull();
    for (const row of mine.body.rows as Row[]) {
      expect(row.reference).toBeNull();
      expect(row.comparison).toBeNull();
    }
    // Their own values, prediction and hints are theirs to see.
    expect(rowOf(mine.body, 'tp-r2').prediction!.text).toBe('200k');
    expect(rowOf(mine.body, 'tp-r1').hints).toContain('fingers-across-probes');
    expect(JSON.stringify(mine.body)).not.toContain('"250k"');

    for (const s of [w.b, w.stranger]) expect((await request(env.app).get(`/api/attempts/${w.attemptId}/review`).set(bearer(s))).status).toBe(404);
    const admin = await request(env.app).get(`/api/attempts/${w.attemptId}/review`).set(bearer(w.admin));
    expect(admin.body.referenceShown).toBeTrue();

    const accept = await request(env.app).post(`/api/attempts/${w.attemptId}/review`).set(bearer(w.instructor)).send({ decision: 'accepted', score: 80 });
    expect(accept.status).toBe(200);
    const after = await request(env.app).get(`/api/attempts/${w.attemptId}/review`).set(bearer(w.a));
    expect(after.body.referenceShown).toBeTrue();
    expect(rowOf(after.body, 'tp-r2').reference!.reading!.text).toBe('250k');
    expect(after.body.suggestedScore).toBe(50);
    expect(after.body.attempt.review.score).toBe(80);
  });
});

describe('Comments on readings', () => {
  it('the instructor comments on the attempt under review (201) and deletes one before the decision (204); the student, an admin and others may not', async () => {
    const env = await apiEnv();
    const w = await world();
    const path = `/api/attempts/${w.attemptId}/comments`;
    const body = { testPointKey: 'tp-r1', text: 'Hold one probe only: your fingers read in parallel.' };
    expect((await request(env.app).post(path).set(bearer(w.a)).send(body)).status).toBe(403);
    expect((await request(env.app).post(path).set(bearer(w.admin)).send(body)).status).toBe(403);
    expect((await request(env.app).post(path).set(bearer(w.b)).send(body)).status).toBe(404);
    const made = await request(env.app).post(path).set(bearer(w.instructor)).send(body);
    expect(made.status).withContext(JSON.stringify(made.body)).toBe(201);
    expect(made.body.author.id).toBe(w.instructor.user.id);
    expect(made.body.testPointKey).toBe('tp-r1');
    const other = await request(env.app).post(path).set(bearer(w.instructor)).send({ testPointKey: 'tp-r2', text: 'Good.' });
    expect(other.status).toBe(201);

    const view = await request(env.app).get(`/api/attempts/${w.attemptId}/review`).set(bearer(w.a));
    expect(rowOf(view.body, 'tp-r1').comments.map((c) => c.text)).toEqual([body.text]);

    expect((await request(env.app).delete(`${path}/${other.body.id}`).set(bearer(w.a))).status).toBe(403);
    expect((await request(env.app).delete(`${path}/${other.body.id}`).set(bearer(w.instructor))).status).toBe(204);
    expect((await request(env.app).delete(`${path}/${other.body.id}`).set(bearer(w.instructor))).status).toBe(404);
    const n = await env.database.db.execute<{ n: number }>(sql`SELECT count(*)::int AS n FROM reading_comments WHERE attempt_id = ${w.attemptId}`);
    expect(n.rows[0].n).toBe(1);
  });

  it('refuses a test point the version lacks and a reading of another test point (400); after the decision comments are closed (409)', async () => {
    const env = await apiEnv();
    const w = await world();
    const path = `/api/attempts/${w.attemptId}/comments`;
    const r1 = (await env.database.db.execute<{ id: number }>(sql`SELECT id FROM readings WHERE survey_id = ${w.surveyA} AND test_point_key = 'tp-r1'`)).rows[0].id;
    const nowhere = await request(env.app).post(path).set(bearer(w.instructor)).send({ testPointKey: 'tp-nowhere', text: 'x' });
    expect(nowhere.status).toBe(400);
    expect(nowhere.body.error.details.field).toBe('testPointKey');
    const wrong = await request(env.app).post(path).set(bearer(w.instructor)).send({ testPointKey: 'tp-r2', readingId: Number(r1), text: 'x' });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.details.field).toBe('readingId');
    const right = await request(env.app).post(path).set(bearer(w.instructor)).send({ testPointKey: 'tp-r1', readingId: Number(r1), text: 'Which range?' });
    expect(right.status).toBe(201);
    expect(right.body.readingId).toBe(Number(r1));

    expect((await request(env.app).post(`/api/attempts/${w.attemptId}/review`).set(bearer(w.instructor)).send({ decision: 'returned', score: 40, remeasureKeys: ['tp-r1'] })).status).toBe(200);
    const late = await request(env.app).post(path).set(bearer(w.instructor)).send({ testPointKey: 'tp-r1', text: 'One more thing' });
    expect(late.status).toBe(409);
    const del = await request(env.app).delete(`${path}/${right.body.id}`).set(bearer(w.instructor));
    expect(del.status).toBe(409);
    expect(del.body.error.code).toBe('reviewed');
  });
});

describe('POST /api/attempts/:id/review', () => {
  it('returns with the test points to re-measure; the student re-measures only those, resubmits, and the instructor accepts; each step told to the student', async () => {
    const env = await apiEnv();
    const db = env.database.db;
    const w = await world('120k');
    const ret = await request(env.app).post(`/api/attempts/${w.attemptId}/review`).set(bearer(w.instructor)).send({ decision: 'returned', score: 40, comment: 'R2 far low: re-measure it.', remeasureKeys: ['tp-r2'] });
    expect(ret.status).withContext(JSON.stringify(ret.body)).toBe(200);
    expect(ret.body.decision).toBe('returned');
    expect(ret.body.score).toBe(40);
    expect(ret.body.suggestedScore).toBe(0);
    expect(ret.body.remeasureKeys).toEqual(['tp-r2']);
    expect(ret.body.reviewer.id).toBe(w.instructor.user.id);
    const [s] = await db.select().from(surveys).where(eq(surveys.id, w.surveyA));
    expect(s.state).toBe('returned');
    expect(s.remeasureKeys).toEqual(['tp-r2']);
    const note = await db.select().from(notifications).where(eq(notifications.userId, w.a.user.id));
    expect(note.map((n) => n.kind)).toEqual(['review-done']);
    expect(note[0].link).toBe(`/attempts/${w.attemptId}/review`);
    await env.mail.waitFor(w.a.user.email, /reviewed/);
    const twice = await request(env.app).post(`/api/attempts/${w.attemptId}/review`).set(bearer(w.instructor)).send({ decision: 'accepted', score: 90 });
    expect(twice.status).toBe(409);

    // Only the requested point takes a reading now.
    const r1 = await request(env.app).post(`/api/surveys/${w.surveyA}/readings`).set(bearer(w.a)).send({ testPointKey: 'tp-r1', clientKey: clientKey(), text: '10M' });
    expect(r1.status).toBe(409);
    const r2 = await request(env.app).post(`/api/surveys/${w.surveyA}/readings`).set(bearer(w.a)).send({ testPointKey: 'tp-r2', clientKey: clientKey(), text: '249k' });
    expect(r2.status).toBe(201);
    const second = await request(env.app).post(`/api/surveys/${w.surveyA}/submit`).set(bearer(w.a));
    expect(second.status).toBe(200);
    expect(second.body.number).toBe(2);
    // The first attempt is not the one under review any more.
    const stale = await request(env.app).post(`/api/attempts/${w.attemptId}/comments`).set(bearer(w.instructor)).send({ testPointKey: 'tp-r2', text: 'x' });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('not-latest-attempt');

    const view = await request(env.app).get(`/api/attempts/${second.body.id}/review`).set(bearer(w.instructor));
    expect(rowOf(view.body, 'tp-r2').student.reading!.text).toBe('249k');
    expect(rowOf(view.body, 'tp-r2').comparison!.agreement).toBe('agree');
    expect(view.body.attempts.map((x: { number: number }) => x.number)).toEqual([2, 1]);
    // The first attempt keeps what was submitted then.
    const first = await request(env.app).get(`/api/attempts/${w.attemptId}/review`).set(bearer(w.instructor));
    expect(rowOf(first.body, 'tp-r2').student.reading!.text).toBe('120k');
    expect(rowOf(first.body, 'tp-r2').remeasureRequested).toBeTrue();

    const acc = await request(env.app).post(`/api/attempts/${second.body.id}/review`).set(bearer(w.instructor)).send({ decision: 'accepted', score: 85, comment: 'Good.' });
    expect(acc.status).toBe(200);
    const [done] = await db.select().from(surveys).where(eq(surveys.id, w.surveyA));
    expect(done.state).toBe('accepted');
    expect(done.remeasureKeys).toBeNull();
    expect((await db.select().from(notifications).where(eq(notifications.userId, w.a.user.id))).length).toBe(2);
    // Accepted: the student may now read the reference survey itself.
    expect((await request(env.app).get(`/api/surveys/${w.referenceSurveyId}`).set(bearer(w.a))).status).toBe(200);
    expect((await request(env.app).get(`/api/surveys/${w.referenceSurveyId}`).set(bearer(w.b))).status).toBe(404);
  });

  it('refuses a return without test points, an accept with some, a test point the version lacks (400), the student and an admin (403), others (404); nothing changes', async () => {
    const env = await apiEnv();
    const w = await world();
    const path = `/api/attempts/${w.attemptId}/review`;
    const cases: [Session, Record<string, unknown>, number, string?][] = [
      [w.instructor, { decision: 'returned', score: 50 }, 400, 'remeasureKeys'],
      [w.instructor, { decision: 'returned', score: 50, remeasureKeys: [] }, 400, 'remeasureKeys'],
      [w.instructor, { decision: 'accepted', score: 50, remeasureKeys: ['tp-r2'] }, 400, 'remeasureKeys'],
      [w.instructor, { decision: 'returned', score: 50, remeasureKeys: ['tp-nowhere'] }, 400, 'remeasureKeys'],
      [w.instructor, { decision: 'accepted', score: 101 }, 400, 'score'],
      [w.a, { decision: 'accepted', score: 100 }, 403],
      [w.admin, { decision: 'accepted', score: 100 }, 403],
      [w.b, { decision: 'accepted', score: 100 }, 404],
      [w.stranger, { decision: 'accepted', score: 100 }, 404],
    ];
    for (const [s, body, status, field] of cases) {
      const r = await request(env.app).post(path).set(bearer(s)).send(body);
      expect(r.status).withContext(JSON.stringify(body)).toBe(status);
      if (field) expect(r.body.error.details.field).toBe(field);
    }
    const n = await env.database.db.execute<{ n: number }>(sql`SELECT count(*)::int AS n FROM reviews WHERE attempt_id = ${w.attemptId}`);
    expect(n.rows[0].n).toBe(0);
    expect((await env.database.db.select().from(surveys).where(eq(surveys.id, w.surveyA)))[0].state).toBe('submitted');
    const ok = await request(env.app).post(path).set(bearer(w.instructor)).send({ decision: 'accepted', score: null });
    expect(ok.status).toBe(200);
    expect(ok.body.score).toBeNull();
  });
});
