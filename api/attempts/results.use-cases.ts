/**
 * Class results (issue #6 item 6): students × assignments (status, score, attempts, late), and
 * per assignment and test point the share of students whose newest attempt agreed with the
 * reference (E_n ≤ 1 where comparable, DESIGN.md §3.9) — where do students go wrong? Also as CSV.
 */
import { sql } from 'drizzle-orm';
import type { Ctx } from '../context';
import type { ClassResults, StudentStatus } from '../domain/class-format';
import { csvField } from '../domain/replacement-list';
import { forbidden } from '../http/errors';
import type { Actor } from '../sets/sets.repository';
import { assignmentsOfClass, statusOf, visibleClass } from '../classes/classes.repository';
import { findSurvey } from '../surveys/surveys.repository';
import { latestAttempts } from './attempts.repository';
import { comparePoints, pointLabel } from './review-view';
import { attemptSide, referenceSide } from './reviews.use-cases';

/** GET /api/classes/:id/results — the instructor and admins (a student of the class: 403). */
export async function classResults(ctx: Ctx, actor: Actor, classId: number): Promise<ClassResults> {
  const db = ctx.db;
  const { cls, role } = await visibleClass(db, actor, classId);
  if (role === 'student') throw forbidden("Only the class's instructor sees the class's results.", 'not-instructor');
  const list = await assignmentsOfClass(db, classId);
  const students = (
    await db.execute<{ id: number; name: string }>(sql`
      SELECT u.id, u.name FROM class_members m JOIN users u ON u.id = m.student_id
      WHERE m.class_id = ${cls.id} AND m.removed_at IS NULL ORDER BY u.name, u.id`)
  ).rows;
  const ids = list.map((a) => a.id);
  const surveyRows = ids.length
    ? (
        await db.execute<{ id: number; assignment_id: number; started_by: number; state: string; attempts: number; score: number | null }>(sql`
          SELECT sv.id, sv.assignment_id, sv.started_by, sv.state,
            (SELECT count(*)::int FROM attempts x WHERE x.survey_id = sv.id) AS attempts,
            (SELECT rv.score FROM reviews rv JOIN attempts x ON x.id = rv.attempt_id WHERE x.survey_id = sv.id ORDER BY x.number DESC LIMIT 1) AS score
          FROM surveys sv WHERE sv.assignment_id IN ${ids}`)
      ).rows
    : [];
  const byPair = new Map(surveyRows.map((s) => [`${s.started_by}:${s.assignment_id}`, s]));
  const latest = await latestAttempts(
    db,
    surveyRows.map((s) => s.id),
  );
  const now = Date.now();

  const cells: ClassResults['cells'] = students.map((st) =>
    list.map((a) => {
      const s = byPair.get(`${st.id}:${a.id}`);
      const status: StudentStatus = statusOf(s?.state);
      const last = s ? latest.get(s.id) : undefined;
      const late = last ? last.submittedAt.getTime() > a.dueAt.getTime() : (status === 'not-started' || status === 'draft') && now > a.dueAt.getTime();
      return { status, score: s?.score ?? null, attempts: s?.attempts ?? 0, late };
    }),
  );

  const points: ClassResults['points'] = [];
  const memberIds = new Set(students.map((s) => s.id));
  for (const a of list) {
    const reference = await referenceSide(db, a.referenceSurveyId);
    const tally = new Map<string, { label: string; compared: number; agreed: number }>();
    for (const s of surveyRows) {
      if (s.assignment_id !== a.id || !memberIds.has(s.started_by)) continue;
      const attempt = latest.get(s.id);
      const survey = attempt ? await findSurvey(db, s.id) : undefined;
      if (!attempt || !survey) continue;
      const { points: compared } = comparePoints(await attemptSide(db, { attempt, survey }), reference);
      for (const p of compared) {
        const t = tally.get(p.row.testPointKey) ?? { label: p.label, compared: 0, agreed: 0 };
        if (p.comparison.agreement !== 'not-comparable') {
          t.compared++;
          if (p.comparison.agreement === 'agree') t.agreed++;
        }
        tally.set(p.row.testPointKey, t);
      }
    }
    // Every test point of the assignment, in bench order, also those nobody has submitted yet.
    if (tally.size === 0 && reference) for (const row of reference.grid.rows) if (row.kind !== 'pair-relation') tally.set(row.testPointKey, { label: pointLabel(row), compared: 0, agreed: 0 });
    for (const [testPointKey, t] of tally)
      points.push({ assignmentId: a.id, testPointKey, label: t.label, compared: t.compared, agreed: t.agreed, share: t.compared === 0 ? null : Math.round((t.agreed / t.compared) * 1000) / 10 });
  }

  return {
    classId: cls.id,
    assignments: list.map((a) => ({ id: a.id, title: a.title, dueAt: a.dueAt.toISOString() })),
    students: students.map((s) => ({ id: s.id, name: s.name })),
    cells,
    points,
  };
}

export const RESULTS_CSV_HEADER = ['student id', 'student', 'assignment id', 'assignment', 'due', 'status', 'score', 'attempts', 'late'];

/** GET /api/classes/:id/results.csv — one row per student and assignment (RFC 4180, header row first). */
export function resultsCsv(r: ClassResults): string {
  const rows: (string | number | null)[][] = [RESULTS_CSV_HEADER];
  r.students.forEach((st, i) =>
    r.assignments.forEach((a, j) => {
      const c = r.cells[i][j];
      rows.push([st.id, st.name, a.id, a.title, a.dueAt, c.status, c.score, c.attempts, c.late ? 'yes' : 'no']);
    }),
  );
  return rows.map((x) => x.map(csvField).join(',')).join('\r\n') + '\r\n';
}
