/**
 * Classes (issue #6 item 1–2): an instructor's classes, students and invitations (a single-use,
 * hashed, expiring link mailed through the outbox; accept makes a student account, join takes a
 * signed-in account of the invited address), assignments on a training set. Someone else's class
 * is a 404; a student sees the class without its roster; each refusal stands beside its twin.
 */
import { createHash } from 'node:crypto';
import { and, eq, sql } from 'drizzle-orm';
import request from 'supertest';
import { classInvitations, classMembers, dueReminders, notifications, users } from '../../schema/index';
import type { AssignmentDetail, ClassDetail, ClassSummary } from '../../api/domain/class-format';
import { apiEnv, bearer, makeUser, signIn, uniqueEmail, userSession, type Session } from '../support/api-env';
import { makeSet, makeSurvey } from '../support/bench-fixtures';
import { addStudent, makeAssignment, makeClass, makeClassInvitation, makeClassSurvey } from '../support/class-fixtures';
import { makeTemplate } from '../support/template-fixtures';
import { addDays } from '../support/time';

/** The token at the end of the /join/ link in a captured mail. */
function joinToken(text: string): string {
  const m = text.match(/http:\/\/driftmark\.test\/join\/([A-Za-z0-9_-]+)/);
  if (!m) throw new Error(`no /join/ link in mail:\n${text}`);
  return m[1];
}

async function sessionOf(id: number): Promise<Session> {
  const env = await apiEnv();
  const [u] = await env.database.db.select({ email: users.email }).from(users).where(eq(users.id, id));
  return signIn(u.email);
}

async function memberRow(classId: number, studentId: number) {
  const env = await apiEnv();
  const [m] = await env.database.db.select().from(classMembers).where(and(eq(classMembers.classId, classId), eq(classMembers.studentId, studentId)));
  return m;
}

describe('Classes', () => {
  let instructor: Session;
  let otherInstructor: Session;
  let admin: Session;
  beforeAll(async () => {
    instructor = await userSession(['instructor']);
    otherInstructor = await userSession(['instructor']);
    admin = await userSession(['admin']);
  });

  it('an instructor creates a class (201, ClassDetail, myRole instructor); a technician is refused 403 and nothing is stored', async () => {
    const env = await apiEnv();
    const tech = await userSession(['technician']);
    const refused = await request(env.app).post('/api/classes').set(bearer(tech)).send({ name: 'Not mine to teach' });
    expect(refused.status).toBe(403);
    const count = async () => (await env.database.db.execute<{ n: number }>(sql`SELECT count(*)::int AS n FROM classes WHERE name = 'Not mine to teach'`)).rows[0].n;
    expect(await count()).toBe(0);

    const r = await request(env.app).post('/api/classes').set(bearer(instructor)).send({ name: '  Tuesday bench group ', term: 'Autumn 2027' });
    expect(r.status).withContext(JSON.stringify(r.body)).toBe(201);
    const c = r.body as ClassDetail;
    expect(c.name).toBe('Tuesday bench group');
    expect(c.term).toBe('Autumn 2027');
    expect(c.instructor).toEqual({ id: instructor.user.id, name: instructor.user.name });
    expect(c.myRole).toBe('instructor');
    expect(c.studentCount).toBe(0);
    expect(c.assignmentCount).toBe(0);
    expect(c.archived).toBeFalse();
    expect(c.students).toEqual([]);
    expect(c.invitations).toEqual([]);
    expect(c.assignments).toEqual([]);
  });

  it("lists the caller's classes: taught, joined (current only), every class for an admin; never someone else's", async () => {
    const env = await apiEnv();
    const mine = await makeClass({ instructorId: instructor.user.id, name: 'Listed A' });
    const theirs = await makeClass({ instructorId: otherInstructor.user.id, name: 'Listed B' });
    const student = await userSession(['student']);
    await addStudent(theirs.id, student.user.id);
    const removedFrom = await makeClass({ instructorId: otherInstructor.user.id, name: 'Listed C' });
    await addStudent(removedFrom.id, student.user.id, { removed: true });

    const ids = (body: { items: ClassSummary[] }) => body.items.map((c) => c.id);
    const byInstructor = await request(env.app).get('/api/classes').set(bearer(instructor));
    expect(byInstructor.status).toBe(200);
    expect(ids(byInstructor.body)).toContain(mine.id);
    expect(ids(byInstructor.body)).not.toContain(theirs.id);

    const byStudent = await request(env.app).get('/api/classes').set(bearer(student));
    expect(ids(byStudent.body)).toEqual([theirs.id]);
    const seen = (byStudent.body.items as ClassSummary[])[0];
    expect(seen.myRole).toBe('student');
    expect(seen.studentCount).toBe(1);
    expect(seen.instructor.id).toBe(otherInstructor.user.id);

    const byAdmin = await request(env.app).get('/api/classes').set(bearer(admin));
    const a = (byAdmin.body.items as ClassSummary[]).filter((c) => [mine.id, theirs.id, removedFrom.id].includes(c.id));
    expect(a.length).toBe(3);
    expect(a.every((c) => c.myRole === 'admin')).toBeTrue();
  });

  it('GET a class: the instructor and an admin see roster and invitations; a student sees assignments with their own status only; others 404', async () => {
    const env = await apiEnv();
    const c = await makeClass({ instructorId: instructor.user.id, name: 'Roster check' });
    const s1 = await userSession(['student']);
    const s2 = await addStudent(c.id);
    await addStudent(c.id, s1.user.id);
    const gone = await addStudent(c.id, undefined, { removed: true });
    await makeClassInvitation(c.id, { email: 'roster-invitee@spec.example' });
    const a = await makeAssignment({ classId: c.id, title: 'First pass' });
    const survey = await makeClassSurvey(a.id, s1.user.id, { state: 'submitted' });

    const full = await request(env.app).get(`/api/classes/${c.id}`).set(bearer(instructor));
    expect(full.status).toBe(200);
    const d = full.body as ClassDetail;
    expect(d.studentCount).toBe(2);
    expect(d.students.map((s) => s.student.id)).toEqual(jasmine.arrayWithExactContents([s1.user.id, s2, gone]));
    expect(d.students.find((s) => s.student.id === gone)!.removedAt).not.toBeNull();
    expect(d.students.find((s) => s.student.id === s1.user.id)!.student.email).toBe(s1.user.email);
    expect(d.invitations.map((i) => [i.email, i.state])).toEqual([['roster-invitee@spec.example', 'open']]);
    expect(d.assignments.length).toBe(1);
    expect(d.assignments[0]).toEqual(jasmine.objectContaining({ id: a.id, title: 'First pass', awaitingReview: 1, myStatus: null, mySurveyId: null, setId: a.setId, versionNumber: 1 }));

    const asStudent = await request(env.app).get(`/api/classes/${c.id}`).set(bearer(s1));
    expect(asStudent.status).toBe(200);
    expect(asStudent.body.myRole).toBe('student');
    expect(asStudent.body.students).toEqual([]);
    expect(asStudent.body.invitations).toEqual([]);
    expect(asStudent.body.assignments[0]).toEqual(jasmine.objectContaining({ id: a.id, awaitingReview: null, myStatus: 'submitted', mySurveyId: survey }));
    expect(JSON.stringify(asStudent.body)).not.toContain('roster-invitee');

    const other = await request(env.app).get(`/api/classes/${c.id}`).set(bearer(await sessionOf(s2)));
    expect(other.body.assignments[0].myStatus).toBe('not-started');
    expect(other.body.assignments[0].mySurveyId).toBeNull();

    expect((await request(env.app).get(`/api/classes/${c.id}`).set(bearer(admin))).body.students.length).toBe(3);
    for (const who of [otherInstructor, await sessionOf(gone), await userSession(['student'])]) {
      const r = await request(env.app).get(`/api/classes/${c.id}`).set(bearer(who));
      expect(r.status).withContext(who.user.email).toBe(404);
      expect(r.body.error.code).toBe('not-found');
    }
    expect((await request(env.app).get('/api/classes/2147483000').set(bearer(instructor))).status).toBe(404);
  });

  it('PATCH a class: its instructor renames and archives it (archived last in the list); a student and an admin 403, another instructor 404', async () => {
    const env = await apiEnv();
    const c = await makeClass({ instructorId: instructor.user.id, name: 'Before rename' });
    const student = await userSession(['student']);
    await addStudent(c.id, student.user.id);
    const s = await request(env.app).patch(`/api/classes/${c.id}`).set(bearer(student)).send({ name: 'Student rename' });
    expect(s.status).toBe(403);
    expect((await request(env.app).patch(`/api/classes/${c.id}`).set(bearer(admin)).send({ name: 'Admin rename' })).status).toBe(403);
    expect((await request(env.app).patch(`/api/classes/${c.id}`).set(bearer(otherInstructor)).send({ name: 'Other rename' })).status).toBe(404);
    expect((await request(env.app).get(`/api/classes/${c.id}`).set(bearer(instructor))).body.name).toBe('Before rename');

    const r = await request(env.app).patch(`/api/classes/${c.id}`).set(bearer(instructor)).send({ name: 'After rename', archived: true });
    expect(r.status).toBe(200);
    expect(r.body.name).toBe('After rename');
    expect(r.body.archived).toBeTrue();
    const fresh = await makeClass({ instructorId: instructor.user.id, name: 'Newer current' });
    const list = (await request(env.app).get('/api/classes').set(bearer(instructor))).body.items as ClassSummary[];
    expect(list.findIndex((x) => x.id === fresh.id)).toBeLessThan(list.findIndex((x) => x.id === c.id));
    expect(list.at(-1)!.archived).toBeTrue();

    const back = await request(env.app).patch(`/api/classes/${c.id}`).set(bearer(instructor)).send({ archived: false });
    expect(back.body.archived).toBeFalse();
  });

  describe('invitations', () => {
    it('mails a single-use /join/ link per address; stores only the token’s SHA-256; an existing account also gets an in-app notice without the token', async () => {
      const env = await apiEnv();
      const c = await makeClass({ instructorId: instructor.user.id, name: 'Invite round' });
      const known = await makeUser(['technician'], { name: 'Known Tech' });
      const fresh = uniqueEmail('new-student');
      const r = await request(env.app)
        .post(`/api/classes/${c.id}/invitations`)
        .set(bearer(instructor))
        .send({ emails: [fresh, known.email, fresh.toUpperCase()] });
      expect(r.status).withContext(JSON.stringify(r.body)).toBe(201);
      expect(r.body.items.length).withContext('the same address twice is one invitation').toBe(2);
      expect(r.body.items.every((i: { state: string }) => i.state === 'open')).toBeTrue();
      const expires = new Date(r.body.items[0].expiresAt).getTime();
      expect(Math.round((expires - Date.now()) / 86400_000)).toBe(14);

      const mail = await env.mail.waitFor(fresh, /join the class Invite round/);
      expect(mail.text).toContain(instructor.user.name);
      const token = joinToken(mail.text);
      expect(token.length).toBe(43);
      const rows = await env.database.db.select().from(classInvitations).where(eq(classInvitations.classId, c.id));
      const row = rows.find((x) => x.email === fresh)!;
      expect(row.tokenHash).toBe(createHash('sha256').update(token).digest('hex'));
      expect(JSON.stringify(rows)).not.toContain(token);

      await env.mail.waitFor(known.email, /join the class/);
      const notes = await env.database.db.select().from(notifications).where(eq(notifications.userId, known.id));
      expect(notes.length).toBe(1);
      expect(notes[0].kind).toBe('class-invitation');
      expect(notes[0].body).toContain('Invite round');
      expect(JSON.stringify(notes)).not.toContain(joinToken((await env.mail.waitFor(known.email, /join the class/)).text));
    });

    it('inviting an address again revokes its earlier open link; an address already in the class is a 409 (nothing stored) beside the twin that invites the others', async () => {
      const env = await apiEnv();
      const c = await makeClass({ instructorId: instructor.user.id });
      const first = await makeClassInvitation(c.id, { email: 'again@spec.example' });
      const member = await makeUser(['student']);
      await addStudent(c.id, member.id);
      const before = (await env.database.db.select().from(classInvitations).where(eq(classInvitations.classId, c.id))).length;
      const refused = await request(env.app).post(`/api/classes/${c.id}/invitations`).set(bearer(instructor)).send({ emails: ['again@spec.example', member.email] });
      expect(refused.status).toBe(409);
      expect(refused.body.error.code).toBe('already-member');
      expect(refused.body.error.details.emails).toEqual([member.email]);
      expect((await env.database.db.select().from(classInvitations).where(eq(classInvitations.classId, c.id))).length).toBe(before);
      expect((await request(env.app).get(`/api/class-invitations/${first.token}`)).body.state).toBe('open');

      const ok = await request(env.app).post(`/api/classes/${c.id}/invitations`).set(bearer(instructor)).send({ emails: ['Again@spec.example'] });
      expect(ok.status).toBe(201);
      expect((await request(env.app).get(`/api/class-invitations/${first.token}`)).body.state).toBe('revoked');
    });

    it("someone else's class: inviting is a 404 for another instructor, a 403 for its student; the instructor's twin succeeds", async () => {
      const env = await apiEnv();
      const c = await makeClass({ instructorId: instructor.user.id });
      const student = await userSession(['student']);
      await addStudent(c.id, student.user.id);
      const body = { emails: [uniqueEmail('x')] };
      expect((await request(env.app).post(`/api/classes/${c.id}/invitations`).set(bearer(otherInstructor)).send(body)).status).toBe(404);
      expect((await request(env.app).post(`/api/classes/${c.id}/invitations`).set(bearer(student)).send(body)).status).toBe(403);
      expect((await env.database.db.select().from(classInvitations).where(eq(classInvitations.classId, c.id))).length).toBe(0);
      expect((await request(env.app).post(`/api/classes/${c.id}/invitations`).set(bearer(instructor)).send(body)).status).toBe(201);
    });

    it('previews a link (public): class, instructor, address, state, whether an account exists; an unknown token is a 404', async () => {
      const env = await apiEnv();
      const c = await makeClass({ instructorId: instructor.user.id, name: 'Preview class', term: 'Winter 2028' });
      const known = await makeUser(['technician']);
      const a = await makeClassInvitation(c.id);
      const b = await makeClassInvitation(c.id, { email: known.email.toUpperCase() });
      const p = await request(env.app).get(`/api/class-invitations/${a.token}`);
      expect(p.status).toBe(200);
      expect(p.body).toEqual({ className: 'Preview class', term: 'Winter 2028', instructorName: instructor.user.name, email: a.email, state: 'open', accountExists: false });
      expect((await request(env.app).get(`/api/class-invitations/${b.token}`)).body.accountExists).toBeTrue();
      const expired = await makeClassInvitation(c.id, { expired: true });
      expect((await request(env.app).get(`/api/class-invitations/${expired.token}`)).body.state).toBe('expired');
      const unknown = await request(env.app).get(`/api/class-invitations/${'A'.repeat(43)}`);
      expect(unknown.status).toBe(404);
      expect(unknown.body.error.code).toBe('invalid-token');
    });

    it('accept (public) makes a student account of the invited address, joins it and answers like sign-in; the link then works no more', async () => {
      const env = await apiEnv();
      const c = await makeClass({ instructorId: instructor.user.id, name: 'Accept class' });
      const inv = await makeClassInvitation(c.id);
      const r = await request(env.app).post(`/api/class-invitations/${inv.token}/accept`).send({ name: 'Wren Aldous', password: 'chosen-password-7' });
      expect(r.status).withContext(JSON.stringify(r.body)).toBe(201);
      expect(r.body.user).toEqual(jasmine.objectContaining({ email: inv.email, name: 'Wren Aldous', roles: ['student'] }));
      expect(r.body.classId).toBe(c.id);
      expect(typeof r.body.refreshToken).toBe('string');
      const me = await request(env.app).get('/api/me').set(bearer(r.body));
      expect(me.body.id).toBe(r.body.user.id);
      const listed = await request(env.app).get('/api/classes').set(bearer(r.body));
      expect(listed.body.items.map((x: ClassSummary) => x.id)).toEqual([c.id]);
      expect((await signIn(inv.email, 'chosen-password-7')).user.id).toBe(r.body.user.id);
      const [row] = await env.database.db.select().from(classInvitations).where(eq(classInvitations.id, inv.id));
      expect(row.acceptedUserId).toBe(r.body.user.id);

      const twice = await request(env.app).post(`/api/class-invitations/${inv.token}/accept`).send({ name: 'Someone Else', password: 'chosen-password-8' });
      expect(twice.status).toBe(409);
      expect(twice.body.error.code).toBe('invitation-not-open');
      expect((await request(env.app).get(`/api/class-invitations/${inv.token}`)).body.state).toBe('accepted');
    });

    it('accept refuses an address that has an account (409 "sign in and join"), creating nothing; join is its twin', async () => {
      const env = await apiEnv();
      const c = await makeClass({ instructorId: instructor.user.id });
      const tech = await userSession(['technician']);
      const inv = await makeClassInvitation(c.id, { email: tech.user.email });
      const r = await request(env.app).post(`/api/class-invitations/${inv.token}/accept`).send({ name: 'Second Account', password: 'chosen-password-7' });
      expect(r.status).toBe(409);
      expect(r.body.error.code).toBe('email-taken');
      expect(r.body.error.message).toMatch(/sign in/i);
      expect(await memberRow(c.id, tech.user.id)).toBeUndefined();

      const j = await request(env.app).post(`/api/class-invitations/${inv.token}/join`).set(bearer(tech)).send({});
      expect(j.status).withContext(JSON.stringify(j.body)).toBe(200);
      expect(j.body.classId).toBe(c.id);
      expect(j.body.user.roles).toEqual(['technician', 'student']);
      expect((await memberRow(c.id, tech.user.id)).removedAt).toBeNull();
      // The session goes on (roles are read from the account on each request).
      expect((await request(env.app).get(`/api/classes/${c.id}`).set(bearer(tech))).body.myRole).toBe('student');
    });

    it('join refuses an account of another address with 403 and a clear message (nothing changed); the invited account joins', async () => {
      const env = await apiEnv();
      const c = await makeClass({ instructorId: instructor.user.id });
      const invited = await userSession(['student']);
      const intruder = await userSession(['student']);
      const inv = await makeClassInvitation(c.id, { email: invited.user.email });
      const r = await request(env.app).post(`/api/class-invitations/${inv.token}/join`).set(bearer(intruder)).send({});
      expect(r.status).toBe(403);
      expect(r.body.error.code).toBe('invitation-email-mismatch');
      expect(r.body.error.message).toContain(invited.user.email);
      expect(r.body.error.message).toContain(intruder.user.email);
      expect(await memberRow(c.id, intruder.user.id)).toBeUndefined();
      expect((await request(env.app).get(`/api/class-invitations/${inv.token}`)).body.state).toBe('open');

      // The join takes no fields (it is not in the bad-input table: an empty body is its valid request).
      for (const bad of [{ classId: c.id }, [], { roles: ['admin'] }]) {
        const r2 = await request(env.app).post(`/api/class-invitations/${inv.token}/join`).set(bearer(invited)).send(bad);
        expect(r2.status).withContext(JSON.stringify(bad)).toBe(400);
        expect(r2.body.error.code).toBe('validation');
      }
      expect(await memberRow(c.id, invited.user.id)).toBeUndefined();

      const ok = await request(env.app).post(`/api/class-invitations/${inv.token}/join`).set(bearer(invited)).send({});
      expect(ok.status).toBe(200);
      expect(ok.body.user.roles).toEqual(['student']);
      expect(await memberRow(c.id, invited.user.id)).toBeDefined();
      const again = await request(env.app).post(`/api/class-invitations/${inv.token}/join`).set(bearer(invited)).send({});
      expect(again.status).withContext('single use').toBe(409);
    });

    it('join: an expired or revoked link is a 409; a removed student joins again with a new link (removal cleared); anonymous is a 401', async () => {
      const env = await apiEnv();
      const c = await makeClass({ instructorId: instructor.user.id });
      const s = await userSession(['student']);
      await addStudent(c.id, s.user.id, { removed: true });
      for (const opts of [{ expired: true }, { revoked: true }]) {
        const inv = await makeClassInvitation(c.id, { email: s.user.email, ...opts });
        const r = await request(env.app).post(`/api/class-invitations/${inv.token}/join`).set(bearer(s)).send({});
        expect(r.status).withContext(JSON.stringify(opts)).toBe(409);
        expect(r.body.error.details.state).toBe(opts.expired ? 'expired' : 'revoked');
      }
      expect((await memberRow(c.id, s.user.id)).removedAt).not.toBeNull();
      const inv = await makeClassInvitation(c.id, { email: s.user.email });
      expect((await request(env.app).post(`/api/class-invitations/${inv.token}/join`).send({})).status).toBe(401);
      const ok = await request(env.app).post(`/api/class-invitations/${inv.token}/join`).set(bearer(s)).send({});
      expect(ok.status).toBe(200);
      expect((await memberRow(c.id, s.user.id)).removedAt).toBeNull();
    });

    it('revoke: an open invitation stops working (204); revoking it again is a 409; another class’s invitation id is a 404', async () => {
      const env = await apiEnv();
      const c = await makeClass({ instructorId: instructor.user.id });
      const elsewhere = await makeClass({ instructorId: instructor.user.id });
      const inv = await makeClassInvitation(c.id);
      const foreign = await makeClassInvitation(elsewhere.id);
      expect((await request(env.app).delete(`/api/classes/${c.id}/invitations/${foreign.id}`).set(bearer(instructor))).status).toBe(404);
      expect((await request(env.app).delete(`/api/classes/${c.id}/invitations/${inv.id}`).set(bearer(otherInstructor))).status).toBe(404);
      expect((await request(env.app).get(`/api/class-invitations/${inv.token}`)).body.state).toBe('open');
      expect((await request(env.app).delete(`/api/classes/${c.id}/invitations/${inv.id}`).set(bearer(instructor))).status).toBe(204);
      expect((await request(env.app).get(`/api/class-invitations/${inv.token}`)).body.state).toBe('revoked');
      const again = await request(env.app).delete(`/api/classes/${c.id}/invitations/${inv.id}`).set(bearer(instructor));
      expect(again.status).toBe(409);
      expect(again.body.error.code).toBe('invitation-not-open');
      const accept = await request(env.app).post(`/api/class-invitations/${inv.token}/accept`).send({ name: 'Too Late', password: 'chosen-password-9' });
      expect(accept.status).toBe(409);
    });
  });

  it('removes a student: the class becomes a 404 for them, the roster keeps them as removed; a stranger’s id is a 404; another instructor 404', async () => {
    const env = await apiEnv();
    const c = await makeClass({ instructorId: instructor.user.id });
    const s = await userSession(['student']);
    await addStudent(c.id, s.user.id);
    expect((await request(env.app).delete(`/api/classes/${c.id}/students/${s.user.id}`).set(bearer(otherInstructor))).status).toBe(404);
    expect((await request(env.app).delete(`/api/classes/${c.id}/students/${s.user.id}`).set(bearer(s))).status).toBe(403);
    expect((await request(env.app).get(`/api/classes/${c.id}`).set(bearer(s))).status).toBe(200);
    const stranger = await makeUser(['student']);
    expect((await request(env.app).delete(`/api/classes/${c.id}/students/${stranger.id}`).set(bearer(instructor))).status).toBe(404);

    expect((await request(env.app).delete(`/api/classes/${c.id}/students/${s.user.id}`).set(bearer(instructor))).status).toBe(204);
    expect((await request(env.app).get(`/api/classes/${c.id}`).set(bearer(s))).status).toBe(404);
    const d = (await request(env.app).get(`/api/classes/${c.id}`).set(bearer(instructor))).body as ClassDetail;
    expect(d.studentCount).toBe(0);
    expect(d.students[0].removedAt).not.toBeNull();
    const row = await memberRow(c.id, s.user.id);
    expect(row.removedBy).toBe(instructor.user.id);
  });

  describe('assignments', () => {
    /** A class of the instructor's with one student and a training set (with a complete reference survey) of the instructor's. */
    async function bench() {
      const c = await makeClass({ instructorId: instructor.user.id });
      const student = await userSession(['student']);
      await addStudent(c.id, student.user.id);
      const set = await makeSet({ ownerId: instructor.user.id, label: 'Training chassis 3' });
      const reference = await makeSurvey({ setId: set.id, state: 'complete' });
      const body = {
        title: 'Survey the audio stage',
        instructions: 'Discharge first. Then R1 and R2 in circuit.',
        templateId: set.templateId,
        versionNumber: 1,
        setId: set.id,
        dueAt: addDays(new Date(), 5).toISOString(),
        referenceSurveyId: reference.id,
        predictFirst: true,
        showVerdicts: false,
      };
      return { c, student, set, reference, body };
    }

    it('the instructor assigns a published version on their training set with a reference survey (201, AssignmentDetail with the queue)', async () => {
      const env = await apiEnv();
      const { c, student, set, reference, body } = await bench();
      const r = await request(env.app).post(`/api/classes/${c.id}/assignments`).set(bearer(instructor)).send(body);
      expect(r.status).withContext(JSON.stringify(r.body)).toBe(201);
      const a = r.body as AssignmentDetail;
      expect(a).toEqual(
        jasmine.objectContaining({
          classId: c.id,
          title: 'Survey the audio stage',
          instructions: 'Discharge first. Then R1 and R2 in circuit.',
          templateId: set.templateId,
          versionNumber: 1,
          setId: set.id,
          setLabel: 'Training chassis 3',
          referenceSurveyId: reference.id,
          predictFirst: true,
          showVerdicts: false,
          awaitingReview: 0,
          myStatus: null,
          className: 'Bench practice 1',
          myAttempts: [],
        }),
      );
      expect(a.dueAt).toBe(new Date(body.dueAt).toISOString());
      expect(a.rule.decision).toBe('simple');
      expect(a.set).toEqual(jasmine.objectContaining({ id: set.id, label: 'Training chassis 3', serial: 'SN-4471' }));
      expect(a.queue).toEqual([{ student: { id: student.user.id, name: student.user.name }, surveyId: null, status: 'not-started', latestAttempt: null, attemptCount: 0, score: null }]);
      const detail = await request(env.app).get(`/api/classes/${c.id}`).set(bearer(student));
      expect(detail.body.assignments.map((x: { id: number }) => x.id)).toEqual([a.id]);
    });

    it('refuses, storing nothing: a set the instructor cannot edit, a set of another template, an unpublished version, a foreign or class reference, a past due date (400 naming the field)', async () => {
      const env = await apiEnv();
      const { c, body } = await bench();
      const student = await makeUser(['student']);
      const foreignSet = await makeSet();
      const otherTemplateSet = await makeSet({ ownerId: instructor.user.id });
      const foreignRef = await makeSurvey({ setId: otherTemplateSet.id, state: 'complete' });
      const a0 = await makeAssignment({ classId: c.id, setId: body.setId });
      const classSurvey = await makeClassSurvey(a0.id, student.id);
      const cases: [string, Record<string, unknown>, string][] = [
        ['a set of someone else', { setId: foreignSet.id, templateId: foreignSet.templateId }, 'setId'],
        ['a set of another template', { setId: otherTemplateSet.id }, 'setId'],
        ['an unpublished version', { versionNumber: 2 }, 'versionNumber'],
        ['a reference of another set', { referenceSurveyId: foreignRef.id }, 'referenceSurveyId'],
        ["a student's class survey as reference", { referenceSurveyId: classSurvey }, 'referenceSurveyId'],
        ['a due date in the past', { dueAt: addDays(new Date(), -1).toISOString() }, 'dueAt'],
      ];
      const count = async () => (await env.database.db.execute<{ n: number }>(sql`SELECT count(*)::int AS n FROM assignments WHERE class_id = ${c.id}`)).rows[0].n;
      for (const [what, change, field] of cases) {
        const r = await request(env.app).post(`/api/classes/${c.id}/assignments`).set(bearer(instructor)).send({ ...body, ...change });
        expect(r.status).withContext(what).toBe(400);
        expect(r.body.error.details?.field).withContext(what).toBe(field);
      }
      expect(await count()).toBe(1);
      const { referenceSurveyId: _none, ...withoutReference } = body;
      const ok = await request(env.app).post(`/api/classes/${c.id}/assignments`).set(bearer(instructor)).send(withoutReference);
      expect(ok.status).toBe(201);
      expect(ok.body.referenceSurveyId).toBeNull();
      expect(await count()).toBe(2);
    });

    it("someone else's class is a 404 for another instructor; its student gets a 403; an archived class is a 409", async () => {
      const env = await apiEnv();
      const { c, student, body } = await bench();
      expect((await request(env.app).post(`/api/classes/${c.id}/assignments`).set(bearer(otherInstructor)).send(body)).status).toBe(404);
      expect((await request(env.app).post(`/api/classes/${c.id}/assignments`).set(bearer(student)).send(body)).status).toBe(403);
      const archived = await makeClass({ instructorId: instructor.user.id, archived: true });
      expect((await request(env.app).post(`/api/classes/${archived.id}/assignments`).set(bearer(instructor)).send(body)).status).toBe(409);
      expect((await request(env.app).post(`/api/classes/${c.id}/assignments`).set(bearer(instructor)).send(body)).status).toBe(201);
    });

    it('PATCH an assignment: the instructor moves the due date (reminders already sent are forgotten) and changes options; a student 403, another instructor 404', async () => {
      const env = await apiEnv();
      const { c, student, set } = await bench();
      const a = await makeAssignment({ classId: c.id, setId: set.id });
      await env.database.db.insert(dueReminders).values({ assignmentId: a.id, studentId: student.user.id });
      const due = addDays(new Date(), 10).toISOString();
      expect((await request(env.app).patch(`/api/assignments/${a.id}`).set(bearer(student)).send({ dueAt: due })).status).toBe(403);
      expect((await request(env.app).patch(`/api/assignments/${a.id}`).set(bearer(otherInstructor)).send({ dueAt: due })).status).toBe(404);
      expect((await env.database.db.select().from(dueReminders).where(eq(dueReminders.assignmentId, a.id))).length).toBe(1);

      const r = await request(env.app).patch(`/api/assignments/${a.id}`).set(bearer(instructor)).send({ dueAt: due, title: 'Moved', showVerdicts: false });
      expect(r.status).withContext(JSON.stringify(r.body)).toBe(200);
      expect(r.body.dueAt).toBe(due);
      expect(r.body.title).toBe('Moved');
      expect(r.body.showVerdicts).toBeFalse();
      expect(r.body.predictFirst).toBeFalse();
      expect((await env.database.db.select().from(dueReminders).where(eq(dueReminders.assignmentId, a.id))).length).toBe(0);

      const ref = await request(env.app).patch(`/api/assignments/${a.id}`).set(bearer(instructor)).send({ referenceSurveyId: (await makeSurvey()).id });
      expect(ref.status).toBe(400);
      expect(ref.body.error.details.field).toBe('referenceSurveyId');
      const good = await makeSurvey({ setId: set.id, state: 'complete' });
      expect((await request(env.app).patch(`/api/assignments/${a.id}`).set(bearer(instructor)).send({ referenceSurveyId: good.id })).body.referenceSurveyId).toBe(good.id);
    });
  });
});
