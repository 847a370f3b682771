/**
 * Queries of classes and assignments (DESIGN.md §2 "class", "assignment"): each takes `db` or a
 * transaction `tx`.
 *
 * Who sees a class: its instructor (classes.instructor_id), its students (members not removed)
 * and admins. Anyone else gets a 404, the same answer as for a class that does not exist. Changes
 * to a class and its assignments are its instructor's (an admin sees them but may not: 403).
 */
import { sql } from 'drizzle-orm';
import type { StudentStatus } from '../domain/class-format';
import type { AcceptanceRule } from '../domain/verdict';
import type { Tx } from '../db';
import { forbidden, notFound } from '../http/errors';
import type { Actor } from '../sets/sets.repository';

/** The caller's place in a class. */
export type ClassRole = 'instructor' | 'student' | 'admin';

export interface ClassRow {
  id: number;
  instructorId: number;
  instructorName: string;
  name: string;
  term: string;
  archivedAt: Date | null;
  createdAt: Date;
}

export interface ClassAccess {
  cls: ClassRow;
  role: ClassRole;
}

export const iso = (v: string | Date): string => (v instanceof Date ? v : new Date(v)).toISOString();
const toDate = (v: string | Date): Date => (v instanceof Date ? v : new Date(v));

type RawClass = { id: number; instructor_id: number; instructor_name: string; name: string; term: string; archived_at: string | Date | null; created_at: string | Date; member: boolean };

export const classRowOf = (r: Omit<RawClass, 'member'>): ClassRow => ({
  id: r.id,
  instructorId: r.instructor_id,
  instructorName: r.instructor_name,
  name: r.name,
  term: r.term,
  archivedAt: r.archived_at === null ? null : toDate(r.archived_at),
  createdAt: toDate(r.created_at),
});

/** The select list of a class row (aliases: c = classes, iu = the instructor). */
export const CLASS_SELECT = sql`c.id, c.instructor_id, iu.name AS instructor_name, c.name, c.term, c.archived_at, c.created_at`;
export const CLASS_FROM = sql`classes c JOIN users iu ON iu.id = c.instructor_id`;

/** The caller's role in a class, or null when they have none. */
export function roleIn(cls: Pick<ClassRow, 'instructorId'>, actor: Actor, member: boolean): ClassRole | null {
  if (cls.instructorId === actor.id) return 'instructor';
  if (member) return 'student';
  if (actor.roles.includes('admin')) return 'admin';
  return null;
}

/** The class if `actor` may see it (its instructor, a current student, an admin); a 404 otherwise. */
export async function visibleClass(tx: Tx, actor: Actor, classId: number, lock = false): Promise<ClassAccess> {
  const r = await tx.execute<RawClass>(sql`
    SELECT ${CLASS_SELECT},
      EXISTS (SELECT 1 FROM class_members m WHERE m.class_id = c.id AND m.student_id = ${actor.id} AND m.removed_at IS NULL) AS member
    FROM ${CLASS_FROM} WHERE c.id = ${classId} ${lock ? sql`FOR UPDATE OF c` : sql``}`);
  const row = r.rows[0];
  const role = row ? roleIn({ instructorId: row.instructor_id }, actor, row.member) : null;
  if (!row || !role) throw notFound('No such class.');
  return { cls: classRowOf(row), role };
}

/** The class if `actor` is its instructor: a 404 for those who cannot see it, a 403 for its students and admins. */
export async function instructedClass(tx: Tx, actor: Actor, classId: number, lock = true): Promise<ClassAccess> {
  const a = await visibleClass(tx, actor, classId, lock);
  if (a.role !== 'instructor') throw forbidden("Only the class's instructor may do this.", 'not-instructor');
  return a;
}

// ---------------------------------------------------------------------------------------------
// Assignments

export interface AssignmentRow {
  id: number;
  classId: number;
  title: string;
  instructions: string;
  templateId: number;
  templateVersionId: number;
  versionNumber: number;
  setId: number;
  setLabel: string;
  setSerial: string;
  maker: string;
  model: string;
  hotChassis: boolean;
  referenceSurveyId: number | null;
  dueAt: Date;
  rule: AcceptanceRule;
  predictFirst: boolean;
  showVerdicts: boolean;
  createdAt: Date;
}

type RawAssignment = {
  id: number;
  class_id: number;
  title: string;
  instructions: string;
  template_id: number;
  template_version_id: number;
  version_number: number;
  set_id: number;
  set_label: string;
  set_serial: string;
  maker: string;
  model: string;
  hot_chassis: boolean;
  reference_survey_id: number | null;
  due_at: string | Date;
  rule: AcceptanceRule;
  predict_first: boolean;
  show_verdicts: boolean;
  created_at: string | Date;
};

const assignmentRowOf = (r: RawAssignment): AssignmentRow => ({
  id: r.id,
  classId: r.class_id,
  title: r.title,
  instructions: r.instructions,
  templateId: r.template_id,
  templateVersionId: r.template_version_id,
  versionNumber: r.version_number,
  setId: r.set_id,
  setLabel: r.set_label,
  setSerial: r.set_serial,
  maker: r.maker,
  model: r.model,
  hotChassis: r.hot_chassis,
  referenceSurveyId: r.reference_survey_id,
  dueAt: toDate(r.due_at),
  rule: r.rule,
  predictFirst: r.predict_first,
  showVerdicts: r.show_verdicts,
  createdAt: toDate(r.created_at),
});

/** Assignment columns with the training set's card (aliases: a = assignments, s = sets, t = chassis_templates). */
const ASSIGNMENT_SELECT = sql`
  a.id, a.class_id, a.title, a.instructions, a.template_id, a.template_version_id, a.version_number, a.set_id,
  s.label AS set_label, s.serial AS set_serial, t.maker, t.model,
  coalesce((a_v.content->'chassis'->>'hotChassis')::boolean, t.power IN ('ac-dc', 'autotransformer')) AS hot_chassis,
  a.reference_survey_id, a.due_at, a.rule, a.predict_first, a.show_verdicts, a.created_at`;
const ASSIGNMENT_FROM = sql`assignments a JOIN sets s ON s.id = a.set_id JOIN chassis_templates t ON t.id = a.template_id
  JOIN template_versions a_v ON a_v.id = a.template_version_id`;

/** The assignments of a class, by due date. */
export async function assignmentsOfClass(tx: Tx, classId: number): Promise<AssignmentRow[]> {
  const r = await tx.execute<RawAssignment>(sql`SELECT ${ASSIGNMENT_SELECT} FROM ${ASSIGNMENT_FROM} WHERE a.class_id = ${classId} ORDER BY a.due_at, a.id`);
  return r.rows.map(assignmentRowOf);
}

export async function findAssignment(tx: Tx, assignmentId: number, lock = false): Promise<AssignmentRow | undefined> {
  const r = await tx.execute<RawAssignment>(sql`SELECT ${ASSIGNMENT_SELECT} FROM ${ASSIGNMENT_FROM} WHERE a.id = ${assignmentId} ${lock ? sql`FOR UPDATE OF a` : sql``}`);
  return r.rows[0] ? assignmentRowOf(r.rows[0]) : undefined;
}

export interface AssignmentAccess {
  assignment: AssignmentRow;
  cls: ClassRow;
  role: ClassRole;
}

/**
 * The assignment if `actor` may see it: the instructor of its class (all of it), a current
 * student of the class (their own view), an admin; a 404 otherwise.
 */
export async function visibleAssignment(tx: Tx, actor: Actor, assignmentId: number, lock = false): Promise<AssignmentAccess> {
  const assignment = await findAssignment(tx, assignmentId, lock);
  if (!assignment) throw notFound('No such assignment.');
  try {
    const a = await visibleClass(tx, actor, assignment.classId);
    return { assignment, cls: a.cls, role: a.role };
  } catch {
    throw notFound('No such assignment.');
  }
}

/** The assignment if `actor` instructs its class: a 404 for those who cannot see it, a 403 for its students and admins. */
export async function instructedAssignment(tx: Tx, actor: Actor, assignmentId: number, lock = true): Promise<AssignmentAccess> {
  const a = await visibleAssignment(tx, actor, assignmentId, lock);
  if (a.role !== 'instructor') throw forbidden("Only the class's instructor may do this.", 'not-instructor');
  return a;
}

/** A class survey's state as a student status. */
export function statusOf(state: string | null | undefined): StudentStatus {
  switch (state) {
    case 'submitted':
    case 'returned':
    case 'accepted':
      return state;
    case 'draft':
    case 'complete':
      return 'draft';
    default:
      return 'not-started';
  }
}
