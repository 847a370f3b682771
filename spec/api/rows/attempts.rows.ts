/**
 * Access-matrix and bad-input rows of the attempts routes: an assignment as each side sees it,
 * starting and submitting a class survey, attempts, reviews and comments, class results (see
 * ./index.ts).
 *
 * Hand-written expectations, with the classes rows' convention (./classes.rows.ts): "own" is a
 * class the caller takes part in — a student caller as a current student of it (the survey, the
 * attempt are theirs), any other caller as its instructor (the rule is the class's instructor,
 * not the role) — and "others" a class of another user's the caller has no part in. Someone
 * else's class work is a 404; admins read every class's work but neither survey for a student nor
 * review for an instructor (403); a student is refused (403) what only the instructor does.
 */
import { eq } from 'drizzle-orm';
import { attempts, readingComments, users, type Role } from '../../../schema/index';
import { readingsOf } from '../../../api/surveys/surveys.repository';
import { apiEnv } from '../../support/api-env';
import { owned, type WriteRoute } from '../../support/bad-input-kit';
import { addReading, makeMeterProfile } from '../../support/bench-fixtures';
import { addStudent, makeAssignment, makeClass, makeClassSurvey } from '../../support/class-fixtures';
import type { Caller, Expect, MatrixRequest } from '../../support/matrix-kit';

/** Reads of class work: its student ("own" for a student), its instructor, admins; someone else's 404. */
const SEE_WORK: Record<Caller, Expect> = {
  anonymous: 401,
  admin: { own: 'ok', others: 'ok' },
  author: { own: 'ok', others: 404 },
  technician: { own: 'ok', others: 404 },
  instructor: { own: 'ok', others: 404 },
  student: { own: 'ok', others: 404 },
};
/** The instructor's reads (every attempt, results): a student of the class 403, admins all, anyone else 404. */
const INSTRUCTOR_READS: Record<Caller, Expect> = { ...SEE_WORK, student: { own: 403, others: 404 } };
/** The instructor's review writes: a student of the class 403, an admin on another's class 403, anyone else 404. */
const INSTRUCTOR_WRITES: Record<Caller, Expect> = { ...INSTRUCTOR_READS, admin: { own: 'ok', others: 403 } };
/**
 * The student's own writes (start, submit): the student ("own"); the class's instructor and admins
 * see the assignment or survey but may not (403); anyone else 404.
 */
const STUDENT_WRITES: Record<Caller, Expect> = {
  anonymous: 401,
  admin: { own: 403, others: 403 },
  author: { own: 403, others: 404 },
  technician: { own: 403, others: 404 },
  instructor: { own: 403, others: 404 },
  student: { own: 'ok', others: 404 },
};

export const ATTEMPT_MATRIX: Record<string, Record<Caller, Expect>> = {
  'GET /api/assignments/:id': SEE_WORK,
  'POST /api/assignments/:id/survey': STUDENT_WRITES,
  'POST /api/surveys/:id/submit': STUDENT_WRITES,
  'GET /api/assignments/:id/attempts': INSTRUCTOR_READS,
  'GET /api/attempts/:id/review': SEE_WORK,
  'POST /api/attempts/:id/comments': INSTRUCTOR_WRITES,
  'DELETE /api/attempts/:id/comments/:commentId': INSTRUCTOR_WRITES,
  'POST /api/attempts/:id/review': INSTRUCTOR_WRITES,
  'GET /api/classes/:id/results': INSTRUCTOR_READS,
  'GET /api/classes/:id/results.csv': INSTRUCTOR_READS,
};

async function rolesOf(userId: number): Promise<Role[]> {
  const env = await apiEnv();
  const [u] = await env.database.db.select({ roles: users.roles }).from(users).where(eq(users.id, userId));
  return u.roles;
}

export interface ClassWork {
  classId: number;
  instructorId: number;
  assignmentId: number;
  studentId: number;
}

/**
 * An assignment (with a reference survey) of a class `ownerId` takes part in: a student as its
 * current student, anyone else as its instructor (with a fresh current student). Absent, a fresh
 * instructor's class with a fresh student.
 */
export async function classWorkFor(ownerId?: number): Promise<ClassWork> {
  const student = ownerId !== undefined && (await rolesOf(ownerId)).includes('student');
  const c = student || ownerId === undefined ? await makeClass() : await makeClass({ instructorId: ownerId });
  const studentId = await addStudent(c.id, student ? ownerId : undefined);
  const a = await makeAssignment({ classId: c.id, reference: true });
  return { classId: c.id, instructorId: c.instructorId, assignmentId: a.id, studentId };
}

/** The student's draft class survey with one reading of R2. */
export async function draftWithReading(w: ClassWork): Promise<number> {
  const id = await makeClassSurvey(w.assignmentId, w.studentId);
  await addReading(id, { testPointKey: 'tp-r2', text: '251k', enteredBy: w.studentId });
  return id;
}

/** The student's class survey submitted as attempt 1 (inserted directly, as a submission freezes it): the attempt's id and its reading. */
export async function submittedAttempt(w: ClassWork): Promise<{ attemptId: number; surveyId: number; readingId: number }> {
  const env = await apiEnv();
  const db = env.database.db;
  const surveyId = await makeClassSurvey(w.assignmentId, w.studentId, { state: 'submitted' });
  const readingId = await addReading(surveyId, { testPointKey: 'tp-r2', text: '251k', enteredBy: w.studentId });
  const [row] = await db
    .insert(attempts)
    .values({ surveyId, assignmentId: w.assignmentId, studentId: w.studentId, number: 1, readings: await readingsOf(db, surveyId), context: { conditions: null, meter: null, meterProfileId: null } })
    .returning({ id: attempts.id });
  return { attemptId: row.id, surveyId, readingId };
}

async function commentOn(attemptId: number, authorId: number): Promise<number> {
  const env = await apiEnv();
  const [row] = await env.database.db.insert(readingComments).values({ attemptId, testPointKey: 'tp-r2', authorId, text: 'Which range?' }).returning({ id: readingComments.id });
  return row.id;
}

export const ATTEMPT_REQUESTS: Record<string, MatrixRequest> = {
  'GET /api/assignments/:id': async (a, h, ownerId) => a.get(`/api/assignments/${(await classWorkFor(ownerId)).assignmentId}`).set(h),
  'POST /api/assignments/:id/survey': async (a, h, ownerId) => a.post(`/api/assignments/${(await classWorkFor(ownerId)).assignmentId}/survey`).set(h).send({}),
  'POST /api/surveys/:id/submit': async (a, h, ownerId) => a.post(`/api/surveys/${await draftWithReading(await classWorkFor(ownerId))}/submit`).set(h),
  'GET /api/assignments/:id/attempts': async (a, h, ownerId) => {
    const w = await classWorkFor(ownerId);
    await submittedAttempt(w);
    return a.get(`/api/assignments/${w.assignmentId}/attempts`).set(h);
  },
  'GET /api/attempts/:id/review': async (a, h, ownerId) => a.get(`/api/attempts/${(await submittedAttempt(await classWorkFor(ownerId))).attemptId}/review`).set(h),
  'POST /api/attempts/:id/comments': async (a, h, ownerId) => {
    const t = await submittedAttempt(await classWorkFor(ownerId));
    return a.post(`/api/attempts/${t.attemptId}/comments`).set(h).send({ testPointKey: 'tp-r2', readingId: t.readingId, text: 'Which range did you read this on?' });
  },
  'DELETE /api/attempts/:id/comments/:commentId': async (a, h, ownerId) => {
    const w = await classWorkFor(ownerId);
    const t = await submittedAttempt(w);
    return a.delete(`/api/attempts/${t.attemptId}/comments/${await commentOn(t.attemptId, w.instructorId)}`).set(h);
  },
  'POST /api/attempts/:id/review': async (a, h, ownerId) => {
    const t = await submittedAttempt(await classWorkFor(ownerId));
    return a.post(`/api/attempts/${t.attemptId}/review`).set(h).send({ decision: 'returned', score: 40, comment: 'Re-measure R2.', remeasureKeys: ['tp-r2'] });
  },
  'GET /api/classes/:id/results': async (a, h, ownerId) => {
    const w = await classWorkFor(ownerId);
    await submittedAttempt(w);
    return a.get(`/api/classes/${w.classId}/results`).set(h);
  },
  'GET /api/classes/:id/results.csv': async (a, h, ownerId) => a.get(`/api/classes/${(await classWorkFor(ownerId)).classId}/results.csv`).set(h),
};

/** A write of the instructor of a fresh class (`o`) on a submitted attempt of its student. */
const onAttempt = (suffix: string, body: (t: { readingId: number }) => Record<string, unknown>, optional: string[], accepts: string[]) =>
  owned(
    'post',
    async (o) => {
      const t = await submittedAttempt(await classWorkFor(o.user.id));
      return { path: `/api/attempts/${t.attemptId}${suffix}`, body: body(t) };
    },
    optional,
    accepts,
    ['instructor'],
  );

export const ATTEMPT_BAD_INPUT: Record<string, WriteRoute> = {
  'POST /api/assignments/:id/survey': owned(
    'post',
    async (o) => {
      const w = await classWorkFor(o.user.id);
      return { path: `/api/assignments/${w.assignmentId}/survey`, body: { meterProfileId: (await makeMeterProfile({ ownerId: o.user.id })).id } };
    },
    ['meterProfileId'],
    // No meter is a survey too (the student chooses one later).
    ['an empty object'],
    ['student'],
  ),
  'POST /api/attempts/:id/comments': onAttempt(
    '/comments',
    (t) => ({ testPointKey: 'tp-r2', readingId: t.readingId, text: 'Which range did you read this on?' }),
    ['readingId'],
    // null: a comment on the test point, not one reading; the text is free text (stored, never run).
    ['readingId as null', 'text with SQL injection'],
  ),
  'POST /api/attempts/:id/review': onAttempt(
    '/review',
    () => ({ decision: 'returned', score: 40, comment: 'R2 far low: re-measure it.', remeasureKeys: ['tp-r2'] }),
    ['comment', 'remeasureKeys'],
    // A review without a score; an empty or SQL-looking comment is free text.
    ['score as null', 'comment empty', 'comment with SQL injection'],
  ),
};
