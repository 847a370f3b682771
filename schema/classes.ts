/**
 * Classes (DESIGN.md §2 "class", "assignment", "reference survey", "review", "competency
 * sign-off"): an instructor's classes, their students and invitations, assignments on a training
 * set, each submission frozen as an attempt, reviews with per-reading comments and re-measure
 * requests, competency sign-offs, in-app notifications and the due-date reminders already sent.
 *
 * A student's survey is an ordinary survey (schema/sets.ts) with `assignment_id` set; it is seen
 * by its student and the class's instructor only (never through the training set's sharing).
 */
import { sql } from 'drizzle-orm';
import { bigint, boolean, doublePrecision, index, integer, jsonb, pgTable, primaryKey, text, timestamp, uniqueIndex } from 'drizzle-orm/pg-core';
import { timestamps } from './columns';
import { sets, surveys } from './sets';
import { chassisTemplates, templateVersions } from './templates';
import { users } from './users';

export const classes = pgTable(
  'classes',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    instructorId: integer('instructor_id')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    name: text('name').notNull(),
    term: text('term').notNull().default(''),
    archivedAt: timestamp('archived_at', { withTimezone: true }),
    ...timestamps,
  },
  (t) => [index('classes_instructor_idx').on(t.instructorId)],
);

/** A student in a class; removing sets `removed_at` (their past work stays theirs). */
export const classMembers = pgTable(
  'class_members',
  {
    classId: integer('class_id')
      .notNull()
      .references(() => classes.id, { onDelete: 'cascade' }),
    studentId: integer('student_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    joinedAt: timestamp('joined_at', { withTimezone: true }).notNull().defaultNow(),
    removedAt: timestamp('removed_at', { withTimezone: true }),
    removedBy: integer('removed_by').references(() => users.id, { onDelete: 'set null' }),
  },
  (t) => [primaryKey({ columns: [t.classId, t.studentId] }), index('class_members_student_idx').on(t.studentId)],
);

/** A single-use invitation link to join a class (only a hash of the token is stored). */
export const classInvitations = pgTable(
  'class_invitations',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    classId: integer('class_id')
      .notNull()
      .references(() => classes.id, { onDelete: 'cascade' }),
    email: text('email').notNull(),
    tokenHash: text('token_hash').notNull(),
    invitedBy: integer('invited_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
    acceptedAt: timestamp('accepted_at', { withTimezone: true }),
    acceptedUserId: integer('accepted_user_id').references(() => users.id, { onDelete: 'set null' }),
    revokedAt: timestamp('revoked_at', { withTimezone: true }),
  },
  (t) => [uniqueIndex('class_invitations_token_idx').on(t.tokenHash), index('class_invitations_class_idx').on(t.classId)],
);

/** An assignment: a published template version surveyed on a training set, due at a time. */
export const assignments = pgTable(
  'assignments',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    classId: integer('class_id')
      .notNull()
      .references(() => classes.id, { onDelete: 'cascade' }),
    title: text('title').notNull(),
    instructions: text('instructions').notNull().default(''),
    templateId: integer('template_id')
      .notNull()
      .references(() => chassisTemplates.id, { onDelete: 'restrict' }),
    templateVersionId: integer('template_version_id')
      .notNull()
      .references(() => templateVersions.id, { onDelete: 'restrict' }),
    versionNumber: integer('version_number').notNull(),
    /** The training set (its template is the assignment's); the assignment grants students access to survey it. */
    setId: integer('set_id')
      .notNull()
      .references(() => sets.id, { onDelete: 'restrict' }),
    /** The instructor's own survey of the training set (an ordinary survey, outside any class). */
    referenceSurveyId: integer('reference_survey_id').references(() => surveys.id, { onDelete: 'set null' }),
    dueAt: timestamp('due_at', { withTimezone: true }).notNull(),
    /** AcceptanceRule (api/domain/verdict.ts) every student survey of the assignment uses. */
    rule: jsonb('rule').notNull(),
    /** The student enters a predicted in-circuit reading before the expected columns show. */
    predictFirst: boolean('predict_first').notNull().default(false),
    /** Verdicts show while measuring (off: only after submission). */
    showVerdicts: boolean('show_verdicts').notNull().default(true),
    createdBy: integer('created_by').references(() => users.id, { onDelete: 'set null' }),
    ...timestamps,
  },
  (t) => [index('assignments_class_idx').on(t.classId, t.dueAt)],
);

/** One submission of a student's survey, frozen: the readings as they were at submission. */
export const attempts = pgTable(
  'attempts',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    surveyId: integer('survey_id')
      .notNull()
      .references(() => surveys.id, { onDelete: 'cascade' }),
    assignmentId: integer('assignment_id')
      .notNull()
      .references(() => assignments.id, { onDelete: 'cascade' }),
    studentId: integer('student_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    /** 1, 2, … per survey. */
    number: integer('number').notNull(),
    submittedAt: timestamp('submitted_at', { withTimezone: true }).notNull().defaultNow(),
    /** ReadingRecord[] of the survey at submission (every reading, superseded ones too). */
    readings: jsonb('readings').notNull(),
    /** The survey's conditions and meter snapshot at submission ({ conditions, meter }). */
    context: jsonb('context').notNull(),
  },
  (t) => [uniqueIndex('attempts_survey_number_idx').on(t.surveyId, t.number), index('attempts_assignment_idx').on(t.assignmentId, t.submittedAt)],
);

/** The instructor's decision on one attempt: accept or return, with a score and what to re-measure. */
export const reviews = pgTable(
  'reviews',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    attemptId: integer('attempt_id')
      .notNull()
      .references(() => attempts.id, { onDelete: 'cascade' }),
    reviewerId: integer('reviewer_id').references(() => users.id, { onDelete: 'set null' }),
    /** `accepted` or `returned`. */
    decision: text('decision').notNull(),
    /** 0–100, the instructor's; `suggested_score` is what the agreement computed. */
    score: doublePrecision('score'),
    suggestedScore: doublePrecision('suggested_score'),
    comment: text('comment').notNull().default(''),
    /** Test point keys the student must re-measure (returned only). */
    remeasureKeys: text('remeasure_keys').array().notNull().default(sql`'{}'::text[]`),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex('reviews_attempt_idx').on(t.attemptId)],
);

/** A comment on one reading of an attempt (made while reviewing, read by the student). */
export const readingComments = pgTable(
  'reading_comments',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    attemptId: integer('attempt_id')
      .notNull()
      .references(() => attempts.id, { onDelete: 'cascade' }),
    testPointKey: text('test_point_key').notNull(),
    readingId: bigint('reading_id', { mode: 'number' }),
    authorId: integer('author_id').references(() => users.id, { onDelete: 'set null' }),
    text: text('text').notNull(),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('reading_comments_attempt_idx').on(t.attemptId)],
);

/** A competency signed off for a student (append-only; a withdrawal is recorded on the row). */
export const competencySignoffs = pgTable(
  'competency_signoffs',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    studentId: integer('student_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    /** A key of COMPETENCIES (api/domain/class-format.ts). */
    competencyKey: text('competency_key').notNull(),
    classId: integer('class_id').references(() => classes.id, { onDelete: 'set null' }),
    signedBy: integer('signed_by').references(() => users.id, { onDelete: 'set null' }),
    note: text('note').notNull().default(''),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    withdrawnAt: timestamp('withdrawn_at', { withTimezone: true }),
    withdrawnBy: integer('withdrawn_by').references(() => users.id, { onDelete: 'set null' }),
    withdrawnNote: text('withdrawn_note'),
  },
  (t) => [index('competency_signoffs_student_idx').on(t.studentId, t.competencyKey)],
);

/** In-app notifications (the same events as the mail). */
export const notifications = pgTable(
  'notifications',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    userId: integer('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    /** A NotificationKind (api/domain/class-format.ts). */
    kind: text('kind').notNull(),
    title: text('title').notNull(),
    body: text('body').notNull().default(''),
    /** An app path to open, e.g. `/classes/3/assignments/7`. */
    link: text('link').notNull().default(''),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    readAt: timestamp('read_at', { withTimezone: true }),
  },
  (t) => [index('notifications_user_idx').on(t.userId, t.createdAt)],
);

/** Due-date reminders already sent (one per assignment and student). */
export const dueReminders = pgTable(
  'due_reminders',
  {
    assignmentId: integer('assignment_id')
      .notNull()
      .references(() => assignments.id, { onDelete: 'cascade' }),
    studentId: integer('student_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    sentAt: timestamp('sent_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.assignmentId, t.studentId] })],
);
