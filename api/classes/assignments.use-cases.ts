/**
 * Assignments (issue #6 item 2): a published template version surveyed on a training set by a
 * due date, with an acceptance rule, a reference survey (the instructor's own ordinary survey of
 * the training set), predict-first and whether verdicts show while measuring.
 *
 * The training set must be one the instructor may edit (api/sets/sets.repository editableSet) and
 * follow the assignment's template; the reference survey must be a survey of that set outside any
 * class, against the same template version.
 */
import { and, eq, sql } from 'drizzle-orm';
import { assignments, dueReminders, surveys } from '../../schema/index';
import type { Ctx } from '../context';
import type { AssignmentDetail, AssignmentInput, AssignmentPatch, AssignmentSummary, AttemptSummary, QueueEntry, ReviewDecision } from '../domain/class-format';
import { DEFAULT_RULE } from '../domain/verdict';
import type { Tx } from '../db';
import { AppError, badRequest, conflict } from '../http/errors';
import { editableSet, type Actor } from '../sets/sets.repository';
import { publishedVersion } from '../surveys/survey-view';
import { assignmentsOfClass, instructedAssignment, instructedClass, iso, statusOf, visibleAssignment, type AssignmentAccess, type AssignmentRow, type ClassAccess } from './classes.repository';

const late = (submittedAt: Date | string, dueAt: Date) => new Date(submittedAt).getTime() > dueAt.getTime();

function summaryOf(a: AssignmentRow, extra: Pick<AssignmentSummary, 'awaitingReview' | 'myStatus' | 'mySurveyId'>): AssignmentSummary {
  return {
    id: a.id,
    classId: a.classId,
    title: a.title,
    dueAt: a.dueAt.toISOString(),
    templateId: a.templateId,
    versionNumber: a.versionNumber,
    maker: a.maker,
    model: a.model,
    setId: a.setId,
    setLabel: a.setLabel,
    predictFirst: a.predictFirst,
    showVerdicts: a.showVerdicts,
    ...extra,
  };
}

/** Instructor (and admin): how many submissions wait per assignment. Student: their own status and survey. */
async function extrasOf(tx: Tx, actor: Actor, role: ClassAccess['role'], ids: number[]): Promise<Map<number, Pick<AssignmentSummary, 'awaitingReview' | 'myStatus' | 'mySurveyId'>>> {
  const out = new Map<number, Pick<AssignmentSummary, 'awaitingReview' | 'myStatus' | 'mySurveyId'>>();
  if (ids.length === 0) return out;
  if (role === 'student') {
    const r = await tx.execute<{ id: number; assignment_id: number; state: string }>(sql`
      SELECT id, assignment_id, state FROM surveys WHERE assignment_id IN ${ids} AND started_by = ${actor.id} ORDER BY id`);
    for (const id of ids) out.set(id, { awaitingReview: null, myStatus: 'not-started', mySurveyId: null });
    for (const s of r.rows) out.set(s.assignment_id, { awaitingReview: null, myStatus: statusOf(s.state), mySurveyId: s.id });
  } else {
    const r = await tx.execute<{ assignment_id: number; n: number }>(sql`
      SELECT assignment_id, count(*)::int AS n FROM surveys WHERE assignment_id IN ${ids} AND state = 'submitted' GROUP BY assignment_id`);
    const n = new Map(r.rows.map((x) => [x.assignment_id, x.n]));
    for (const id of ids) out.set(id, { awaitingReview: n.get(id) ?? 0, myStatus: null, mySurveyId: null });
  }
  return out;
}

/** The assignments of a class as the caller sees them. */
export async function assignmentSummaries(tx: Tx, actor: Actor, a: ClassAccess): Promise<AssignmentSummary[]> {
  const rows = await assignmentsOfClass(tx, a.cls.id);
  const extras = await extrasOf(tx, actor, a.role, rows.map((r) => r.id));
  return rows.map((r) => summaryOf(r, extras.get(r.id)!));
}

type RawAttempt = {
  id: number;
  survey_id: number;
  assignment_id: number;
  number: number;
  student_id: number;
  student_name: string;
  submitted_at: string | Date;
  review_id: number | null;
  decision: ReviewDecision | null;
  score: number | null;
  suggested_score: number | null;
  comment: string | null;
  remeasure_keys: string[] | null;
  reviewer_id: number | null;
  reviewer_name: string | null;
  reviewed_at: string | Date | null;
};

/** Attempts with their reviews (newest first) of the surveys matching `where` (alias at = attempts). */
export async function attemptSummaries(tx: Tx, where: ReturnType<typeof sql>, dueAt: Date): Promise<AttemptSummary[]> {
  const r = await tx.execute<RawAttempt>(sql`
    SELECT at.id, at.survey_id, at.assignment_id, at.number, at.student_id, su.name AS student_name, at.submitted_at,
      rv.id AS review_id, rv.decision, rv.score, rv.suggested_score, rv.comment, rv.remeasure_keys, rv.reviewer_id,
      ru.name AS reviewer_name, rv.created_at AS reviewed_at
    FROM attempts at JOIN users su ON su.id = at.student_id
      LEFT JOIN reviews rv ON rv.attempt_id = at.id LEFT JOIN users ru ON ru.id = rv.reviewer_id
    WHERE ${where}
    ORDER BY at.submitted_at DESC, at.id DESC`);
  return r.rows.map((x) => ({
    id: x.id,
    surveyId: x.survey_id,
    assignmentId: x.assignment_id,
    number: x.number,
    student: { id: x.student_id, name: x.student_name },
    submittedAt: iso(x.submitted_at),
    late: late(x.submitted_at, dueAt),
    review:
      x.review_id === null
        ? null
        : {
            id: x.review_id,
            decision: x.decision!,
            score: x.score,
            suggestedScore: x.suggested_score,
            comment: x.comment ?? '',
            remeasureKeys: x.remeasure_keys ?? [],
            reviewer: x.reviewer_id === null ? null : { id: x.reviewer_id, name: x.reviewer_name ?? '' },
            createdAt: iso(x.reviewed_at!),
          },
  }));
}

/** The submission queue: every current student of the class with their survey's status and newest attempt. */
async function queueOf(tx: Tx, a: AssignmentRow): Promise<QueueEntry[]> {
  const r = await tx.execute<{
    id: number;
    name: string;
    survey_id: number | null;
    state: string | null;
    attempt_id: number | null;
    number: number | null;
    submitted_at: string | Date | null;
    attempt_count: number;
    score: number | null;
  }>(sql`
    SELECT u.id, u.name, sv.id AS survey_id, sv.state, la.id AS attempt_id, la.number, la.submitted_at,
      (SELECT count(*)::int FROM attempts x WHERE x.survey_id = sv.id) AS attempt_count,
      (SELECT rv.score FROM reviews rv JOIN attempts x ON x.id = rv.attempt_id WHERE x.survey_id = sv.id ORDER BY x.number DESC LIMIT 1) AS score
    FROM class_members m JOIN users u ON u.id = m.student_id
      LEFT JOIN surveys sv ON sv.assignment_id = ${a.id} AND sv.started_by = m.student_id
      LEFT JOIN LATERAL (SELECT x.id, x.number, x.submitted_at FROM attempts x WHERE x.survey_id = sv.id ORDER BY x.number DESC LIMIT 1) la ON true
    WHERE m.class_id = ${a.classId} AND m.removed_at IS NULL
    ORDER BY u.name, u.id`);
  return r.rows.map((q) => ({
    student: { id: q.id, name: q.name },
    surveyId: q.survey_id,
    status: statusOf(q.state),
    latestAttempt: q.attempt_id === null ? null : { id: q.attempt_id, number: q.number!, submittedAt: iso(q.submitted_at!), late: late(q.submitted_at!, a.dueAt) },
    attemptCount: q.attempt_count,
    score: q.score,
  }));
}

/**
 * An assignment as the caller sees it: the instructor (and an admin) the reference survey and
 * the queue; a student their own status, survey and attempts (no reference, no queue).
 */
export async function assignmentDetailOf(tx: Tx, actor: Actor, access: AssignmentAccess): Promise<AssignmentDetail> {
  const a = access.assignment;
  const student = access.role === 'student';
  const extra = (await extrasOf(tx, actor, access.role, [a.id])).get(a.id)!;
  return {
    ...summaryOf(a, extra),
    instructions: a.instructions,
    className: access.cls.name,
    instructor: { id: access.cls.instructorId, name: access.cls.instructorName },
    rule: a.rule,
    set: { id: a.setId, label: a.setLabel, serial: a.setSerial, maker: a.maker, model: a.model, hotChassis: a.hotChassis },
    referenceSurveyId: student ? null : a.referenceSurveyId,
    queue: student ? [] : await queueOf(tx, a),
    myAttempts: student ? await attemptSummaries(tx, sql`at.assignment_id = ${a.id} AND at.student_id = ${actor.id}`, a.dueAt) : [],
  };
}

/** A reference survey: a survey of the training set outside any class, against the assignment's template version. */
async function checkReference(tx: Tx, surveyId: number, setId: number, templateVersionId: number): Promise<void> {
  const [s] = await tx
    .select({ setId: surveys.setId, assignmentId: surveys.assignmentId, templateVersionId: surveys.templateVersionId, versionNumber: surveys.versionNumber })
    .from(surveys)
    .where(eq(surveys.id, surveyId));
  if (!s || s.setId !== setId) throw badRequest(`"referenceSurveyId": survey ${surveyId} is not a survey of the training set.`, 'referenceSurveyId', 'validation');
  if (s.assignmentId !== null) throw badRequest(`"referenceSurveyId": survey ${surveyId} is a student's class survey, not a reference.`, 'referenceSurveyId', 'validation');
  if (s.templateVersionId !== templateVersionId)
    throw badRequest(`"referenceSurveyId": survey ${surveyId} follows template version ${s.versionNumber}, not the assignment's: its test points would not match.`, 'referenceSurveyId', 'validation');
}

function futureDue(dueAt: string): Date {
  const d = new Date(dueAt);
  if (d.getTime() <= Date.now()) throw badRequest('"dueAt" is in the past: give a due date still ahead.', 'dueAt', 'validation');
  return d;
}

/** POST /api/classes/:id/assignments */
export async function createAssignment(ctx: Ctx, actor: Actor, classId: number, input: AssignmentInput): Promise<AssignmentDetail> {
  return ctx.db.transaction(async (tx) => {
    const { cls } = await instructedClass(tx, actor, classId);
    if (cls.archivedAt) throw conflict('This class is archived: bring it back before adding assignments.', 'class-archived');
    let set;
    try {
      set = (await editableSet(tx, actor, input.setId)).set;
    } catch (e) {
      if (e instanceof AppError && e.status === 404) throw badRequest(`"setId": you have no set ${input.setId} to train on.`, 'setId', 'validation');
      throw e;
    }
    if (set.templateId !== input.templateId)
      throw badRequest(`"setId": the set “${set.label}” follows template ${set.templateId}, not template ${input.templateId}.`, 'setId', 'validation');
    const v = await publishedVersion(tx, input.templateId, input.versionNumber);
    if (!v) throw badRequest(`"versionNumber": template ${input.templateId} has no published version ${input.versionNumber}.`, 'versionNumber', 'validation');
    if (v.state === 'retired') throw conflict(`Version ${input.versionNumber} of the template is retired: assign a published version.`, 'version-retired');
    const dueAt = futureDue(input.dueAt);
    if (input.referenceSurveyId != null) await checkReference(tx, input.referenceSurveyId, input.setId, v.id);
    const [row] = await tx
      .insert(assignments)
      .values({
        classId,
        title: input.title.trim(),
        instructions: input.instructions ?? '',
        templateId: input.templateId,
        templateVersionId: v.id,
        versionNumber: input.versionNumber,
        setId: input.setId,
        referenceSurveyId: input.referenceSurveyId ?? null,
        dueAt,
        rule: input.rule ?? { ...DEFAULT_RULE },
        predictFirst: input.predictFirst ?? false,
        showVerdicts: input.showVerdicts ?? true,
        createdBy: actor.id,
      })
      .returning({ id: assignments.id });
    return assignmentDetailOf(tx, actor, await visibleAssignment(tx, actor, row.id));
  });
}

/**
 * PATCH /api/assignments/:id — a new due date (the reminders already sent are forgotten, so the
 * new date gets its own), title, instructions, reference, options.
 */
export async function patchAssignment(ctx: Ctx, actor: Actor, assignmentId: number, patch: AssignmentPatch): Promise<AssignmentDetail> {
  return ctx.db.transaction(async (tx) => {
    const { assignment } = await instructedAssignment(tx, actor, assignmentId);
    if (patch.referenceSurveyId != null) await checkReference(tx, patch.referenceSurveyId, assignment.setId, assignment.templateVersionId);
    const dueAt = patch.dueAt !== undefined ? new Date(patch.dueAt) : undefined;
    await tx
      .update(assignments)
      .set({
        ...(patch.title !== undefined ? { title: patch.title.trim() } : {}),
        ...(patch.instructions !== undefined ? { instructions: patch.instructions } : {}),
        ...(dueAt !== undefined ? { dueAt } : {}),
        ...(patch.referenceSurveyId !== undefined ? { referenceSurveyId: patch.referenceSurveyId } : {}),
        ...(patch.predictFirst !== undefined ? { predictFirst: patch.predictFirst } : {}),
        ...(patch.showVerdicts !== undefined ? { showVerdicts: patch.showVerdicts } : {}),
        updatedAt: sql`now()`,
      })
      .where(eq(assignments.id, assignmentId));
    if (dueAt !== undefined && dueAt.getTime() !== assignment.dueAt.getTime()) await tx.delete(dueReminders).where(and(eq(dueReminders.assignmentId, assignmentId)));
    return assignmentDetailOf(tx, actor, await visibleAssignment(tx, actor, assignmentId));
  });
}
