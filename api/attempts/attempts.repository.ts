/**
 * Queries of attempts, reviews and reading comments (DESIGN.md §2 "review"): each takes `db` or a
 * transaction `tx`.
 *
 * Who sees an attempt: its student (always: their own work, also after leaving the class), the
 * instructor of its class and admins. Anyone else gets a 404, the same answer as for an attempt
 * that does not exist. Reviewing (comments, the decision) is the instructor's: its student and
 * admins see the attempt but may not (403).
 */
import { sql } from 'drizzle-orm';
import type { ReadingComment, ReviewDecision } from '../domain/class-format';
import type { ReadingRecord, SurveyConditions } from '../domain/set-format';
import type { Tx } from '../db';
import { forbidden, notFound } from '../http/errors';
import type { Actor } from '../sets/sets.repository';
import { CLASS_FROM, CLASS_SELECT, classRowOf, findAssignment, iso, type AssignmentRow, type ClassRow } from '../classes/classes.repository';
import { findSurvey, type MeterSnapshot, type SurveyRow } from '../surveys/surveys.repository';

/** What an attempt keeps besides its readings: the survey's conditions and meter at submission. */
export interface AttemptContext {
  conditions: SurveyConditions;
  meter: MeterSnapshot | null;
  meterProfileId: number | null;
}

export interface AttemptRow {
  id: number;
  surveyId: number;
  assignmentId: number;
  studentId: number;
  studentName: string;
  number: number;
  submittedAt: Date;
  readings: ReadingRecord[];
  context: AttemptContext;
}

export interface ReviewRow {
  id: number;
  attemptId: number;
  decision: ReviewDecision;
  score: number | null;
  suggestedScore: number | null;
  comment: string;
  remeasureKeys: string[];
  reviewerId: number | null;
  createdAt: Date;
}

export type AttemptRole = 'student' | 'instructor' | 'admin';

export interface AttemptAccess {
  attempt: AttemptRow;
  survey: SurveyRow;
  assignment: AssignmentRow;
  cls: ClassRow;
  role: AttemptRole;
}

type RawAttempt = {
  id: number;
  survey_id: number;
  assignment_id: number;
  student_id: number;
  student_name: string;
  number: number;
  submitted_at: string | Date;
  readings: ReadingRecord[];
  context: AttemptContext;
};

const attemptRowOf = (r: RawAttempt): AttemptRow => ({
  id: r.id,
  surveyId: r.survey_id,
  assignmentId: r.assignment_id,
  studentId: r.student_id,
  studentName: r.student_name,
  number: r.number,
  submittedAt: new Date(r.submitted_at),
  readings: r.readings,
  context: r.context,
});

const ATTEMPT_SELECT = sql`at.id, at.survey_id, at.assignment_id, at.student_id, su.name AS student_name, at.number, at.submitted_at, at.readings, at.context`;

export async function findAttempt(tx: Tx, attemptId: number): Promise<AttemptRow | undefined> {
  const r = await tx.execute<RawAttempt>(sql`SELECT ${ATTEMPT_SELECT} FROM attempts at JOIN users su ON su.id = at.student_id WHERE at.id = ${attemptId}`);
  return r.rows[0] ? attemptRowOf(r.rows[0]) : undefined;
}

/** The newest attempt of a survey (null before the first submission). */
export async function latestAttempt(tx: Tx, surveyId: number): Promise<AttemptRow | null> {
  const r = await tx.execute<RawAttempt>(sql`
    SELECT ${ATTEMPT_SELECT} FROM attempts at JOIN users su ON su.id = at.student_id
    WHERE at.survey_id = ${surveyId} ORDER BY at.number DESC LIMIT 1`);
  return r.rows[0] ? attemptRowOf(r.rows[0]) : null;
}

/** The newest attempt of each of these surveys. */
export async function latestAttempts(tx: Tx, surveyIds: number[]): Promise<Map<number, AttemptRow>> {
  const out = new Map<number, AttemptRow>();
  if (surveyIds.length === 0) return out;
  const r = await tx.execute<RawAttempt>(sql`
    SELECT DISTINCT ON (at.survey_id) ${ATTEMPT_SELECT} FROM attempts at JOIN users su ON su.id = at.student_id
    WHERE at.survey_id IN ${surveyIds} ORDER BY at.survey_id, at.number DESC`);
  for (const row of r.rows) out.set(row.survey_id, attemptRowOf(row));
  return out;
}

async function classOf(tx: Tx, classId: number): Promise<ClassRow> {
  const r = await tx.execute<Parameters<typeof classRowOf>[0]>(sql`SELECT ${CLASS_SELECT} FROM ${CLASS_FROM} WHERE c.id = ${classId}`);
  return classRowOf(r.rows[0]);
}

/** The attempt if `actor` may see it (its student, its class's instructor, an admin); a 404 otherwise. `lock` takes the survey's row lock. */
export async function visibleAttempt(tx: Tx, actor: Actor, attemptId: number, lock = false): Promise<AttemptAccess> {
  const attempt = await findAttempt(tx, attemptId);
  if (!attempt) throw notFound('No such attempt.');
  const assignment = await findAssignment(tx, attempt.assignmentId);
  const survey = await findSurvey(tx, attempt.surveyId, lock);
  if (!assignment || !survey) throw notFound('No such attempt.');
  const cls = await classOf(tx, assignment.classId);
  const role: AttemptRole | null = cls.instructorId === actor.id ? 'instructor' : attempt.studentId === actor.id ? 'student' : actor.roles.includes('admin') ? 'admin' : null;
  if (role === null) throw notFound('No such attempt.');
  return { attempt, survey, assignment, cls, role };
}

/** The attempt if `actor` instructs its class: its student and admins are told they may not (403). */
export async function reviewedAttempt(tx: Tx, actor: Actor, attemptId: number, lock = true): Promise<AttemptAccess> {
  const a = await visibleAttempt(tx, actor, attemptId, lock);
  if (a.role !== 'instructor') throw forbidden("Only the class's instructor reviews its attempts.", 'not-instructor');
  return a;
}

// ---------------------------------------------------------------------------------------------
// Reviews and comments

type RawReview = {
  id: number;
  attempt_id: number;
  decision: ReviewDecision;
  score: number | null;
  suggested_score: number | null;
  comment: string;
  remeasure_keys: string[];
  reviewer_id: number | null;
  created_at: string | Date;
};

export async function reviewOf(tx: Tx, attemptId: number): Promise<ReviewRow | null> {
  const r = await tx.execute<RawReview>(sql`SELECT * FROM reviews WHERE attempt_id = ${attemptId}`);
  const x = r.rows[0];
  return x
    ? {
        id: x.id,
        attemptId: x.attempt_id,
        decision: x.decision,
        score: x.score,
        suggestedScore: x.suggested_score,
        comment: x.comment,
        remeasureKeys: x.remeasure_keys ?? [],
        reviewerId: x.reviewer_id,
        createdAt: new Date(x.created_at),
      }
    : null;
}

type RawComment = { id: number; attempt_id: number; test_point_key: string; reading_id: number | string | null; author_id: number | null; author_name: string | null; text: string; created_at: string | Date };

const commentOf = (c: RawComment): ReadingComment => ({
  id: c.id,
  attemptId: c.attempt_id,
  testPointKey: c.test_point_key,
  readingId: c.reading_id === null ? null : Number(c.reading_id),
  author: c.author_id === null ? null : { id: c.author_id, name: c.author_name ?? '' },
  text: c.text,
  createdAt: iso(c.created_at),
});

/** The comments on an attempt's readings, oldest first (`commentId`: that one only). */
export async function commentsOf(tx: Tx, attemptId: number, commentId?: number): Promise<ReadingComment[]> {
  const r = await tx.execute<RawComment>(sql`
    SELECT rc.id, rc.attempt_id, rc.test_point_key, rc.reading_id, rc.author_id, u.name AS author_name, rc.text, rc.created_at
    FROM reading_comments rc LEFT JOIN users u ON u.id = rc.author_id
    WHERE rc.attempt_id = ${attemptId} ${commentId === undefined ? sql`` : sql`AND rc.id = ${commentId}`}
    ORDER BY rc.id`);
  return r.rows.map(commentOf);
}

/** A user's name and e-mail (for notices). */
export async function contactOf(tx: Tx, userId: number): Promise<{ name: string; email: string } | null> {
  const r = await tx.execute<{ name: string; email: string }>(sql`SELECT name, email FROM users WHERE id = ${userId} AND active`);
  return r.rows[0] ?? null;
}
