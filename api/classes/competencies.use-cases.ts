/**
 * Competency sign-offs (issue #6 item 5): a student's own record, separate from any set's safety
 * gate. Append-only: a sign-off is withdrawn by a note on its row, never deleted; signing off
 * again after a withdrawal adds a new row.
 *
 * Who reads a record: the student themself, an instructor of a class they are or were in, an
 * admin; anyone else gets a 404. Who signs off: an instructor of a class the student is in now.
 * Who withdraws: the instructor who signed, or an admin.
 */
import { and, eq, isNull, sql } from 'drizzle-orm';
import { competencySignoffs, users } from '../../schema/index';
import type { Ctx } from '../context';
import { COMPETENCIES, type CompetencyKey, type CompetencyRecord, type CompetencySignoff } from '../domain/class-format';
import type { Tx } from '../db';
import { conflict, forbidden, notFound } from '../http/errors';
import type { Actor } from '../sets/sets.repository';
import { iso } from './classes.repository';

/** GET /api/competencies */
export function catalogue(): { items: { key: CompetencyKey; title: string }[] } {
  return { items: COMPETENCIES.map((c) => ({ key: c.key, title: c.title })) };
}

/** May `actor` read `studentId`'s record? (self, an instructor of a class they are or were in, admin) */
async function mayRead(tx: Tx, actor: Actor, studentId: number): Promise<boolean> {
  if (actor.id === studentId || actor.roles.includes('admin')) return true;
  const r = await tx.execute<{ ok: boolean }>(sql`
    SELECT EXISTS (SELECT 1 FROM class_members m JOIN classes c ON c.id = m.class_id WHERE m.student_id = ${studentId} AND c.instructor_id = ${actor.id}) AS ok`);
  return r.rows[0].ok;
}

type RawSignoff = {
  id: number;
  student_id: number;
  competency_key: CompetencyKey;
  class_id: number | null;
  signed_by: number | null;
  signer_name: string | null;
  note: string;
  created_at: string | Date;
  withdrawn_at: string | Date | null;
  withdrawn_by: number | null;
  withdrawer_name: string | null;
  withdrawn_note: string | null;
};

const signoffOf = (r: RawSignoff): CompetencySignoff => ({
  id: r.id,
  studentId: r.student_id,
  competencyKey: r.competency_key,
  classId: r.class_id,
  signedBy: r.signed_by === null ? null : { id: r.signed_by, name: r.signer_name ?? '' },
  note: r.note,
  createdAt: iso(r.created_at),
  withdrawnAt: r.withdrawn_at === null ? null : iso(r.withdrawn_at),
  withdrawnBy: r.withdrawn_by === null ? null : { id: r.withdrawn_by, name: r.withdrawer_name ?? '' },
  withdrawnNote: r.withdrawn_note,
});

async function signoffs(tx: Tx, where: ReturnType<typeof sql>): Promise<CompetencySignoff[]> {
  const r = await tx.execute<RawSignoff>(sql`
    SELECT cs.id, cs.student_id, cs.competency_key, cs.class_id, cs.signed_by, su.name AS signer_name, cs.note, cs.created_at,
      cs.withdrawn_at, cs.withdrawn_by, wu.name AS withdrawer_name, cs.withdrawn_note
    FROM competency_signoffs cs LEFT JOIN users su ON su.id = cs.signed_by LEFT JOIN users wu ON wu.id = cs.withdrawn_by
    WHERE ${where}
    ORDER BY cs.created_at DESC, cs.id DESC`);
  return r.rows.map(signoffOf);
}

/** GET /api/students/:id/competencies */
export async function record(ctx: Ctx, actor: Actor, studentId: number): Promise<CompetencyRecord> {
  const [student] = await ctx.db.select({ id: users.id, name: users.name }).from(users).where(eq(users.id, studentId));
  if (!student || !(await mayRead(ctx.db, actor, studentId))) throw notFound('No such student.');
  const history = await signoffs(ctx.db, sql`cs.student_id = ${studentId}`);
  return {
    student,
    items: COMPETENCIES.map((c) => ({ key: c.key, title: c.title, current: history.find((h) => h.competencyKey === c.key && h.withdrawnAt === null) ?? null })),
    history,
  };
}

/** POST /api/students/:id/competencies */
export async function signOff(ctx: Ctx, actor: Actor, studentId: number, input: { competencyKey: CompetencyKey; classId?: number; note?: string }): Promise<CompetencySignoff> {
  return ctx.db.transaction(async (tx) => {
    // The classes the caller teaches that the student is in now (the named one, when given).
    const r = await tx.execute<{ id: number }>(sql`
      SELECT c.id FROM classes c JOIN class_members m ON m.class_id = c.id
      WHERE c.instructor_id = ${actor.id} AND m.student_id = ${studentId} AND m.removed_at IS NULL
        ${input.classId !== undefined ? sql`AND c.id = ${input.classId}` : sql``}
      ORDER BY c.created_at DESC, c.id DESC LIMIT 1
      FOR UPDATE OF m`);
    if (r.rows.length === 0) {
      if (input.classId !== undefined && (await mayRead(tx, actor, studentId)))
        throw notFound(`The student is not in a class ${input.classId} of yours.`, 'not-found');
      throw notFound('No such student in your classes.');
    }
    const [open] = await tx
      .select({ id: competencySignoffs.id })
      .from(competencySignoffs)
      .where(and(eq(competencySignoffs.studentId, studentId), eq(competencySignoffs.competencyKey, input.competencyKey), isNull(competencySignoffs.withdrawnAt)));
    if (open) throw conflict('This competency is signed off for the student already (withdraw that sign-off first to sign it again).', 'already-signed-off', { signoffId: open.id });
    const [row] = await tx
      .insert(competencySignoffs)
      .values({ studentId, competencyKey: input.competencyKey, classId: input.classId ?? r.rows[0].id, signedBy: actor.id, note: (input.note ?? '').trim() })
      .returning({ id: competencySignoffs.id });
    return (await signoffs(tx, sql`cs.id = ${row.id}`))[0];
  });
}

/** POST /api/competency-signoffs/:id/withdraw */
export async function withdraw(ctx: Ctx, actor: Actor, signoffId: number, note: string): Promise<CompetencySignoff> {
  return ctx.db.transaction(async (tx) => {
    const [s] = await tx.select().from(competencySignoffs).where(eq(competencySignoffs.id, signoffId)).for('update');
    if (!s || !(await mayRead(tx, actor, s.studentId))) throw notFound('No such sign-off.');
    if (s.signedBy !== actor.id && !actor.roles.includes('admin')) throw forbidden('Only the instructor who signed this off, or an admin, may withdraw it.', 'not-signer');
    if (s.withdrawnAt) throw conflict('This sign-off was withdrawn already.', 'already-withdrawn');
    await tx
      .update(competencySignoffs)
      .set({ withdrawnAt: sql`now()`, withdrawnBy: actor.id, withdrawnNote: note.trim() })
      .where(eq(competencySignoffs.id, signoffId));
    return (await signoffs(tx, sql`cs.id = ${signoffId}`))[0];
  });
}
