/**
 * Access-matrix and bad-input rows of the classes routes: classes, students, invitations,
 * assignments (create and change), competencies and notifications (see ./index.ts).
 *
 * Hand-written expectations. For a class-scoped row, "own" is a class the caller takes part in —
 * a student caller as a current student of it, any other caller as its instructor
 * (classes.instructor_id: the rule is the class's instructor, not the role) — and "others" a class
 * of another user's that the caller has no part in. Someone else's class is a 404 (admins see
 * every class, and get a 403 on another instructor's class); a student of the class gets a 403 on
 * its instructor's writes.
 */
import { eq, sql } from 'drizzle-orm';
import { competencySignoffs, users, type Role } from '../../../schema/index';
import { apiEnv, makeUser, uniqueEmail } from '../../support/api-env';
import { owned, type WriteRoute } from '../../support/bad-input-kit';
import { makeSet, makeSurvey } from '../../support/bench-fixtures';
import { addStudent, makeAssignment, makeClass, makeClassInvitation } from '../../support/class-fixtures';
import { ALL_OK, SIGNED_IN, type Caller, type Expect, type MatrixRequest } from '../../support/matrix-kit';
import { addDays } from '../../support/time';
import { recordNotices } from '../../../api/classes/notify';

/** Reads of a class: whoever takes part (its instructor, its students) and admins; someone else's class a 404. */
const SEE_CLASS: Record<Caller, Expect> = {
  anonymous: 401,
  admin: { own: 'ok', others: 'ok' },
  author: { own: 'ok', others: 404 },
  technician: { own: 'ok', others: 404 },
  instructor: { own: 'ok', others: 404 },
  student: { own: 'ok', others: 404 },
};
/** The instructor's writes: a student of the class 403, an admin on another's class 403, anyone else 404. */
const INSTRUCTOR_WRITES: Record<Caller, Expect> = {
  anonymous: 401,
  admin: { own: 'ok', others: 403 },
  author: { own: 'ok', others: 404 },
  technician: { own: 'ok', others: 404 },
  instructor: { own: 'ok', others: 404 },
  student: { own: 403, others: 404 },
};
/** Creating a class needs the instructor role. */
const MAKE_CLASS: Record<Caller, Expect> = { anonymous: 401, admin: 403, author: 403, technician: 403, instructor: 'ok', student: 403 };
/** Joining with a link: the account of the invited address ("own"); any other account 403 (the address differs). */
const JOIN: Record<Caller, Expect> = {
  anonymous: 401,
  admin: { own: 'ok', others: 403 },
  author: { own: 'ok', others: 403 },
  technician: { own: 'ok', others: 403 },
  instructor: { own: 'ok', others: 403 },
  student: { own: 'ok', others: 403 },
};
/** A competency record: the student themself ("own"), admins; someone unrelated 404 (their instructors: competencies.spec.ts). */
const SEE_RECORD: Record<Caller, Expect> = {
  anonymous: 401,
  admin: { own: 'ok', others: 'ok' },
  author: { own: 'ok', others: 404 },
  technician: { own: 'ok', others: 404 },
  instructor: { own: 'ok', others: 404 },
  student: { own: 'ok', others: 404 },
};
/** Signing off: the instructor role, then a student of one of the caller's classes ("own"); someone else's student 404. */
const SIGN_OFF: Record<Caller, Expect> = { anonymous: 401, admin: 403, author: 403, technician: 403, instructor: { own: 'ok', others: 404 }, student: 403 };
/**
 * Withdrawing: the signer ("own": the instructor signed it) or an admin; a student withdrawing a
 * sign-off of their own record 403; a sign-off the caller cannot see 404.
 */
const WITHDRAW: Record<Caller, Expect> = { anonymous: 401, admin: 'ok', author: 404, technician: 404, instructor: { own: 'ok', others: 404 }, student: { own: 403, others: 404 } };
/** Notifications are personal: someone else's is a 404, for admins too. */
const OWN_NOTICE: Record<Caller, Expect> = {
  anonymous: 401,
  admin: { own: 'ok', others: 404 },
  author: { own: 'ok', others: 404 },
  technician: { own: 'ok', others: 404 },
  instructor: { own: 'ok', others: 404 },
  student: { own: 'ok', others: 404 },
};

export const CLASS_MATRIX: Record<string, Record<Caller, Expect>> = {
  'GET /api/classes': SIGNED_IN,
  'POST /api/classes': MAKE_CLASS,
  'GET /api/classes/:id': SEE_CLASS,
  'PATCH /api/classes/:id': INSTRUCTOR_WRITES,
  'POST /api/classes/:id/invitations': INSTRUCTOR_WRITES,
  'DELETE /api/classes/:id/invitations/:invitationId': INSTRUCTOR_WRITES,
  'DELETE /api/classes/:id/students/:studentId': INSTRUCTOR_WRITES,
  'GET /api/class-invitations/:token': ALL_OK,
  'POST /api/class-invitations/:token/accept': ALL_OK,
  'POST /api/class-invitations/:token/join': JOIN,
  'POST /api/classes/:id/assignments': INSTRUCTOR_WRITES,
  'PATCH /api/assignments/:id': INSTRUCTOR_WRITES,
  'GET /api/competencies': SIGNED_IN,
  'GET /api/students/:id/competencies': SEE_RECORD,
  'POST /api/students/:id/competencies': SIGN_OFF,
  'POST /api/competency-signoffs/:id/withdraw': WITHDRAW,
  'GET /api/notifications': SIGNED_IN,
  'POST /api/notifications/read-all': SIGNED_IN,
  'POST /api/notifications/:id/read': OWN_NOTICE,
};

async function rolesOf(userId: number): Promise<Role[]> {
  const env = await apiEnv();
  const [u] = await env.database.db.select({ roles: users.roles }).from(users).where(eq(users.id, userId));
  return u.roles;
}

/**
 * A class `ownerId` takes part in: a student as a current student (of a fresh instructor's class),
 * anyone else as its instructor. Absent, a fresh instructor's class with no one else in it.
 */
async function classFor(ownerId?: number): Promise<{ id: number; instructorId: number }> {
  if (ownerId === undefined) return makeClass();
  if ((await rolesOf(ownerId)).includes('student')) {
    const c = await makeClass();
    await addStudent(c.id, ownerId);
    return c;
  }
  return makeClass({ instructorId: ownerId });
}

const assignmentBody = (set: { id: number; templateId: number }) => ({
  title: 'Matrix assignment',
  instructions: 'Discharge first.',
  templateId: set.templateId,
  versionNumber: 1,
  setId: set.id,
  dueAt: addDays(new Date(), 3).toISOString(),
  rule: { decision: 'simple', nearLimitFraction: 0.75, bandFrom: 'template' },
  referenceSurveyId: null,
  predictFirst: true,
  showVerdicts: false,
});

/** A sign-off: `signerId` signs for a fresh student of a class of theirs; a fresh instructor when absent. */
async function signoffBy(signerId?: number, studentId?: number): Promise<number> {
  const env = await apiEnv();
  const c = await makeClass(signerId === undefined ? {} : { instructorId: signerId });
  const student = await addStudent(c.id, studentId);
  const [row] = await env.database.db
    .insert(competencySignoffs)
    .values({ studentId: student, competencyKey: 'meter-check', classId: c.id, signedBy: c.instructorId, note: 'Matrix' })
    .returning({ id: competencySignoffs.id });
  return row.id;
}

/** A notification of `userId`'s (a fresh user's when absent). */
async function noticeFor(userId?: number): Promise<number> {
  const env = await apiEnv();
  const id = userId ?? (await makeUser(['student'])).id;
  await recordNotices(env.database.db, [{ userId: id, kind: 'due-soon', title: 'Matrix notice', body: '', link: '/classes', email: null }]);
  const r = await env.database.db.execute<{ id: number }>(sql`SELECT id FROM notifications WHERE user_id = ${id} ORDER BY id DESC LIMIT 1`);
  return r.rows[0].id;
}

export const CLASS_REQUESTS: Record<string, MatrixRequest> = {
  'GET /api/classes': async (a, h) => a.get('/api/classes').set(h),
  'POST /api/classes': async (a, h) => a.post('/api/classes').set(h).send({ name: 'Matrix class', term: 'Spring 2027' }),
  'GET /api/classes/:id': async (a, h, ownerId) => a.get(`/api/classes/${(await classFor(ownerId)).id}`).set(h),
  'PATCH /api/classes/:id': async (a, h, ownerId) => a.patch(`/api/classes/${(await classFor(ownerId)).id}`).set(h).send({ term: 'Autumn 2027' }),
  'POST /api/classes/:id/invitations': async (a, h, ownerId) =>
    a
      .post(`/api/classes/${(await classFor(ownerId)).id}/invitations`)
      .set(h)
      .send({ emails: [uniqueEmail('matrix-invitee')] }),
  'DELETE /api/classes/:id/invitations/:invitationId': async (a, h, ownerId) => {
    const c = await classFor(ownerId);
    return a.delete(`/api/classes/${c.id}/invitations/${(await makeClassInvitation(c.id)).id}`).set(h);
  },
  'DELETE /api/classes/:id/students/:studentId': async (a, h, ownerId) => {
    const c = await classFor(ownerId);
    return a.delete(`/api/classes/${c.id}/students/${await addStudent(c.id)}`).set(h);
  },
  'GET /api/class-invitations/:token': async (a, h) => a.get(`/api/class-invitations/${(await makeClassInvitation((await makeClass()).id)).token}`).set(h),
  'POST /api/class-invitations/:token/accept': async (a, h) =>
    a
      .post(`/api/class-invitations/${(await makeClassInvitation((await makeClass()).id)).token}/accept`)
      .set(h)
      .send({ name: 'Matrix Student', password: 'chosen-password-1' }),
  'POST /api/class-invitations/:token/join': async (a, h, ownerId) => {
    const env = await apiEnv();
    const who = ownerId ?? (await makeUser(['technician'])).id;
    const [u] = await env.database.db.select({ email: users.email, roles: users.roles }).from(users).where(eq(users.id, who));
    const inv = await makeClassInvitation((await makeClass()).id, { email: u.email });
    const r = await a.post(`/api/class-invitations/${inv.token}/join`).set(h).send({});
    // Joining adds the student role: the matrix's callers keep the roles they are named for.
    await env.database.db.update(users).set({ roles: u.roles }).where(eq(users.id, who));
    return r;
  },
  'POST /api/classes/:id/assignments': async (a, h, ownerId) => {
    const c = await classFor(ownerId);
    const set = await makeSet({ ownerId: c.instructorId });
    return a.post(`/api/classes/${c.id}/assignments`).set(h).send(assignmentBody(set));
  },
  'PATCH /api/assignments/:id': async (a, h, ownerId) => {
    const c = await classFor(ownerId);
    return a
      .patch(`/api/assignments/${(await makeAssignment({ classId: c.id })).id}`)
      .set(h)
      .send({ dueAt: addDays(new Date(), 9).toISOString(), showVerdicts: false });
  },
  'GET /api/competencies': async (a, h) => a.get('/api/competencies').set(h),
  'GET /api/students/:id/competencies': async (a, h, ownerId) => {
    const id = ownerId ?? (await makeUser(['student'])).id;
    await signoffBy(undefined, id);
    return a.get(`/api/students/${id}/competencies`).set(h);
  },
  'POST /api/students/:id/competencies': async (a, h, ownerId) => {
    const c = ownerId === undefined ? await makeClass() : await makeClass({ instructorId: ownerId });
    return a.post(`/api/students/${await addStudent(c.id)}/competencies`).set(h).send({ competencyKey: 'measures-in-circuit', classId: c.id, note: 'Matrix' });
  },
  'POST /api/competency-signoffs/:id/withdraw': async (a, h, ownerId) => {
    let id: number;
    if (ownerId === undefined) id = await signoffBy();
    else if ((await rolesOf(ownerId)).includes('student')) id = await signoffBy(undefined, ownerId);
    else id = await signoffBy(ownerId);
    return a.post(`/api/competency-signoffs/${id}/withdraw`).set(h).send({ note: 'Matrix withdrawal' });
  },
  'GET /api/notifications': async (a, h) => a.get('/api/notifications').set(h),
  'POST /api/notifications/read-all': async (a, h) => a.post('/api/notifications/read-all').set(h),
  'POST /api/notifications/:id/read': async (a, h, ownerId) => a.post(`/api/notifications/${await noticeFor(ownerId)}/read`).set(h),
};

const INSTRUCTOR = ['instructor'] as const;

export const CLASS_BAD_INPUT: Record<string, WriteRoute> = {
  'POST /api/classes': owned('post', async () => ({ path: '/api/classes', body: { name: 'Bad input class', term: 'Spring 2027' } }), ['term'], ['term empty', 'term with SQL injection'], [...INSTRUCTOR]),
  'PATCH /api/classes/:id': owned(
    'patch',
    async (o) => ({ path: `/api/classes/${(await makeClass({ instructorId: o.user.id })).id}`, body: { name: 'Renamed class', term: 'Autumn 2027', archived: true } }),
    ['name', 'term', 'archived'],
    ['term empty', 'term with SQL injection'],
    [...INSTRUCTOR],
  ),
  'POST /api/classes/:id/invitations': owned(
    'post',
    async (o) => ({ path: `/api/classes/${(await makeClass({ instructorId: o.user.id })).id}/invitations`, body: { emails: [uniqueEmail('bad-input-invitee')] } }),
    undefined,
    undefined,
    [...INSTRUCTOR],
  ),
  'POST /api/class-invitations/:token/accept': {
    method: 'post',
    path: async () => `/api/class-invitations/${(await makeClassInvitation((await makeClass()).id)).token}/accept`,
    valid: async () => ({ name: 'Bad Input Student', password: 'chosen-password-1' }),
    auth: 'none',
  },
  'POST /api/classes/:id/assignments': owned(
    'post',
    async (o) => {
      const c = await makeClass({ instructorId: o.user.id });
      const set = await makeSet({ ownerId: o.user.id });
      const reference = await makeSurvey({ setId: set.id, state: 'complete' });
      return { path: `/api/classes/${c.id}/assignments`, body: { ...assignmentBody(set), referenceSurveyId: reference.id } };
    },
    ['instructions', 'rule', 'referenceSurveyId', 'predictFirst', 'showVerdicts'],
    ['instructions empty', 'referenceSurveyId as null', 'title with SQL injection', 'instructions with SQL injection'],
    [...INSTRUCTOR],
  ),
  'PATCH /api/assignments/:id': owned(
    'patch',
    async (o) => {
      const a = await makeAssignment({ classId: (await makeClass({ instructorId: o.user.id })).id });
      const reference = await makeSurvey({ setId: a.setId, state: 'complete' });
      return {
        path: `/api/assignments/${a.id}`,
        body: { title: 'Moved assignment', instructions: 'Re-read R2.', dueAt: addDays(new Date(), 12).toISOString(), referenceSurveyId: reference.id, predictFirst: false, showVerdicts: true },
      };
    },
    ['title', 'instructions', 'dueAt', 'referenceSurveyId', 'predictFirst', 'showVerdicts'],
    ['instructions empty', 'referenceSurveyId as null', 'title with SQL injection', 'instructions with SQL injection'],
    [...INSTRUCTOR],
  ),
  'POST /api/students/:id/competencies': owned(
    'post',
    async (o) => {
      const c = await makeClass({ instructorId: o.user.id });
      return { path: `/api/students/${await addStudent(c.id)}/competencies`, body: { competencyKey: 'isolation-and-hot-chassis', classId: c.id, note: 'Used the isolation transformer.' } };
    },
    ['classId', 'note'],
    ['note empty'],
    [...INSTRUCTOR],
  ),
  'POST /api/competency-signoffs/:id/withdraw': owned(
    'post',
    async (o) => ({ path: `/api/competency-signoffs/${await signoffBy(o.user.id)}/withdraw`, body: { note: 'Signed off too early.' } }),
    undefined,
    undefined,
    [...INSTRUCTOR],
  ),
};
