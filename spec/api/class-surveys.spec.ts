/**
 * Class surveys' access (issue #6 "Rules"): a student's class survey is seen only by its student,
 * its class's instructor and admins — never by another student, nor through the training set's
 * owner or sharing — and changed only by its student (draft: any test point; returned: only the
 * test points to re-measure; submitted and accepted: nothing). The reference survey is a 404 to a
 * student until their own survey of the assignment is accepted, then read-only. The set's own
 * lists (surveys, history, compare, record, export, previous values) leave class surveys out.
 * Each refusal stands beside the caller or state that succeeds.
 */
import { eq, sql } from 'drizzle-orm';
import request from 'supertest';
import { attempts, surveys } from '../../schema/index';
import { apiEnv, bearer, userSession, type Session } from '../support/api-env';
import { addReading, clientKey, makeSet, makeSurvey } from '../support/bench-fixtures';
import { addStudent, makeAssignment, makeClass, makeClassSurvey } from '../support/class-fixtures';

interface World {
  instructor: Session;
  owner: Session;
  a: Session;
  b: Session;
  admin: Session;
  stranger: Session;
  setId: number;
  assignmentId: number;
  referenceSurveyId: number;
  ownSurveyId: number;
  surveyA: number;
}

/**
 * A class whose training set is owned by a technician (`owner`) and shared with the instructor;
 * students A and B; the owner's complete survey of the set is the reference; A's class survey.
 */
async function world(state: 'draft' | 'submitted' | 'returned' | 'accepted' = 'draft', remeasureKeys: string[] | null = null): Promise<World> {
  const [instructor, owner, a, b, admin, stranger] = await Promise.all([
    userSession(['instructor']),
    userSession(['technician']),
    userSession(['student']),
    userSession(['student']),
    userSession(['admin']),
    userSession(['technician']),
  ]);
  const set = await makeSet({ ownerId: owner.user.id, sharedWith: [instructor.user.id] });
  const ref = await makeSurvey({ setId: set.id, state: 'complete', createdAt: new Date(Date.now() - 3600_000) });
  await addReading(ref.id, { testPointKey: 'tp-r2', text: '250k' });
  const cls = await makeClass({ instructorId: instructor.user.id });
  await addStudent(cls.id, a.user.id);
  await addStudent(cls.id, b.user.id);
  const asg = await makeAssignment({ classId: cls.id, setId: set.id, referenceSurveyId: ref.id });
  const surveyA = await makeClassSurvey(asg.id, a.user.id, { state, remeasureKeys });
  return { instructor, owner, a, b, admin, stranger, setId: set.id, assignmentId: asg.id, referenceSurveyId: ref.id, ownSurveyId: ref.id, surveyA };
}

async function readingCount(surveyId: number): Promise<number> {
  const env = await apiEnv();
  const r = await env.database.db.execute<{ n: number }>(sql`SELECT count(*)::int AS n FROM readings WHERE survey_id = ${surveyId}`);
  return r.rows[0].n;
}

/** Freezes the survey's readings as attempt `number` (as a submission does). */
async function freeze(surveyId: number, assignmentId: number, studentId: number, number = 1): Promise<void> {
  const env = await apiEnv();
  const list = (await env.database.db.execute<{ id: number; test_point_key: string }>(sql`SELECT id, test_point_key FROM readings WHERE survey_id = ${surveyId}`)).rows;
  await env.database.db.insert(attempts).values({ surveyId, assignmentId, studentId, number, readings: list.map((r) => ({ id: Number(r.id), testPointKey: r.test_point_key })), context: {} });
}

const reading = (key = 'tp-r2', text = '251k') => ({ testPointKey: key, clientKey: clientKey(), text });

describe('Class surveys: who sees them', () => {
  it('its student, the instructor and an admin see a class survey; another student, the training set\u2019s owner and a stranger get 404', async () => {
    const env = await apiEnv();
    const w = await world();
    const get = (s: Session) => request(env.app).get(`/api/surveys/${w.surveyA}`).set(bearer(s));

    const mine = await get(w.a);
    expect(mine.status).toBe(200);
    expect(mine.body.classwork.viewer).toBe('student');
    expect(mine.body.classwork.assignmentId).toBe(w.assignmentId);
    expect(mine.body.survey.editable).toBeTrue();
    // The set's earlier (reference) survey is not the student's: no previous values.
    expect(mine.body.previous).toBeNull();

    const instructor = await get(w.instructor);
    expect(instructor.status).toBe(200);
    expect(instructor.body.classwork.viewer).toBe('instructor');
    expect(instructor.body.survey.editable).toBeFalse();
    const admin = await get(w.admin);
    expect(admin.status).toBe(200);
    expect(admin.body.classwork.viewer).toBe('admin');

    for (const s of [w.b, w.owner, w.stranger]) {
      const r = await get(s);
      expect(r.status).withContext(s.user.email).toBe(404);
      expect(r.body.error.code).toBe('not-found');
    }
    // The owner still sees the set's own survey (through the set).
    const own = await request(env.app).get(`/api/surveys/${w.ownSurveyId}`).set(bearer(w.owner));
    expect(own.status).toBe(200);
    expect(own.body.classwork).toBeNull();
    expect(own.body.survey.editable).toBeFalse();
  });
});

describe('Class surveys: who changes them', () => {
  it('only its student adds readings: the instructor and an admin get 403, another student and the set\u2019s owner 404, and nothing is stored', async () => {
    const env = await apiEnv();
    const w = await world();
    const post = (s: Session) => request(env.app).post(`/api/surveys/${w.surveyA}/readings`).set(bearer(s)).send(reading());
    for (const [s, status] of [
      [w.instructor, 403],
      [w.admin, 403],
      [w.b, 404],
      [w.owner, 404],
    ] as const) {
      const r = await post(s);
      expect(r.status).withContext(s.user.email).toBe(status);
    }
    expect(await readingCount(w.surveyA)).toBe(0);
    const ok = await post(w.a);
    expect(ok.status).withContext(JSON.stringify(ok.body)).toBe(201);
    expect(ok.body.reading.enteredBy.id).toBe(w.a.user.id);
    expect(await readingCount(w.surveyA)).toBe(1);
    // The set's owner still saves into their own survey of the same set (the save's other branch).
    const draft = await makeSurvey({ setId: w.setId });
    expect((await request(env.app).post(`/api/surveys/${draft.id}/readings`).set(bearer(w.owner)).send(reading())).status).toBe(201);
    expect((await request(env.app).post(`/api/surveys/${draft.id}/readings`).set(bearer(w.a)).send(reading())).status).toBe(404);
  });

  it('the instructor cannot edit a reading, mark a joint, lift a lead, check the meter or change the conditions of a student\u2019s survey (403); the student can', async () => {
    const env = await apiEnv();
    const w = await world();
    const rid = await addReading(w.surveyA, { testPointKey: 'tp-r2', text: '250k', enteredBy: w.a.user.id });
    const calls: [string, string, Record<string, unknown>][] = [
      ['patch', `/api/surveys/${w.surveyA}/readings/${rid}`, { version: 1, text: '260k' }],
      ['post', `/api/surveys/${w.surveyA}/joint-checks`, { testPointKey: 'tp-r2', checked: true }],
      ['post', `/api/surveys/${w.surveyA}/lifted-leads`, { componentKey: 'c-r2', end: 1 }],
      ['patch', `/api/surveys/${w.surveyA}`, { version: 1, conditions: { ambientC: 19 } }],
    ];
    for (const [method, path, body] of calls) {
      const i = await (request(env.app) as unknown as Record<string, (p: string) => request.Test>)[method](path).set(bearer(w.instructor)).send(body);
      expect(i.status).withContext(`instructor ${method} ${path}`).toBe(403);
      const o = await (request(env.app) as unknown as Record<string, (p: string) => request.Test>)[method](path).set(bearer(w.owner)).send(body);
      expect(o.status).withContext(`owner ${method} ${path}`).toBe(404);
    }
    for (const [method, path, body] of calls) {
      const s = await (request(env.app) as unknown as Record<string, (p: string) => request.Test>)[method](path).set(bearer(w.a)).send(body);
      expect(s.status).withContext(`student ${method} ${path}: ${JSON.stringify(s.body).slice(0, 200)}`).toBeLessThan(300);
    }
    // The survey has no meter: the meter check says so (409) to its student, and 403 to the instructor.
    expect((await request(env.app).post(`/api/surveys/${w.surveyA}/meter-check`).set(bearer(w.instructor)).send({ text: '10k' })).status).toBe(403);
    expect((await request(env.app).post(`/api/surveys/${w.surveyA}/meter-check`).set(bearer(w.a)).send({ text: '10k' })).body.error.code).toBe('no-meter');
  });

  it('the rule and purpose are the assignment\u2019s (409); the conditions are the student\u2019s to set', async () => {
    const env = await apiEnv();
    const w = await world();
    const rule = await request(env.app).patch(`/api/surveys/${w.surveyA}`).set(bearer(w.a)).send({ version: 1, rule: { decision: 'simple', nearLimitFraction: 0.8, bandFrom: 'template' } });
    expect(rule.status).toBe(409);
    expect(rule.body.error.code).toBe('set-by-assignment');
    const purpose = await request(env.app).patch(`/api/surveys/${w.surveyA}`).set(bearer(w.a)).send({ version: 1, purpose: 'periodic' });
    expect(purpose.status).toBe(409);
    const cond = await request(env.app).patch(`/api/surveys/${w.surveyA}`).set(bearer(w.a)).send({ version: 1, conditions: { tubesIn: false } });
    expect(cond.status).toBe(200);
    expect(cond.body.survey.conditions.tubesIn).toBeFalse();
    expect(cond.body.classwork.viewer).toBe('student');
  });

  it('a class survey is submitted, not completed or amended (409); an ordinary survey of the same set completes', async () => {
    const env = await apiEnv();
    const w = await world();
    const done = await request(env.app).post(`/api/surveys/${w.surveyA}/complete`).set(bearer(w.a));
    expect(done.status).toBe(409);
    expect(done.body.error.code).toBe('submit-instead');
    expect((await request(env.app).post(`/api/surveys/${w.surveyA}/complete`).set(bearer(w.instructor))).status).toBe(403);
    const env2 = await env.database.db.select({ state: surveys.state }).from(surveys).where(eq(surveys.id, w.surveyA));
    expect(env2[0].state).toBe('draft');
    const rid = await addReading(w.surveyA, { testPointKey: 'tp-r2' });
    const amend = await request(env.app).post(`/api/surveys/${w.surveyA}/amendments`).set(bearer(w.a)).send({ readingId: rid, reason: 'Misread', change: { text: '25k' } });
    expect(amend.status).toBe(409);
    expect(amend.body.error.code).toBe('class-survey');
    const draft = await makeSurvey({ setId: w.setId });
    expect((await request(env.app).post(`/api/surveys/${draft.id}/complete`).set(bearer(w.owner))).status).toBe(200);
  });
});

describe('Class surveys: what each state takes', () => {
  it('submitted and accepted take nothing (409 survey-not-draft, nothing stored); a draft takes any test point', async () => {
    const env = await apiEnv();
    for (const state of ['submitted', 'accepted'] as const) {
      const w = await world(state);
      const r = await request(env.app).post(`/api/surveys/${w.surveyA}/readings`).set(bearer(w.a)).send(reading());
      expect(r.status).withContext(state).toBe(409);
      expect(r.body.error.code).toBe('survey-not-draft');
      expect(await readingCount(w.surveyA)).toBe(0);
      const view = await request(env.app).get(`/api/surveys/${w.surveyA}`).set(bearer(w.a));
      expect(view.body.survey.editable).withContext(state).toBeFalse();
    }
    const w = await world('draft');
    expect((await request(env.app).post(`/api/surveys/${w.surveyA}/readings`).set(bearer(w.a)).send(reading('tp-r1', '10M'))).status).toBe(201);
    expect((await request(env.app).post(`/api/surveys/${w.surveyA}/readings`).set(bearer(w.a)).send(reading('tp-r2', '250k'))).status).toBe(201);
  });

  it('a returned survey takes new readings only of its re-measure test points (409 not-remeasured otherwise), in the one-statement save', async () => {
    const env = await apiEnv();
    const w = await world('returned', ['tp-r2']);
    const old = await addReading(w.surveyA, { testPointKey: 'tp-r2', text: '120k' });
    const view = await request(env.app).get(`/api/surveys/${w.surveyA}`).set(bearer(w.a));
    expect(view.body.survey.editable).toBeTrue();
    expect(view.body.classwork.remeasureKeys).toEqual(['tp-r2']);

    const other = await request(env.app).post(`/api/surveys/${w.surveyA}/readings`).set(bearer(w.a)).send(reading('tp-r1', '10M'));
    expect(other.status).toBe(409);
    expect(other.body.error.code).toBe('not-remeasured');
    expect(other.body.error.message).toContain('tp-r1');
    expect(await readingCount(w.surveyA)).toBe(1);

    const again = await request(env.app).post(`/api/surveys/${w.surveyA}/readings`).set(bearer(w.a)).send({ ...reading('tp-r2', '250k'), followsReadingId: old });
    expect(again.status).withContext(JSON.stringify(again.body)).toBe(201);
    expect(again.body.reading.followsReadingId).toBe(old);
    // Marking a joint follows the same rule.
    expect((await request(env.app).post(`/api/surveys/${w.surveyA}/joint-checks`).set(bearer(w.a)).send({ testPointKey: 'tp-r1', checked: true })).status).toBe(409);
    expect((await request(env.app).post(`/api/surveys/${w.surveyA}/joint-checks`).set(bearer(w.a)).send({ testPointKey: 'tp-r2', checked: true })).status).toBe(200);
  });

  it('in a returned survey a submitted reading stays as submitted (409); a new re-measure reading can still be corrected', async () => {
    const env = await apiEnv();
    const w = await world('returned', ['tp-r2']);
    const old = await addReading(w.surveyA, { testPointKey: 'tp-r2', text: '120k' });
    await freeze(w.surveyA, w.assignmentId, w.a.user.id);
    const frozen = await request(env.app).patch(`/api/surveys/${w.surveyA}/readings/${old}`).set(bearer(w.a)).send({ version: 1, text: '250k' });
    expect(frozen.status).toBe(409);
    expect(frozen.body.error.code).toBe('reading-submitted');
    const fresh = await request(env.app).post(`/api/surveys/${w.surveyA}/readings`).set(bearer(w.a)).send(reading('tp-r2', '205k'));
    expect(fresh.status).toBe(201);
    const fix = await request(env.app).patch(`/api/surveys/${w.surveyA}/readings/${fresh.body.reading.id}`).set(bearer(w.a)).send({ version: 1, text: '250k' });
    expect(fix.status).withContext(JSON.stringify(fix.body)).toBe(200);
    expect(fix.body.reading.ohms).toBe(250000);
  });
});

describe('The reference survey', () => {
  it('is a 404 to a student until their own survey of the assignment is accepted, then read-only (403 on a write); another student still gets 404', async () => {
    const env = await apiEnv();
    const w = await world('submitted');
    const get = (s: Session) => request(env.app).get(`/api/surveys/${w.referenceSurveyId}`).set(bearer(s));
    expect((await get(w.a)).status).toBe(404);
    expect((await get(w.instructor)).status).toBe(200);

    await env.database.db.update(surveys).set({ state: 'accepted' }).where(eq(surveys.id, w.surveyA));
    const open = await get(w.a);
    expect(open.status).toBe(200);
    expect(open.body.survey.editable).toBeFalse();
    expect(open.body.readings.length).toBe(1);
    // The student's way back is the assignment (the set page is not theirs); the instructor's view names none.
    expect(open.body.referenceFor).toEqual({ assignmentId: w.assignmentId, title: jasmine.any(String) });
    expect(open.body.previous).toBeNull();
    expect((await get(w.instructor)).body.referenceFor).toBeNull();
    const write = await request(env.app).post(`/api/surveys/${w.referenceSurveyId}/readings`).set(bearer(w.a)).send(reading());
    expect(write.status).toBe(403);
    expect((await get(w.b)).status).toBe(404);
    // B's own survey of the assignment, returned (not accepted): still a 404.
    await makeClassSurvey(w.assignmentId, w.b.user.id, { state: 'returned', remeasureKeys: ['tp-r2'] });
    expect((await get(w.b)).status).toBe(404);
  });
});

describe("The training set's own lists leave class surveys out", () => {
  it('survey list and count, history, compare, record, export and previous values hold only the set\u2019s own surveys', async () => {
    const env = await apiEnv();
    const w = await world('accepted');
    await addReading(w.surveyA, { testPointKey: 'tp-r2', text: '120k' });
    const h = bearer(w.owner);

    const detail = await request(env.app).get(`/api/sets/${w.setId}`).set(h);
    expect(detail.status).toBe(200);
    expect(detail.body.surveys.map((s: { id: number }) => s.id)).toEqual([w.ownSurveyId]);
    const list = await request(env.app).get(`/api/sets/${w.setId}/surveys`).set(h);
    expect(list.body.map((s: { id: number }) => s.id)).toEqual([w.ownSurveyId]);
    const sets = await request(env.app).get(`/api/sets?q=`).set(h);
    const mine = sets.body.items.find((s: { id: number }) => s.id === w.setId);
    expect(mine.surveyCount).toBe(1);
    expect(mine.lastSurvey.id).toBe(w.ownSurveyId);

    const history = await request(env.app).get(`/api/sets/${w.setId}/history`).set(h);
    expect(history.body.surveys.map((s: { id: number }) => s.id)).toEqual([w.ownSurveyId]);
    expect((await request(env.app).get(`/api/sets/${w.setId}/compare?a=${w.ownSurveyId}&b=${w.surveyA}`).set(h)).status).toBe(404);
    expect((await request(env.app).get(`/api/sets/${w.setId}/compare?a=${w.ownSurveyId}&b=${w.ownSurveyId}`).set(h)).status).toBe(200);
    const record = await request(env.app).get(`/api/sets/${w.setId}/record`).set(h);
    expect(record.body.surveys.map((s: { survey: { id: number } }) => s.survey.id)).toEqual([w.ownSurveyId]);
    const exp = await request(env.app).get('/api/export/sets?format=json').set(h);
    const set = exp.body.sets.find((s: { id: number }) => s.id === w.setId);
    expect(set.surveys.map((s: { id: number }) => s.id)).toEqual([w.ownSurveyId]);
    // The admin sees the set's own survey list the same way.
    expect((await request(env.app).get(`/api/sets/${w.setId}/surveys`).set(bearer(w.admin))).body.length).toBe(1);

    // A new survey of the set carries over from (and shows previous values of) the set's own survey, not the student's newer one.
    const started = await request(env.app).post(`/api/sets/${w.setId}/surveys`).set(h).send({ purpose: 'periodic' });
    expect(started.status).toBe(201);
    expect(started.body.survey.carriedFromSurveyId).toBe(w.ownSurveyId);
    const view = await request(env.app).get(`/api/surveys/${started.body.survey.id}`).set(h);
    expect(view.body.previous.surveyId).toBe(w.ownSurveyId);
    expect(view.body.previous.readings.map((r: { text: string }) => r.text)).toEqual(['250k']);
  });

  it('a reading of a class survey is not one of the set\u2019s for its parts record (400); the set\u2019s own reading is', async () => {
    const env = await apiEnv();
    const w = await world('accepted');
    const classReading = await addReading(w.surveyA, { testPointKey: 'tp-r2', text: '120k' });
    const ownReading = (await env.database.db.execute<{ id: number }>(sql`SELECT id FROM readings WHERE survey_id = ${w.ownSurveyId} LIMIT 1`)).rows[0].id;
    const bad = await request(env.app).post(`/api/sets/${w.setId}/parts-record`).set(bearer(w.owner)).send({ componentKey: 'c-r2', action: 'kept', readingId: classReading });
    expect(bad.status).toBe(400);
    const ok = await request(env.app).post(`/api/sets/${w.setId}/parts-record`).set(bearer(w.owner)).send({ componentKey: 'c-r2', action: 'kept', readingId: Number(ownReading) });
    expect(ok.status).withContext(JSON.stringify(ok.body)).toBe(201);
  });
});
