/**
 * A student's class survey and its attempts (DESIGN.md §2 "assignment", "review"; issue #6):
 * the assignment as each side sees it, starting the one class survey per student, submitting it
 * (the readings frozen as an attempt, the instructor notified), and every attempt of an
 * assignment for its instructor.
 */
import { sql } from 'drizzle-orm';
import { attempts, surveys } from '../../schema/index';
import type { Ctx } from '../context';
import type { AssignmentDetail, AttemptSummary } from '../domain/class-format';
import type { SurveyConditions } from '../domain/set-format';
import type { Tx } from '../db';
import { conflict, forbidden } from '../http/errors';
import type { Actor } from '../sets/sets.repository';
import { assignmentDetailOf, attemptSummaries } from '../classes/assignments.use-cases';
import { visibleAssignment } from '../classes/classes.repository';
import { mailNotices, recordNotices, type Notice } from '../classes/notify';
import { notChangeable } from '../surveys/readings.use-cases';
import { versionDoc } from '../surveys/survey-view';
import { meterSnapshot } from '../surveys/surveys.use-cases';
import * as surveysRepo from '../surveys/surveys.repository';
import { contactOf, type AttemptContext } from './attempts.repository';

/** GET /api/assignments/:id — the instructor (and an admin) the queue and reference; a student their own view. */
export async function getAssignment(ctx: Ctx, actor: Actor, assignmentId: number): Promise<AssignmentDetail> {
  const db = ctx.db;
  return assignmentDetailOf(db, actor, await visibleAssignment(db, actor, assignmentId));
}

/**
 * POST /api/assignments/:id/survey — the student's class survey of the assignment: a new draft
 * (201) on the training set, against the assignment's template version and rule, with the
 * template's own conditions and the student's meter when given; the existing one (200) when the
 * student has started it already (one per student and assignment).
 */
export async function startClassSurvey(ctx: Ctx, actor: Actor, assignmentId: number, body: { meterProfileId?: number }): Promise<{ status: 200 | 201; surveyId: number }> {
  return ctx.db.transaction(async (tx) => {
    const { assignment, role } = await visibleAssignment(tx, actor, assignmentId);
    if (role !== 'student') throw forbidden('Only a student of the class surveys for an assignment.', 'not-student');
    // One survey per student and assignment: concurrent starts wait here, the second finds the first.
    await tx.execute(sql`SELECT pg_advisory_xact_lock(${assignmentId}::int, ${actor.id}::int)`);
    const existing = await tx.execute<{ id: number }>(sql`SELECT id FROM surveys WHERE assignment_id = ${assignmentId} AND started_by = ${actor.id} ORDER BY id LIMIT 1`);
    if (existing.rows[0]) return { status: 200 as const, surveyId: existing.rows[0].id };
    const meter = body.meterProfileId !== undefined ? await meterSnapshot(tx, actor, body.meterProfileId) : null;
    const doc = (await versionDoc(tx, assignment.templateVersionId)).document;
    const conditions: SurveyConditions = { tubesIn: doc.conditions.tubesIn, speakerConnected: doc.conditions.speakerConnected, controls: doc.conditions.controls, ambientC: null, note: '' };
    const [row] = await tx
      .insert(surveys)
      .values({
        setId: assignment.setId,
        templateVersionId: assignment.templateVersionId,
        versionNumber: assignment.versionNumber,
        purpose: 'assignment',
        meterProfileId: meter ? body.meterProfileId! : null,
        meter,
        rule: assignment.rule,
        conditions,
        startedBy: actor.id,
        assignmentId,
      })
      .returning({ id: surveys.id });
    return { status: 201 as const, surveyId: row.id };
  });
}

async function isMember(tx: Tx, classId: number, studentId: number): Promise<boolean> {
  const r = await tx.execute(sql`SELECT 1 FROM class_members WHERE class_id = ${classId} AND student_id = ${studentId} AND removed_at IS NULL`);
  return r.rows.length > 0;
}

/**
 * POST /api/surveys/:id/submit — the student hands in their class survey (draft or returned): its
 * readings and context are frozen as the next attempt, the survey waits for review (re-measure
 * keys closed), and the instructor is notified (in the app now, by mail once committed).
 */
export async function submitSurvey(ctx: Ctx, actor: Actor, surveyId: number): Promise<AttemptSummary> {
  const out = await ctx.db.transaction(async (tx) => {
    const { survey, classLink } = await surveysRepo.writableSurvey(tx, actor, surveyId, true);
    if (classLink === null) throw conflict('Only a class survey is submitted: complete this survey instead.', 'not-class-survey');
    if (!(await isMember(tx, classLink.classId, actor.id))) throw forbidden('You are no longer a student of this class: your work stays yours to read.', 'not-member');
    if (survey.state !== 'draft' && survey.state !== 'returned') throw notChangeable(survey);
    const readings = await surveysRepo.readingsOf(tx, surveyId);
    if (readings.length === 0) throw conflict('Nothing to submit yet: take at least one reading.', 'nothing-to-submit');
    const [{ n }] = (await tx.execute<{ n: number }>(sql`SELECT coalesce(max(number), 0)::int + 1 AS n FROM attempts WHERE survey_id = ${surveyId}`)).rows;
    const context: AttemptContext = { conditions: survey.conditions as SurveyConditions, meter: survey.meter as surveysRepo.MeterSnapshot | null, meterProfileId: survey.meterProfileId };
    const [row] = await tx.insert(attempts).values({ surveyId, assignmentId: classLink.assignmentId, studentId: actor.id, number: n, readings, context }).returning({ id: attempts.id });
    await tx.execute(sql`UPDATE surveys SET state = 'submitted', remeasure_keys = NULL, version = version + 1, updated_at = now() WHERE id = ${surveyId}`);
    const [summary] = await attemptSummaries(tx, sql`at.id = ${row.id}`, classLink.dueAt);
    const instructor = await contactOf(tx, classLink.instructorId);
    const notices: Notice[] = [];
    if (instructor) {
      const student = summary.student.name;
      notices.push({
        userId: classLink.instructorId,
        kind: 'submission',
        title: `${student} submitted \u201c${classLink.title}\u201d`,
        body: `${student} handed in attempt ${n} of \u201c${classLink.title}\u201d (${classLink.className})${summary.late ? ', after the due date' : ''}. It waits for your review.`,
        link: `/attempts/${row.id}/review`,
        email: instructor.email,
      });
    }
    await recordNotices(tx, notices);
    return { summary, notices };
  });
  await mailNotices(ctx, out.notices);
  return out.summary;
}

/** GET /api/assignments/:id/attempts — every attempt of every student, newest first (the instructor; an admin reads them too). */
export async function listAttempts(ctx: Ctx, actor: Actor, assignmentId: number): Promise<{ items: AttemptSummary[] }> {
  const { assignment, role } = await visibleAssignment(ctx.db, actor, assignmentId);
  if (role === 'student') throw forbidden("Only the class's instructor sees every attempt: yours are on the assignment.", 'not-instructor');
  return { items: await attemptSummaries(ctx.db, sql`at.assignment_id = ${assignment.id}`, assignment.dueAt) };
}
