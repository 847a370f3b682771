/**
 * Competency sign-offs (issue #6 item 5): the catalogue, a student's record (the student, an
 * instructor of a class they are or were in, admins; anyone else 404), signing off (an instructor
 * of a class the student is in now), withdrawing with a note (the signer or an admin). The record
 * is append-only: a withdrawal stays in the history.
 */
import { eq } from 'drizzle-orm';
import request from 'supertest';
import { competencySignoffs } from '../../schema/index';
import { COMPETENCIES, type CompetencyRecord } from '../../api/domain/class-format';
import { apiEnv, bearer, userSession, type Session } from '../support/api-env';
import { addStudent, makeClass } from '../support/class-fixtures';

describe('Competency sign-offs', () => {
  let instructor: Session;
  let student: Session;
  let classId: number;
  beforeAll(async () => {
    instructor = await userSession(['instructor']);
    student = await userSession(['student']);
    classId = (await makeClass({ instructorId: instructor.user.id })).id;
    await addStudent(classId, student.user.id);
  });

  const rows = async (studentId: number) => {
    const env = await apiEnv();
    return env.database.db.select().from(competencySignoffs).where(eq(competencySignoffs.studentId, studentId));
  };

  it('lists the catalogue to any signed-in user (anonymous 401)', async () => {
    const env = await apiEnv();
    const r = await request(env.app).get('/api/competencies').set(bearer(student));
    expect(r.status).toBe(200);
    expect(r.body.items.map((c: { key: string }) => c.key)).toEqual(COMPETENCIES.map((c) => c.key));
    expect(r.body.items[0].title).toMatch(/Discharges/);
    expect((await request(env.app).get('/api/competencies')).status).toBe(401);
  });

  it('the instructor signs off a competency (201); the student reads it as current in their record; signing it again is a 409', async () => {
    const env = await apiEnv();
    const r = await request(env.app).post(`/api/students/${student.user.id}/competencies`).set(bearer(instructor)).send({ competencyKey: 'meter-check', note: 'Zeroed the leads unprompted.' });
    expect(r.status).withContext(JSON.stringify(r.body)).toBe(201);
    expect(r.body).toEqual(
      jasmine.objectContaining({ studentId: student.user.id, competencyKey: 'meter-check', classId, note: 'Zeroed the leads unprompted.', signedBy: { id: instructor.user.id, name: instructor.user.name }, withdrawnAt: null }),
    );
    const rec = (await request(env.app).get(`/api/students/${student.user.id}/competencies`).set(bearer(student))).body as CompetencyRecord;
    expect(rec.student).toEqual({ id: student.user.id, name: student.user.name });
    expect(rec.items.length).toBe(COMPETENCIES.length);
    expect(rec.items.find((i) => i.key === 'meter-check')!.current!.id).toBe(r.body.id);
    expect(rec.items.filter((i) => i.current !== null).length).toBe(1);
    expect(rec.history.map((h) => h.id)).toEqual([r.body.id]);

    const twice = await request(env.app).post(`/api/students/${student.user.id}/competencies`).set(bearer(instructor)).send({ competencyKey: 'meter-check' });
    expect(twice.status).toBe(409);
    expect(twice.body.error.code).toBe('already-signed-off');
    expect((await rows(student.user.id)).filter((x) => x.competencyKey === 'meter-check').length).toBe(1);
  });

  it("refuses to sign off someone who is not in the caller's classes (404), a removed student (404), a student role caller (403); the twin signs off", async () => {
    const env = await apiEnv();
    const stranger = await userSession(['student']);
    const removed = await userSession(['student']);
    await addStudent(classId, removed.user.id, { removed: true });
    const body = { competencyKey: 'measures-in-circuit' };
    expect((await request(env.app).post(`/api/students/${stranger.user.id}/competencies`).set(bearer(instructor)).send(body)).status).toBe(404);
    expect((await request(env.app).post(`/api/students/${removed.user.id}/competencies`).set(bearer(instructor)).send(body)).status).toBe(404);
    const otherInstructor = await userSession(['instructor']);
    expect((await request(env.app).post(`/api/students/${student.user.id}/competencies`).set(bearer(otherInstructor)).send(body)).status).toBe(404);
    expect((await request(env.app).post(`/api/students/${student.user.id}/competencies`).set(bearer(stranger)).send(body)).status).toBe(403);
    const elsewhere = await makeClass({ instructorId: otherInstructor.user.id });
    const wrongClass = await request(env.app)
      .post(`/api/students/${student.user.id}/competencies`)
      .set(bearer(instructor))
      .send({ ...body, classId: elsewhere.id });
    expect(wrongClass.status).toBe(404);
    expect((await rows(stranger.user.id)).length + (await rows(removed.user.id)).length).toBe(0);
    expect((await rows(student.user.id)).some((x) => x.competencyKey === 'measures-in-circuit')).toBeFalse();

    const ok = await request(env.app).post(`/api/students/${student.user.id}/competencies`).set(bearer(instructor)).send({ ...body, classId });
    expect(ok.status).toBe(201);
    expect(ok.body.classId).toBe(classId);
  });

  it('reads a record: the student, their instructor (also after removal from the class), an admin; another student or instructor 404', async () => {
    const env = await apiEnv();
    const former = await userSession(['student']);
    await addStudent(classId, former.user.id, { removed: true });
    const path = (id: number) => `/api/students/${id}/competencies`;
    expect((await request(env.app).get(path(former.user.id)).set(bearer(former))).status).toBe(200);
    expect((await request(env.app).get(path(former.user.id)).set(bearer(instructor))).status).toBe(200);
    expect((await request(env.app).get(path(former.user.id)).set(bearer(await userSession(['admin'])))).status).toBe(200);
    for (const who of [student, await userSession(['instructor']), await userSession(['technician'])]) {
      const r = await request(env.app).get(path(former.user.id)).set(bearer(who));
      expect(r.status).withContext(who.user.email).toBe(404);
    }
    expect((await request(env.app).get(path(2147483000)).set(bearer(instructor))).status).toBe(404);
  });

  it('withdraws with a note: the signer or an admin (200); the student and another instructor of the student 403, a stranger 404; twice 409; signing off again afterwards adds a row', async () => {
    const env = await apiEnv();
    const s = await userSession(['student']);
    await addStudent(classId, s.user.id);
    const coTeacher = await userSession(['instructor']);
    const coClass = await makeClass({ instructorId: coTeacher.user.id });
    await addStudent(coClass.id, s.user.id);
    const signed = await request(env.app).post(`/api/students/${s.user.id}/competencies`).set(bearer(instructor)).send({ competencyKey: 'discharges-and-verifies' });
    expect(signed.status).toBe(201);
    const id = signed.body.id as number;
    const url = `/api/competency-signoffs/${id}/withdraw`;
    const note = { note: 'Skipped the verify step on the second chassis.' };

    expect((await request(env.app).post(url).set(bearer(s)).send(note)).status).toBe(403);
    expect((await request(env.app).post(url).set(bearer(coTeacher)).send(note)).status).toBe(403);
    expect((await request(env.app).post(url).set(bearer(await userSession(['instructor']))).send(note)).status).toBe(404);
    expect((await rows(s.user.id))[0].withdrawnAt).toBeNull();

    const w = await request(env.app).post(url).set(bearer(instructor)).send(note);
    expect(w.status).toBe(200);
    expect(w.body.withdrawnAt).not.toBeNull();
    expect(w.body.withdrawnBy).toEqual({ id: instructor.user.id, name: instructor.user.name });
    expect(w.body.withdrawnNote).toBe(note.note);
    const again = await request(env.app).post(url).set(bearer(instructor)).send(note);
    expect(again.status).toBe(409);

    const rec = (await request(env.app).get(`/api/students/${s.user.id}/competencies`).set(bearer(s))).body as CompetencyRecord;
    expect(rec.items.find((i) => i.key === 'discharges-and-verifies')!.current).toBeNull();
    expect(rec.history.length).toBe(1);

    const resign = await request(env.app).post(`/api/students/${s.user.id}/competencies`).set(bearer(coTeacher)).send({ competencyKey: 'discharges-and-verifies', note: 'Verified twice.' });
    expect(resign.status).toBe(201);
    expect(resign.body.classId).toBe(coClass.id);
    const after = (await request(env.app).get(`/api/students/${s.user.id}/competencies`).set(bearer(s))).body as CompetencyRecord;
    expect(after.items.find((i) => i.key === 'discharges-and-verifies')!.current!.id).toBe(resign.body.id);
    expect(after.history.map((h) => h.id)).toEqual([resign.body.id, id]);

    // An admin withdraws someone else's sign-off.
    const byAdmin = await request(env.app).post(`/api/competency-signoffs/${resign.body.id}/withdraw`).set(bearer(await userSession(['admin']))).send({ note: 'Entered on the wrong student.' });
    expect(byAdmin.status).toBe(200);
  });
});
