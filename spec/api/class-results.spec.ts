/**
 * Class results (issue #6 item 6): students × assignments with status, score, attempts and late;
 * per assignment and test point the share of students whose newest attempt agreed with the
 * reference; the same table as CSV. The instructor and admins read them; a student of the class
 * is refused (403), anyone else gets 404.
 */
import { eq, sql } from 'drizzle-orm';
import request from 'supertest';
import { RESULTS_CSV_HEADER } from '../../api/attempts/results.use-cases';
import { surveys } from '../../schema/index';
import { apiEnv, bearer, makeUser, signIn, userSession, type Session } from '../support/api-env';
import { addReading, makeSurvey } from '../support/bench-fixtures';
import { addStudent, makeAssignment, makeClass, makeClassSurvey } from '../support/class-fixtures';
import { addDays } from '../support/time';

interface World {
  instructor: Session;
  student: Session;
  classId: number;
  first: number;
  second: number;
  ids: { ann: number; ben: number; cat: number };
}

/** Ann agrees on R2 and is accepted (score 90); Ben reads R2 far low and is returned (score 30); Cat has not started. */
async function world(): Promise<World> {
  const env = await apiEnv();
  const db = env.database.db;
  const instructor = await userSession(['instructor']);
  const cls = await makeClass({ instructorId: instructor.user.id });
  const ann = (await makeUser(['student'], { name: 'Ann Results' })).id;
  const ben = (await makeUser(['student'], { name: 'Ben Results' })).id;
  const student = await userSession(['student']);
  const cat = student.user.id;
  await db.execute(sql`UPDATE users SET name = 'Cat Results' WHERE id = ${cat}`);
  for (const s of [ann, ben, cat]) await addStudent(cls.id, s);
  // A removed student is not in the results.
  await addStudent(cls.id, (await makeUser(['student'], { name: 'Zed Gone' })).id, { removed: true });
  const first = await makeAssignment({ classId: cls.id, title: 'First survey', dueAt: addDays(new Date(), 3) });
  const ref = await makeSurvey({ setId: first.setId, state: 'complete' });
  await addReading(ref.id, { testPointKey: 'tp-r2', text: '250k' });
  await db.execute(sql`UPDATE assignments SET reference_survey_id = ${ref.id} WHERE id = ${first.id}`);
  const meter = (await db.select({ m: surveys.meter }).from(surveys).where(eq(surveys.id, ref.id)))[0].m;
  const second = await makeAssignment({ classId: cls.id, title: 'Second survey', dueAt: addDays(new Date(), -1) });

  for (const [who, text] of [
    [ann, '251k'],
    [ben, '120k'],
  ] as const) {
    const sv = await makeClassSurvey(first.id, who);
    await db.update(surveys).set({ meter }).where(eq(surveys.id, sv));
    await addReading(sv, { testPointKey: 'tp-r2', text });
    const s = await userSessionOf(who);
    const sub = await request(env.app).post(`/api/surveys/${sv}/submit`).set(bearer(s));
    if (sub.status !== 200) throw new Error(JSON.stringify(sub.body));
    const decision = who === ann ? { decision: 'accepted', score: 90 } : { decision: 'returned', score: 30, remeasureKeys: ['tp-r2'] };
    const rv = await request(env.app).post(`/api/attempts/${sub.body.id}/review`).set(bearer(instructor)).send(decision);
    if (rv.status !== 200) throw new Error(JSON.stringify(rv.body));
  }
  return { instructor, student, classId: cls.id, first: first.id, second: second.id, ids: { ann, ben, cat } };
}

async function userSessionOf(id: number): Promise<Session> {
  const env = await apiEnv();
  const [u] = (await env.database.db.execute<{ email: string }>(sql`SELECT email FROM users WHERE id = ${id}`)).rows;
  return signIn(u.email);
}

describe('Class results', () => {
  let w: World;
  beforeAll(async () => {
    w = await world();
  });

  it('tables students × assignments: status, score, attempts, late (a past due date not yet submitted is late)', async () => {
    const env = await apiEnv();
    const r = await request(env.app).get(`/api/classes/${w.classId}/results`).set(bearer(w.instructor));
    expect(r.status).withContext(JSON.stringify(r.body)).toBe(200);
    expect(r.body.assignments.map((a: { id: number }) => a.id)).toEqual([w.second, w.first]);
    expect(r.body.students.map((s: { name: string }) => s.name)).toEqual(['Ann Results', 'Ben Results', 'Cat Results']);
    const col = 1; // the first assignment (by due date it is second)
    expect(r.body.cells[0][col]).toEqual({ status: 'accepted', score: 90, attempts: 1, late: false });
    expect(r.body.cells[1][col]).toEqual({ status: 'returned', score: 30, attempts: 1, late: false });
    expect(r.body.cells[2][col]).toEqual({ status: 'not-started', score: null, attempts: 0, late: false });
    expect(r.body.cells[2][0]).toEqual({ status: 'not-started', score: null, attempts: 0, late: true });
  });

  it('gives per test point the share of students whose newest attempt agreed with the reference', async () => {
    const env = await apiEnv();
    const r = await request(env.app).get(`/api/classes/${w.classId}/results`).set(bearer(w.instructor));
    const r2 = r.body.points.find((p: { assignmentId: number; testPointKey: string }) => p.assignmentId === w.first && p.testPointKey === 'tp-r2');
    expect(r2).withContext(JSON.stringify(r.body.points)).toBeDefined();
    expect(r2.compared).toBe(2);
    expect(r2.agreed).toBe(1);
    expect(r2.share).toBe(50);
    expect(r2.label).toContain('R2');
    // A point nobody could compare has no share (not a zero).
    const r1 = r.body.points.find((p: { assignmentId: number; testPointKey: string }) => p.assignmentId === w.first && p.testPointKey === 'tp-r1');
    expect(r1.compared).toBe(0);
    expect(r1.share).toBeNull();
  });

  it('as CSV: a header row and one row per student and assignment', async () => {
    const env = await apiEnv();
    const r = await request(env.app).get(`/api/classes/${w.classId}/results.csv`).set(bearer(w.instructor));
    expect(r.status).toBe(200);
    expect(r.headers['content-type']).toContain('text/csv');
    const lines = r.text.trimEnd().split('\r\n');
    expect(lines[0]).toBe(RESULTS_CSV_HEADER.join(','));
    expect(lines.length).toBe(1 + 3 * 2);
    expect(lines).toContain(`${w.ids.ann},Ann Results,${w.first},First survey,${lines.find((l) => l.startsWith(`${w.ids.ann},Ann Results,${w.first}`))!.split(',')[4]},accepted,90,1,no`);
    expect(lines.some((l) => l.startsWith(`${w.ids.cat},Cat Results,${w.second},Second survey,`) && l.endsWith(',not-started,,0,yes'))).toBeTrue();
  });

  it('an admin reads them; a student of the class gets 403 and anyone else 404 (JSON and CSV alike)', async () => {
    const env = await apiEnv();
    for (const path of [`/api/classes/${w.classId}/results`, `/api/classes/${w.classId}/results.csv`]) {
      expect((await request(env.app).get(path).set(bearer(await userSession(['admin'])))).status).withContext(path).toBe(200);
      const st = await request(env.app).get(path).set(bearer(w.student));
      expect(st.status).withContext(path).toBe(403);
      for (const s of [await userSession(['instructor']), await userSession(['student'])]) {
        const r = await request(env.app).get(path).set(bearer(s));
        expect(r.status).withContext(path).toBe(404);
        expect(r.body.error.code).toBe('not-found');
      }
    }
  });
});
