/** Queries of surveys, readings, amendments and lifted leads: each takes `db` or a transaction `tx`. */
import { and, asc, desc, eq, isNull, sql } from 'drizzle-orm';
import { liftedLeads, readings, surveyAmendments, surveys, users } from '../../schema/index';
import { alias } from 'drizzle-orm/pg-core';
import type { MeterProfile } from '../domain/meter';
import type { AmendmentRecord, LiftedLeadRecord, MeterCheck, ReadingRecord, SurveyConditions } from '../domain/set-format';
import type { AcceptanceRule } from '../domain/verdict';
import type { Method, ReadingState } from '../domain/words';
import type { Tx } from '../db';
import { forbidden, notFound } from '../http/errors';
import { findSet, visibleSet, type Actor, type SetAccess } from '../sets/sets.repository';

/** The meter as a survey keeps it (a snapshot taken at the start or at a change of meter). */
export interface MeterSnapshot {
  name: string;
  profile: MeterProfile;
  checkDate: string | null;
  checkResistorOhms?: number | null;
  checkResistorTolerancePct?: number | null;
}

export type SurveyRow = typeof surveys.$inferSelect & { startedByName: string | null };

export async function findSurvey(tx: Tx, surveyId: number, lock = false): Promise<SurveyRow | undefined> {
  const q = tx
    .select({ s: surveys, startedByName: users.name })
    .from(surveys)
    .leftJoin(users, eq(users.id, surveys.startedBy))
    .where(eq(surveys.id, surveyId));
  const [row] = lock ? await q.for('update', { of: surveys }) : await q;
  return row ? { ...row.s, startedByName: row.startedByName } : undefined;
}

/**
 * A class survey's assignment and class (schema/classes.ts): who teaches it and the options the
 * survey follows. Null outside a class.
 */
export interface ClassLink {
  assignmentId: number;
  classId: number;
  className: string;
  instructorId: number;
  title: string;
  dueAt: Date;
  predictFirst: boolean;
  showVerdicts: boolean;
  referenceSurveyId: number | null;
}

/**
 * How the caller sees a survey: through the set (owner, shared-with, admin: an ordinary survey),
 * as the student whose class survey it is, as its class's instructor, as an admin (class survey),
 * or as a student reading the reference survey of an assignment their own survey of which was
 * accepted (read-only).
 */
export type SurveyViewer = 'set' | 'student' | 'instructor' | 'admin' | 'reference';

export interface SurveyAccess {
  survey: SurveyRow;
  access: SetAccess;
  viewer: SurveyViewer;
  classLink: ClassLink | null;
  /** Viewer 'reference': the assignment whose reference this survey is (the student's way back to it). */
  referenceFor?: { assignmentId: number; title: string } | null;
}

export async function classLinkOf(tx: Tx, assignmentId: number): Promise<ClassLink | null> {
  const r = await tx.execute<{
    id: number;
    class_id: number;
    class_name: string;
    instructor_id: number;
    title: string;
    due_at: string | Date;
    predict_first: boolean;
    show_verdicts: boolean;
    reference_survey_id: number | null;
  }>(sql`
    SELECT a.id, a.class_id, c.name AS class_name, c.instructor_id, a.title, a.due_at, a.predict_first, a.show_verdicts, a.reference_survey_id
    FROM assignments a JOIN classes c ON c.id = a.class_id WHERE a.id = ${assignmentId}`);
  const a = r.rows[0];
  if (!a) return null;
  return {
    assignmentId: a.id,
    classId: a.class_id,
    className: a.class_name,
    instructorId: a.instructor_id,
    title: a.title,
    dueAt: a.due_at instanceof Date ? a.due_at : new Date(a.due_at),
    predictFirst: a.predict_first,
    showVerdicts: a.show_verdicts,
    referenceSurveyId: a.reference_survey_id,
  };
}

/** A student whose own survey of an assignment with this reference survey was accepted may read it: that assignment, or null. */
async function readsAsReference(tx: Tx, userId: number, surveyId: number): Promise<{ assignmentId: number; title: string } | null> {
  const r = await tx.execute<{ id: number; title: string }>(sql`
    SELECT a.id, a.title FROM assignments a JOIN surveys sv ON sv.assignment_id = a.id
    WHERE a.reference_survey_id = ${surveyId} AND sv.started_by = ${userId} AND sv.state = 'accepted' ORDER BY a.id LIMIT 1`);
  const a = r.rows[0];
  return a ? { assignmentId: a.id, title: a.title } : null;
}

/**
 * The survey and its set if `user` may see it; a 404 otherwise (same answer as no survey).
 * An ordinary survey: whoever sees its set (owner, shared-with, admin). A class survey
 * (`assignment_id` set): only its student, its class's instructor and admins — never through the
 * training set's owner or sharing. The reference survey of an assignment also opens, read-only,
 * to a student whose own survey of that assignment was accepted.
 */
export async function visibleSurvey(tx: Tx, user: Actor, surveyId: number, lock = false): Promise<SurveyAccess> {
  const survey = await findSurvey(tx, surveyId, lock);
  if (!survey) throw notFound('No such survey.');
  const admin = user.roles.includes('admin');
  if (survey.assignmentId !== null) {
    const link = await classLinkOf(tx, survey.assignmentId);
    const viewer: SurveyViewer | null = !link ? null : survey.startedBy === user.id ? 'student' : link.instructorId === user.id ? 'instructor' : admin ? 'admin' : null;
    if (!link || viewer === null) throw notFound('No such survey.');
    const found = await findSet(tx, survey.setId, user.id);
    if (!found) throw notFound('No such survey.');
    return { survey, access: { set: found.set, owner: false, admin, shared: false }, viewer, classLink: link };
  }
  try {
    return { survey, access: await visibleSet(tx, user, survey.setId), viewer: 'set', classLink: null };
  } catch {
    const referenceFor = await readsAsReference(tx, user.id, surveyId);
    if (referenceFor) {
      const found = await findSet(tx, survey.setId, user.id);
      if (found) return { survey, access: { set: found.set, owner: false, admin, shared: false }, viewer: 'reference', classLink: null, referenceFor };
    }
    throw notFound('No such survey.');
  }
}

/**
 * The survey if `user` may change it: an ordinary survey's set people; a class survey's student
 * only. Those who may only read it (its instructor, an admin, a student reading a reference) are
 * told so (403); anyone else gets the 404 of visibleSurvey. The survey's state is the caller's.
 */
export async function writableSurvey(tx: Tx, user: Actor, surveyId: number, lock = false): Promise<SurveyAccess> {
  const a = await visibleSurvey(tx, user, surveyId, lock);
  if (a.viewer === 'reference') throw forbidden('The reference survey is yours to read, not to change.', 'read-only');
  if (a.classLink !== null && a.viewer !== 'student') throw forbidden('Only the student whose class survey this is may change it.', 'read-only');
  return a;
}

/** The set's ordinary surveys, oldest first (class surveys are the class's: never in a set's lists). */
export async function surveysOfSet(tx: Tx, setId: number): Promise<SurveyRow[]> {
  const rows = await tx
    .select({ s: surveys, startedByName: users.name })
    .from(surveys)
    .leftJoin(users, eq(users.id, surveys.startedBy))
    .where(and(eq(surveys.setId, setId), isNull(surveys.assignmentId)))
    .orderBy(asc(surveys.createdAt), asc(surveys.id));
  return rows.map((r) => ({ ...r.s, startedByName: r.startedByName }));
}

/** The ordinary surveys of the set a survey belongs to (as surveysOfSet, found from the survey's id: no access check). */
export async function surveysBesides(tx: Tx, surveyId: number): Promise<SurveyRow[]> {
  const rows = await tx
    .select({ s: surveys, startedByName: users.name })
    .from(surveys)
    .leftJoin(users, eq(users.id, surveys.startedBy))
    .where(and(sql`${surveys.setId} = (SELECT set_id FROM surveys WHERE id = ${surveyId})`, isNull(surveys.assignmentId)))
    .orderBy(asc(surveys.createdAt), asc(surveys.id));
  return rows.map((r) => ({ ...r.s, startedByName: r.startedByName }));
}

// ---------------------------------------------------------------------------------------------
// Readings

const enteredByUser = alias(users, 'entered_by_user');
const readingColumns = {
  id: readings.id,
  surveyId: readings.surveyId,
  testPointKey: readings.testPointKey,
  clientKey: readings.clientKey,
  followsReadingId: readings.followsReadingId,
  text: readings.text,
  state: readings.state,
  ohms: readings.ohms,
  method: readings.method,
  liftedEnd: readings.liftedEnd,
  rangeIndex: readings.rangeIndex,
  note: readings.note,
  prediction: readings.prediction,
  enteredBy: readings.enteredBy,
  enteredByName: enteredByUser.name,
  takenAt: readings.takenAt,
  version: readings.version,
  updatedAt: readings.updatedAt,
};
export type ReadingRow = {
  id: number;
  surveyId: number;
  testPointKey: string;
  clientKey: string;
  followsReadingId: number | null;
  text: string;
  state: ReadingState;
  ohms: number | null;
  method: Method;
  liftedEnd: number | null;
  rangeIndex: number | null;
  note: string;
  prediction: string | null;
  enteredBy: number | null;
  enteredByName: string | null;
  takenAt: Date;
  version: number;
  updatedAt: Date;
};

export function readingRecordOf(r: ReadingRow): ReadingRecord {
  return {
    id: Number(r.id),
    testPointKey: r.testPointKey,
    clientKey: r.clientKey,
    followsReadingId: r.followsReadingId === null ? null : Number(r.followsReadingId),
    text: r.text,
    state: r.state,
    ohms: r.ohms,
    method: r.method,
    liftedEnd: r.liftedEnd === null ? null : (r.liftedEnd as 0 | 1),
    rangeIndex: r.rangeIndex,
    note: r.note,
    prediction: r.prediction,
    enteredBy: r.enteredBy === null ? null : { id: r.enteredBy, name: r.enteredByName ?? '' },
    takenAt: new Date(r.takenAt).toISOString(),
    version: r.version,
    updatedAt: new Date(r.updatedAt).toISOString(),
  };
}

/**
 * A survey's readings in the order they were stored, as the wire records. Built as one JSON
 * document by PostgreSQL (timestamps already in ISO 8601): a 400-reading survey crosses as one
 * value instead of 400 rows of 18 typed columns, which the survey view's speed target needs.
 */
export async function readingsOf(tx: Tx, surveyId: number): Promise<ReadingRecord[]> {
  const r = await tx.execute<{ list: ReadingRecord[] | null }>(sql`
    SELECT json_agg(json_build_object(
      'id', r.id, 'testPointKey', r.test_point_key, 'clientKey', r.client_key, 'followsReadingId', r.follows_reading_id,
      'text', r.text, 'state', r.state, 'ohms', r.ohms, 'method', r.method, 'liftedEnd', r.lifted_end, 'rangeIndex', r.range_index,
      'note', r.note, 'prediction', r.prediction,
      'enteredBy', CASE WHEN r.entered_by IS NULL THEN NULL ELSE json_build_object('id', r.entered_by, 'name', coalesce(u.name, '')) END,
      'takenAt', to_char(r.taken_at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"'),
      'version', r.version,
      'updatedAt', to_char(r.updated_at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"')
    ) ORDER BY r.id) AS list
    FROM readings r LEFT JOIN users u ON u.id = r.entered_by
    WHERE r.survey_id = ${surveyId}`);
  return r.rows[0]?.list ?? [];
}

/** The current values of the newest earlier ordinary survey of the same set (as currentValuesOf), found from this survey's id. */
export async function previousValuesOf(tx: Tx, surveyId: number): Promise<{ surveyId: number; list: { testPointKey: string; text: string; state: ReadingState; ohms: number | null }[] } | null> {
  const r = await tx.execute<{ id: number | null; list: { testPointKey: string; text: string; state: ReadingState; ohms: number | null }[] | null }>(sql`
    WITH me AS (SELECT id, set_id, created_at FROM surveys WHERE id = ${surveyId}),
    prev AS (
      SELECT s.id FROM surveys s, me
      WHERE s.set_id = me.set_id AND s.assignment_id IS NULL AND (s.created_at < me.created_at OR (s.created_at = me.created_at AND s.id < me.id))
      ORDER BY s.created_at DESC, s.id DESC LIMIT 1
    )
    SELECT (SELECT id FROM prev) AS id,
      (SELECT json_agg(json_build_object('testPointKey', c.test_point_key, 'text', c.text, 'state', c.state, 'ohms', c.ohms) ORDER BY c.id)
       FROM (
         SELECT DISTINCT ON (r.test_point_key) r.id, r.test_point_key, r.text, r.state, r.ohms
         FROM readings r
         WHERE r.survey_id = (SELECT id FROM prev)
           AND NOT EXISTS (SELECT 1 FROM readings f WHERE f.survey_id = r.survey_id AND f.follows_reading_id = r.id)
         ORDER BY r.test_point_key, r.id DESC
       ) c) AS list`);
  const row = r.rows[0];
  return row && row.id !== null ? { surveyId: row.id, list: row.list ?? [] } : null;
}

/** The current value of each test point of a survey (the newest reading no follow-up supersedes), in stored order. */
export async function currentValuesOf(tx: Tx, surveyId: number): Promise<{ testPointKey: string; text: string; state: ReadingState; ohms: number | null }[]> {
  const r = await tx.execute<{ list: { testPointKey: string; text: string; state: ReadingState; ohms: number | null }[] | null }>(sql`
    SELECT json_agg(json_build_object('testPointKey', c.test_point_key, 'text', c.text, 'state', c.state, 'ohms', c.ohms) ORDER BY c.id) AS list
    FROM (
      SELECT DISTINCT ON (r.test_point_key) r.id, r.test_point_key, r.text, r.state, r.ohms
      FROM readings r
      WHERE r.survey_id = ${surveyId}
        AND NOT EXISTS (SELECT 1 FROM readings f WHERE f.survey_id = r.survey_id AND f.follows_reading_id = r.id)
      ORDER BY r.test_point_key, r.id DESC
    ) c`);
  return r.rows[0]?.list ?? [];
}

/** The readings of several surveys (one query, one JSON document as readingsOf), by survey id. */
export async function readingsOfSurveys(tx: Tx, surveyIds: number[]): Promise<Map<number, ReadingRecord[]>> {
  const out = new Map<number, ReadingRecord[]>(surveyIds.map((id) => [id, []]));
  if (!surveyIds.length) return out;
  const r = await tx.execute<{ list: (ReadingRecord & { surveyId: number })[] | null }>(sql`
    SELECT json_agg(json_build_object(
      'surveyId', r.survey_id,
      'id', r.id, 'testPointKey', r.test_point_key, 'clientKey', r.client_key, 'followsReadingId', r.follows_reading_id,
      'text', r.text, 'state', r.state, 'ohms', r.ohms, 'method', r.method, 'liftedEnd', r.lifted_end, 'rangeIndex', r.range_index,
      'note', r.note, 'prediction', r.prediction,
      'enteredBy', CASE WHEN r.entered_by IS NULL THEN NULL ELSE json_build_object('id', r.entered_by, 'name', coalesce(u.name, '')) END,
      'takenAt', to_char(r.taken_at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"'),
      'version', r.version,
      'updatedAt', to_char(r.updated_at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"')
    ) ORDER BY r.id) AS list
    FROM readings r LEFT JOIN users u ON u.id = r.entered_by
    WHERE r.survey_id IN (${sql.join(
      surveyIds.map((i) => sql`${i}`),
      sql`, `,
    )})`);
  for (const rec of r.rows[0]?.list ?? []) {
    const { surveyId, ...reading } = rec;
    out.get(surveyId)?.push(reading);
  }
  return out;
}

/** Whether a reading was frozen in one of the survey's attempts (a submitted class survey). */
export async function frozenInAttempt(tx: Tx, surveyId: number, readingId: number): Promise<boolean> {
  const r = await tx.execute(sql`
    SELECT 1 FROM attempts a WHERE a.survey_id = ${surveyId} AND a.readings @> ${JSON.stringify([{ id: readingId }])}::jsonb LIMIT 1`);
  return r.rows.length > 0;
}

export async function findReading(tx: Tx, surveyId: number, readingId: number, lock = false): Promise<ReadingRecord | undefined> {
  const q = tx
    .select(readingColumns)
    .from(readings)
    .leftJoin(enteredByUser, eq(enteredByUser.id, readings.enteredBy))
    .where(and(eq(readings.surveyId, surveyId), eq(readings.id, readingId)));
  const [row] = lock ? await q.for('update', { of: readings }) : await q;
  return row ? readingRecordOf(row as ReadingRow) : undefined;
}

export async function findReadingByClientKey(tx: Tx, surveyId: number, clientKey: string): Promise<ReadingRecord | undefined> {
  const [row] = await tx
    .select(readingColumns)
    .from(readings)
    .leftJoin(enteredByUser, eq(enteredByUser.id, readings.enteredBy))
    .where(and(eq(readings.surveyId, surveyId), eq(readings.clientKey, clientKey)));
  return row ? readingRecordOf(row as ReadingRow) : undefined;
}

// ---------------------------------------------------------------------------------------------
// Amendments and lifted leads

export async function amendmentsOf(tx: Tx, surveyId: number): Promise<AmendmentRecord[]> {
  const rows = await tx
    .select({ a: surveyAmendments, name: users.name })
    .from(surveyAmendments)
    .leftJoin(users, eq(users.id, surveyAmendments.amendedBy))
    .where(eq(surveyAmendments.surveyId, surveyId))
    .orderBy(asc(surveyAmendments.id));
  return rows.map(({ a, name }) => ({
    id: a.id,
    readingId: a.readingId === null ? null : Number(a.readingId),
    reason: a.reason,
    change: a.change as { before: unknown; after: unknown },
    amendedBy: a.amendedBy === null ? null : { id: a.amendedBy, name: name ?? '' },
    createdAt: a.createdAt.toISOString(),
  }));
}

const lifter = alias(users, 'lifter');
const resolderer = alias(users, 'resolderer');

export async function liftedLeadsOf(tx: Tx, setId: number, leadId?: number, lock = false): Promise<LiftedLeadRecord[]> {
  const q = tx
    .select({ l: liftedLeads, lifterName: lifter.name, resoldererName: resolderer.name })
    .from(liftedLeads)
    .leftJoin(lifter, eq(lifter.id, liftedLeads.liftedBy))
    .leftJoin(resolderer, eq(resolderer.id, liftedLeads.resolderedBy))
    .where(and(eq(liftedLeads.setId, setId), leadId === undefined ? undefined : eq(liftedLeads.id, leadId)))
    .orderBy(desc(liftedLeads.liftedAt), desc(liftedLeads.id));
  const rows = lock ? await q.for('update', { of: liftedLeads }) : await q;
  return rows.map(({ l, lifterName, resoldererName }) => ({
    id: l.id,
    setId: l.setId,
    surveyId: l.surveyId,
    componentKey: l.componentKey,
    componentRef: l.componentRef,
    end: l.end as 0 | 1,
    node: l.node,
    promptedByReadingId: l.promptedByReadingId === null ? null : Number(l.promptedByReadingId),
    liftedBy: l.liftedBy === null ? null : { id: l.liftedBy, name: lifterName ?? '' },
    liftedAt: l.liftedAt.toISOString(),
    resolderedBy: l.resolderedBy === null ? null : { id: l.resolderedBy, name: resoldererName ?? '' },
    resolderedAt: l.resolderedAt?.toISOString() ?? null,
    recheckReadingId: l.recheckReadingId === null ? null : Number(l.recheckReadingId),
    note: l.note,
  }));
}

export type { AcceptanceRule, MeterCheck, SurveyConditions };
