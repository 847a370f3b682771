/**
 * Reviews (DESIGN.md §2 "review", §3.9 "Scoring"; issue #6 item 4): the attempt side by side
 * with the reference survey, comments on readings, and the instructor's decision — accept, or
 * return with the test points to re-measure — with a score (the agreement's suggestion is the
 * instructor's to change). The student reads the review of their own attempts; the reference's
 * values, the comparison and the suggestion show to them only once their survey is accepted.
 */
import { eq, sql } from 'drizzle-orm';
import { readingComments, reviews, surveys } from '../../schema/index';
import type { Ctx } from '../context';
import type { CommentInput, ReadingComment, ReviewInput, ReviewRecord, ReviewView } from '../domain/class-format';
import { comparisonCounts, suggestedScore } from '../domain/review';
import type { SurveyConditions } from '../domain/set-format';
import type { Tx } from '../db';
import { badRequest, conflict, notFound } from '../http/errors';
import type { Actor } from '../sets/sets.repository';
import { attemptSummaries } from '../classes/assignments.use-cases';
import { mailNotices, recordNotices, type Notice } from '../classes/notify';
import { findSurvey, readingsOf } from '../surveys/surveys.repository';
import * as repo from './attempts.repository';
import { comparePoints, sideOf, type Side } from './review-view';

/** The reference survey's side (null when the assignment names none, or it is gone). */
export async function referenceSide(tx: Tx, referenceSurveyId: number | null): Promise<Side | null> {
  if (referenceSurveyId === null) return null;
  const ref = await findSurvey(tx, referenceSurveyId);
  if (!ref) return null;
  return sideOf(tx, ref, await readingsOf(tx, ref.id));
}

/** The student's side of an attempt: its frozen readings and the conditions it was submitted under. */
export async function attemptSide(tx: Tx, a: Pick<repo.AttemptAccess, 'attempt' | 'survey'>): Promise<Side> {
  const side = await sideOf(tx, a.survey, a.attempt.readings, (a.attempt.context?.conditions as SurveyConditions | undefined) ?? undefined);
  return { ...side, meterProfileId: a.attempt.context?.meterProfileId ?? side.meterProfileId };
}

/** GET /api/attempts/:id/review */
export async function reviewView(ctx: Ctx, actor: Actor, attemptId: number): Promise<ReviewView> {
  const db = ctx.db;
  const a = await repo.visibleAttempt(db, actor, attemptId);
  const shown = a.role !== 'student' || a.survey.state === 'accepted';
  const [student, reference, comments, review, list] = await Promise.all([
    attemptSide(db, a),
    referenceSide(db, a.assignment.referenceSurveyId),
    repo.commentsOf(db, attemptId),
    repo.reviewOf(db, attemptId),
    attemptSummaries(db, sql`at.survey_id = ${a.survey.id}`, a.assignment.dueAt),
  ]);
  const { points, differences, sameMeter } = comparePoints(student, reference);
  const comparisons = points.map((p) => p.comparison);
  const remeasure = new Set(review?.remeasureKeys ?? []);
  return {
    attempt: list.find((x) => x.id === attemptId)!,
    assignment: { id: a.assignment.id, title: a.assignment.title, classId: a.assignment.classId, className: a.cls.name, dueAt: a.assignment.dueAt.toISOString(), predictFirst: a.assignment.predictFirst },
    surveyState: a.survey.state,
    referenceShown: shown && reference !== null,
    referenceSurveyId: shown ? a.assignment.referenceSurveyId : null,
    conditions: { student: student.conditions, reference: shown ? (reference?.conditions ?? null) : null, differences: shown ? differences : [] },
    sameMeter: shown && sameMeter,
    rows: points.map((p) => ({
      testPointKey: p.row.testPointKey,
      label: p.label,
      stageKey: p.row.stageKey,
      student: { reading: p.student.reading, verdict: p.student.evaluation?.verdict ?? null, uncertaintyOhms: p.student.evaluation?.uncertaintyOhms ?? null },
      reference: shown && p.reference ? { reading: p.reference.reading, verdict: p.reference.evaluation?.verdict ?? null, uncertaintyOhms: p.reference.evaluation?.uncertaintyOhms ?? null } : null,
      comparison: shown ? p.comparison : null,
      prediction: p.prediction,
      hints: p.hints,
      comments: comments.filter((c) => c.testPointKey === p.row.testPointKey),
      remeasureRequested: remeasure.has(p.row.testPointKey),
    })),
    suggestedScore: shown ? suggestedScore(comparisons) : null,
    counts: shown ? comparisonCounts(comparisons) : { agree: 0, disagree: 0, notComparable: 0, verdictAgree: 0, verdictDisagree: 0 },
    attempts: list,
  };
}

/** The attempt under review must be its survey's newest and the survey waiting for review (409 otherwise). */
async function checkUnderReview(tx: Tx, a: repo.AttemptAccess): Promise<void> {
  const latest = await repo.latestAttempt(tx, a.survey.id);
  if (latest?.id !== a.attempt.id) throw conflict(`This is attempt ${a.attempt.number}; attempt ${latest?.number} is the one to review.`, 'not-latest-attempt');
  if (a.survey.state !== 'submitted') throw conflict(`This survey is ${a.survey.state}: it is not waiting for review.`, 'not-submitted');
}

/** A test point of the attempt's survey that takes readings (not a pair relation), or a 400 on `field`. */
async function checkPoint(tx: Tx, a: repo.AttemptAccess, key: string, field: string): Promise<void> {
  const side = await sideOf(tx, a.survey, []);
  const row = side.grid.row(key);
  if (!row || row.kind === 'pair-relation') throw badRequest(`"${field}": this survey's template version has no test point ${key} that takes a reading.`, field, 'validation');
}

/** POST /api/attempts/:id/comments — the instructor comments on a reading of the attempt under review. */
export async function addComment(ctx: Ctx, actor: Actor, attemptId: number, input: CommentInput): Promise<ReadingComment> {
  return ctx.db.transaction(async (tx) => {
    if (input.text.trim() === '') throw badRequest('"text": a comment says something.', 'text', 'validation');
    const a = await repo.reviewedAttempt(tx, actor, attemptId);
    await checkPoint(tx, a, input.testPointKey, 'testPointKey');
    const readingId = input.readingId ?? null;
    if (readingId !== null && !a.attempt.readings.some((r) => r.id === readingId && r.testPointKey === input.testPointKey))
      throw badRequest(`"readingId": reading ${readingId} is not a reading of ${input.testPointKey} in this attempt.`, 'readingId', 'validation');
    await checkUnderReview(tx, a);
    const [row] = await tx.insert(readingComments).values({ attemptId, testPointKey: input.testPointKey, readingId, authorId: actor.id, text: input.text.trim() }).returning({ id: readingComments.id });
    return (await repo.commentsOf(tx, attemptId, row.id))[0];
  });
}

/** DELETE /api/attempts/:id/comments/:commentId — before the review only. */
export async function deleteComment(ctx: Ctx, actor: Actor, attemptId: number, commentId: number): Promise<void> {
  await ctx.db.transaction(async (tx) => {
    await repo.reviewedAttempt(tx, actor, attemptId);
    const [c] = await repo.commentsOf(tx, attemptId, commentId);
    if (!c) throw notFound('No such comment on this attempt.');
    if (await repo.reviewOf(tx, attemptId)) throw conflict('This attempt is reviewed: its comments are part of the review now.', 'reviewed');
    await tx.execute(sql`DELETE FROM reading_comments WHERE id = ${commentId} AND attempt_id = ${attemptId}`);
  });
}

/**
 * POST /api/attempts/:id/review — the decision on the newest attempt of a submitted survey:
 * accepted (the survey is accepted) or returned with the test points to re-measure (only those
 * take new readings until the next submission). The suggested score (the share of comparable
 * points that agree with the reference) is kept beside the instructor's. The student is notified.
 */
export async function decide(ctx: Ctx, actor: Actor, attemptId: number, input: ReviewInput): Promise<ReviewRecord> {
  const out = await ctx.db.transaction(async (tx) => {
    const a = await repo.reviewedAttempt(tx, actor, attemptId);
    const keys = [...new Set(input.remeasureKeys ?? [])];
    if (input.decision === 'returned' && keys.length === 0) throw badRequest('"remeasureKeys": a returned survey names the test points to re-measure.', 'remeasureKeys', 'validation');
    if (input.decision === 'accepted' && keys.length > 0) throw badRequest('"remeasureKeys": an accepted survey has nothing to re-measure.', 'remeasureKeys', 'validation');
    for (const k of keys) await checkPoint(tx, a, k, 'remeasureKeys');
    await checkUnderReview(tx, a);
    const { points } = comparePoints(await attemptSide(tx, a), await referenceSide(tx, a.assignment.referenceSurveyId));
    const suggested = suggestedScore(points.map((p) => p.comparison));
    await tx
      .insert(reviews)
      .values({ attemptId, reviewerId: actor.id, decision: input.decision, score: input.score, suggestedScore: suggested, comment: input.comment?.trim() ?? '', remeasureKeys: keys });
    await tx
      .update(surveys)
      .set({ state: input.decision, remeasureKeys: input.decision === 'returned' ? keys : null, version: sql`${surveys.version} + 1`, updatedAt: sql`now()` })
      .where(eq(surveys.id, a.survey.id));
    const [summary] = await attemptSummaries(tx, sql`at.id = ${attemptId}`, a.assignment.dueAt);
    const student = await repo.contactOf(tx, a.attempt.studentId);
    const notices: Notice[] = [];
    if (student) {
      const what = input.decision === 'accepted' ? 'accepted' : `returned: re-measure ${keys.length} test point${keys.length === 1 ? '' : 's'}`;
      notices.push({
        userId: a.attempt.studentId,
        kind: 'review-done',
        title: `\u201c${a.assignment.title}\u201d reviewed`,
        body: `${a.cls.instructorName} reviewed attempt ${a.attempt.number} of \u201c${a.assignment.title}\u201d: ${what}.`,
        link: `/attempts/${attemptId}/review`,
        email: student.email,
      });
    }
    await recordNotices(tx, notices);
    return { review: summary.review!, notices };
  });
  await mailNotices(ctx, out.notices);
  return out.review;
}
