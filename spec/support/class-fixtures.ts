/**
 * Class rows for the API specs (classes, members, invitations, assignments, class surveys),
 * inserted directly into the database: fast, and independent of the routes under test. The
 * training set behind an assignment is a bench-fixtures set (the sample chassis of
 * ./template-fixtures: test points `tp-r1`, `tp-r2`, `tp-v1p`) owned by the class's instructor.
 */
import { and, eq } from 'drizzle-orm';
import { hashToken, newOpaqueToken } from '../../api/auth/tokens';
import { DEFAULT_RULE, type AcceptanceRule } from '../../api/domain/verdict';
import type { SurveyState } from '../../api/domain/words';
import { assignments, classInvitations, classMembers, classes, sets, surveys, templateVersions } from '../../schema/index';
import { apiEnv, makeUser, uniqueEmail } from './api-env';
import { makeSet, makeSurvey, SAMPLE_CONDITIONS } from './bench-fixtures';
import { addDays } from './time';

export interface MadeClass {
  id: number;
  instructorId: number;
}

/** A class of `instructorId` (a fresh instructor when absent). */
export async function makeClass(opts: { instructorId?: number; name?: string; term?: string; archived?: boolean } = {}): Promise<MadeClass> {
  const env = await apiEnv();
  const instructorId = opts.instructorId ?? (await makeUser(['instructor'], { name: 'Spec Instructor' })).id;
  const [row] = await env.database.db
    .insert(classes)
    .values({ instructorId, name: opts.name ?? 'Bench practice 1', term: opts.term ?? 'Spring 2027', archivedAt: opts.archived ? new Date() : null })
    .returning({ id: classes.id });
  return { id: row.id, instructorId };
}

/**
 * Puts a student in a class (a fresh student when `studentId` is absent); `removed` marks them
 * removed. Returns the student's id.
 */
export async function addStudent(classId: number, studentId?: number, opts: { removed?: boolean } = {}): Promise<number> {
  const env = await apiEnv();
  const id = studentId ?? (await makeUser(['student'], { name: 'Spec Student' })).id;
  await env.database.db
    .insert(classMembers)
    .values({ classId, studentId: id, removedAt: opts.removed ? new Date() : null })
    .onConflictDoUpdate({ target: [classMembers.classId, classMembers.studentId], set: { removedAt: opts.removed ? new Date() : null } });
  return id;
}

export interface MadeInvitation {
  id: number;
  token: string;
  email: string;
}

/** An invitation to a class (open unless `expired`, `accepted` or `revoked` say otherwise); the token is returned once. */
export async function makeClassInvitation(
  classId: number,
  opts: { email?: string; invitedBy?: number | null; expired?: boolean; accepted?: boolean; revoked?: boolean } = {},
): Promise<MadeInvitation> {
  const env = await apiEnv();
  const token = newOpaqueToken();
  const email = opts.email ?? uniqueEmail('class-invitee');
  const now = new Date();
  const [row] = await env.database.db
    .insert(classInvitations)
    .values({
      classId,
      email,
      tokenHash: hashToken(token),
      invitedBy: opts.invitedBy ?? null,
      expiresAt: opts.expired ? addDays(now, -1) : addDays(now, 14),
      acceptedAt: opts.accepted ? now : null,
      revokedAt: opts.revoked ? now : null,
    })
    .returning({ id: classInvitations.id });
  return { id: row.id, token, email };
}

export interface MadeAssignment {
  id: number;
  classId: number;
  instructorId: number;
  setId: number;
  templateId: number;
  templateVersionId: number;
  referenceSurveyId: number | null;
}

/**
 * An assignment of a class (a fresh class when `classId` is absent) on a training set: `setId`, or
 * a fresh set owned by the class's instructor (sample template, version 1 published). Due in
 * 7 days unless `dueAt` says otherwise. `reference: true` makes a complete reference survey of the
 * training set by the instructor (or pass `referenceSurveyId`).
 */
export async function makeAssignment(
  opts: {
    classId?: number;
    setId?: number;
    title?: string;
    instructions?: string;
    dueAt?: Date;
    rule?: AcceptanceRule;
    predictFirst?: boolean;
    showVerdicts?: boolean;
    reference?: boolean;
    referenceSurveyId?: number | null;
  } = {},
): Promise<MadeAssignment> {
  const env = await apiEnv();
  const db = env.database.db;
  const cls = opts.classId === undefined ? await makeClass() : { id: opts.classId, instructorId: (await db.select({ i: classes.instructorId }).from(classes).where(eq(classes.id, opts.classId)))[0].i };
  let setId: number;
  let templateId: number;
  if (opts.setId === undefined) {
    const s = await makeSet({ ownerId: cls.instructorId, label: 'Training chassis A' });
    setId = s.id;
    templateId = s.templateId;
  } else {
    setId = opts.setId;
    templateId = (await db.select({ t: sets.templateId }).from(sets).where(eq(sets.id, setId)))[0].t;
  }
  const [v] = await db
    .select({ id: templateVersions.id, number: templateVersions.number })
    .from(templateVersions)
    .where(and(eq(templateVersions.templateId, templateId), eq(templateVersions.state, 'published'), eq(templateVersions.number, 1)));
  if (!v) throw new Error(`makeAssignment: template ${templateId} has no published version 1`);
  let referenceSurveyId = opts.referenceSurveyId ?? null;
  if (opts.reference && referenceSurveyId === null) referenceSurveyId = (await makeSurvey({ setId, state: 'complete' })).id;
  const [row] = await db
    .insert(assignments)
    .values({
      classId: cls.id,
      title: opts.title ?? 'Survey the training chassis',
      instructions: opts.instructions ?? '',
      templateId,
      templateVersionId: v.id,
      versionNumber: 1,
      setId,
      referenceSurveyId,
      dueAt: opts.dueAt ?? addDays(new Date(), 7),
      rule: opts.rule ?? { ...DEFAULT_RULE },
      predictFirst: opts.predictFirst ?? false,
      showVerdicts: opts.showVerdicts ?? true,
      createdBy: cls.instructorId,
    })
    .returning({ id: assignments.id });
  return { id: row.id, classId: cls.id, instructorId: cls.instructorId, setId, templateId, templateVersionId: v.id, referenceSurveyId };
}

/**
 * A student's class survey of an assignment (purpose 'assignment', started by the student, the
 * assignment's template version and rule), inserted directly; draft unless `state` says otherwise.
 * No meter. Returns the survey id.
 */
export async function makeClassSurvey(assignmentId: number, studentId: number, opts: { state?: SurveyState; remeasureKeys?: string[] | null } = {}): Promise<number> {
  const env = await apiEnv();
  const db = env.database.db;
  const [a] = await db.select().from(assignments).where(eq(assignments.id, assignmentId));
  const [row] = await db
    .insert(surveys)
    .values({
      setId: a.setId,
      templateVersionId: a.templateVersionId,
      versionNumber: a.versionNumber,
      purpose: 'assignment',
      state: opts.state ?? 'draft',
      meterProfileId: null,
      meter: null,
      rule: a.rule,
      conditions: SAMPLE_CONDITIONS,
      startedBy: studentId,
      assignmentId,
      remeasureKeys: opts.remeasureKeys ?? null,
    })
    .returning({ id: surveys.id });
  return row.id;
}
