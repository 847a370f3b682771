/**
 * Classes (issue #6 item 1): an instructor's classes, the students in them and the invitations
 * that bring students in — a single-use link mailed through the outbox; only a hash of its token
 * is stored, and it expires after 14 days.
 *
 * Access (classes.repository.ts): the instructor sees and changes their class; its current
 * students see its name, term, instructor and assignments (no roster, no invitations); admins see
 * every class; anyone else gets a 404.
 */
import { and, eq, isNull, sql } from 'drizzle-orm';
import { classInvitations, classMembers, classes, users, type Role } from '../../schema/index';
import { createUserOrConflict, hashPassword, issueSession, publicUser, type PublicUser, type Session } from '../auth/auth.use-cases';
import { findUserByEmail } from '../auth/auth.repository';
import { hashToken, newOpaqueToken } from '../auth/tokens';
import type { Ctx } from '../context';
import type {
  AssignmentSummary,
  ClassDetail,
  ClassInput,
  ClassInvitation,
  ClassPatch,
  ClassStudent,
  ClassSummary,
  InvitationAccept,
  InvitationPreview,
  InvitationState,
} from '../domain/class-format';
import type { Tx } from '../db';
import { conflict, forbidden, notFound } from '../http/errors';
import type { Actor } from '../sets/sets.repository';
import { assignmentSummaries } from './assignments.use-cases';
import { CLASS_FROM, CLASS_SELECT, classRowOf, instructedClass, iso, roleIn, visibleClass, type ClassAccess, type ClassRow } from './classes.repository';
import { mailNotices, recordNotices, type Notice } from './notify';

export const CLASS_INVITATION_DAYS = 14;

type Counts = { student_count: number; assignment_count: number };
const COUNTS = sql`
  (SELECT count(*)::int FROM class_members m2 WHERE m2.class_id = c.id AND m2.removed_at IS NULL) AS student_count,
  (SELECT count(*)::int FROM assignments a2 WHERE a2.class_id = c.id) AS assignment_count`;

function summaryOf(c: ClassRow, role: ClassAccess['role'], counts: Counts): ClassSummary {
  return {
    id: c.id,
    name: c.name,
    term: c.term,
    instructor: { id: c.instructorId, name: c.instructorName },
    myRole: role,
    studentCount: counts.student_count,
    assignmentCount: counts.assignment_count,
    archived: c.archivedAt !== null,
    createdAt: c.createdAt.toISOString(),
  };
}

// ---------------------------------------------------------------------------------------------
// Classes

/** GET /api/classes — the caller's classes (taught or joined; admins every class), current first. */
export async function listClasses(ctx: Ctx, actor: Actor): Promise<{ items: ClassSummary[] }> {
  const admin = actor.roles.includes('admin');
  const r = await ctx.db.execute<Parameters<typeof classRowOf>[0] & Counts & { member: boolean }>(sql`
    SELECT ${CLASS_SELECT}, ${COUNTS},
      EXISTS (SELECT 1 FROM class_members m WHERE m.class_id = c.id AND m.student_id = ${actor.id} AND m.removed_at IS NULL) AS member
    FROM ${CLASS_FROM}
    WHERE ${admin ? sql`true` : sql`(c.instructor_id = ${actor.id} OR EXISTS (SELECT 1 FROM class_members m WHERE m.class_id = c.id AND m.student_id = ${actor.id} AND m.removed_at IS NULL))`}
    ORDER BY (c.archived_at IS NOT NULL), c.created_at DESC, c.id DESC`);
  return { items: r.rows.map((row) => summaryOf(classRowOf(row), roleIn({ instructorId: row.instructor_id }, actor, row.member)!, row)) };
}

async function countsOf(tx: Tx, classId: number): Promise<Counts> {
  const r = await tx.execute<Counts>(sql`SELECT ${COUNTS} FROM classes c WHERE c.id = ${classId}`);
  return r.rows[0];
}

const invitationState = (r: { acceptedAt: Date | null; revokedAt: Date | null; expiresAt: Date }, now = Date.now()): InvitationState =>
  r.revokedAt ? 'revoked' : r.acceptedAt ? 'accepted' : r.expiresAt.getTime() <= now ? 'expired' : 'open';

const invitationOf = (r: typeof classInvitations.$inferSelect): ClassInvitation => ({
  id: r.id,
  email: r.email,
  state: invitationState(r),
  createdAt: r.createdAt.toISOString(),
  expiresAt: r.expiresAt.toISOString(),
  acceptedAt: r.acceptedAt?.toISOString() ?? null,
});

async function studentsOf(tx: Tx, classId: number): Promise<ClassStudent[]> {
  const r = await tx.execute<{ id: number; name: string; email: string; joined_at: string | Date; removed_at: string | Date | null }>(sql`
    SELECT u.id, u.name, u.email, m.joined_at, m.removed_at
    FROM class_members m JOIN users u ON u.id = m.student_id
    WHERE m.class_id = ${classId}
    ORDER BY (m.removed_at IS NOT NULL), u.name, u.id`);
  return r.rows.map((s) => ({ student: { id: s.id, name: s.name, email: s.email }, joinedAt: iso(s.joined_at), removedAt: s.removed_at === null ? null : iso(s.removed_at) }));
}

async function invitationsOf(tx: Tx, classId: number): Promise<ClassInvitation[]> {
  const rows = await tx.select().from(classInvitations).where(eq(classInvitations.classId, classId)).orderBy(sql`${classInvitations.createdAt} DESC, ${classInvitations.id} DESC`);
  return rows.map(invitationOf);
}

/** The class as the caller sees it: a student gets no roster and no invitations. */
export async function classDetailOf(tx: Tx, actor: Actor, a: ClassAccess): Promise<ClassDetail> {
  const student = a.role === 'student';
  const counts = await countsOf(tx, a.cls.id);
  const students = student ? [] : await studentsOf(tx, a.cls.id);
  const invitations = student ? [] : await invitationsOf(tx, a.cls.id);
  const assignments: AssignmentSummary[] = await assignmentSummaries(tx, actor, a);
  return { ...summaryOf(a.cls, a.role, counts), students, invitations, assignments };
}

/** POST /api/classes */
export async function createClass(ctx: Ctx, actor: Actor, input: ClassInput): Promise<ClassDetail> {
  return ctx.db.transaction(async (tx) => {
    const [row] = await tx
      .insert(classes)
      .values({ instructorId: actor.id, name: input.name.trim(), term: (input.term ?? '').trim() })
      .returning({ id: classes.id });
    return classDetailOf(tx, actor, await visibleClass(tx, actor, row.id));
  });
}

/** GET /api/classes/:id */
export async function getClass(ctx: Ctx, actor: Actor, classId: number): Promise<ClassDetail> {
  return classDetailOf(ctx.db, actor, await visibleClass(ctx.db, actor, classId));
}

/** PATCH /api/classes/:id — rename, change the term, archive or bring back. */
export async function patchClass(ctx: Ctx, actor: Actor, classId: number, patch: ClassPatch): Promise<ClassDetail> {
  return ctx.db.transaction(async (tx) => {
    await instructedClass(tx, actor, classId);
    await tx
      .update(classes)
      .set({
        ...(patch.name !== undefined ? { name: patch.name.trim() } : {}),
        ...(patch.term !== undefined ? { term: patch.term.trim() } : {}),
        ...(patch.archived !== undefined ? { archivedAt: patch.archived ? sql`coalesce(${classes.archivedAt}, now())` : null } : {}),
        updatedAt: sql`now()`,
      })
      .where(eq(classes.id, classId));
    return classDetailOf(tx, actor, await visibleClass(tx, actor, classId));
  });
}

/** DELETE /api/classes/:id/students/:studentId — the student leaves the class; their work stays theirs. */
export async function removeStudent(ctx: Ctx, actor: Actor, classId: number, studentId: number): Promise<void> {
  await ctx.db.transaction(async (tx) => {
    await instructedClass(tx, actor, classId);
    const [m] = await tx
      .select()
      .from(classMembers)
      .where(and(eq(classMembers.classId, classId), eq(classMembers.studentId, studentId)));
    if (!m) throw notFound('No such student in this class.');
    if (m.removedAt) return;
    await tx
      .update(classMembers)
      .set({ removedAt: sql`now()`, removedBy: actor.id })
      .where(and(eq(classMembers.classId, classId), eq(classMembers.studentId, studentId)));
  });
}

// ---------------------------------------------------------------------------------------------
// Invitations

const normal = (email: string) => email.trim().toLowerCase();

/**
 * POST /api/classes/:id/invitations — one single-use link per address (an open earlier link to
 * the same address in this class is revoked), mailed after the commit; an address that already
 * has an account also gets an in-app notification (it carries no token: the link is in the mail).
 */
export async function invite(ctx: Ctx, actor: Actor, classId: number, emails: string[]): Promise<{ items: ClassInvitation[] }> {
  // One invitation per address (as first spelled).
  const byAddress = new Map<string, string>();
  for (const e of emails) if (!byAddress.has(normal(e))) byAddress.set(normal(e), e.trim());
  const wanted = [...byAddress.values()];
  const { made, mails, notices, cls } = await ctx.db.transaction(async (tx) => {
    const { cls } = await instructedClass(tx, actor, classId);
    const lower = wanted.map(normal);
    const already = await tx.execute<{ email: string }>(sql`
      SELECT u.email FROM class_members m JOIN users u ON u.id = m.student_id
      WHERE m.class_id = ${classId} AND m.removed_at IS NULL AND lower(u.email) IN ${lower}`);
    if (already.rows.length > 0) {
      const list = already.rows.map((r) => r.email);
      throw conflict(`Already in the class: ${list.join(', ')}. Leave ${list.length === 1 ? 'that address' : 'those addresses'} out and invite the others.`, 'already-member', { emails: list });
    }
    if (cls.archivedAt) throw conflict('This class is archived: bring it back before inviting students.', 'class-archived');
    await tx
      .update(classInvitations)
      .set({ revokedAt: sql`now()` })
      .where(
        and(
          eq(classInvitations.classId, classId),
          isNull(classInvitations.acceptedAt),
          isNull(classInvitations.revokedAt),
          sql`${classInvitations.expiresAt} > now()`,
          sql`lower(${classInvitations.email}) IN ${lower}`,
        ),
      );
    const expiresAt = new Date(Date.now() + CLASS_INVITATION_DAYS * 86400_000);
    const made: (typeof classInvitations.$inferSelect)[] = [];
    const mails: { to: string; token: string }[] = [];
    for (const email of wanted) {
      const token = newOpaqueToken();
      const [row] = await tx.insert(classInvitations).values({ classId, email, tokenHash: hashToken(token), invitedBy: actor.id, expiresAt }).returning();
      made.push(row);
      mails.push({ to: email, token });
    }
    const accounts = await tx.execute<{ id: number; email: string }>(sql`SELECT id, email FROM users WHERE lower(email) IN ${lower} AND active`);
    const notices: Notice[] = accounts.rows.map((u) => ({
      userId: u.id,
      kind: 'class-invitation',
      title: `Invitation to the class ${cls.name}`,
      body: `${cls.instructorName} invites you to the class “${cls.name}”${cls.term ? ` (${cls.term})` : ''}. Open the link in the e-mail sent to ${u.email} to join.`,
      link: '/classes',
      email: null,
    }));
    await recordNotices(tx, notices);
    return { made, mails, notices, cls };
  });
  for (const m of mails) {
    await ctx.outbox.send({
      to: m.to,
      subject: `Driftmark: join the class ${cls.name}`,
      text:
        `Hello,\n\n${cls.instructorName} invites you to the class “${cls.name}”${cls.term ? ` (${cls.term})` : ''} on Driftmark.\n` +
        `Open this link within ${CLASS_INVITATION_DAYS} days to join:\n\n${ctx.linkBase}/join/${m.token}\n\n` +
        `The link works once, for this e-mail address (${m.to}).\n`,
    });
  }
  await mailNotices(ctx, notices);
  return { items: made.map(invitationOf) };
}

/** DELETE /api/classes/:id/invitations/:invitationId — an open link stops working. */
export async function revokeInvitation(ctx: Ctx, actor: Actor, classId: number, invitationId: number): Promise<void> {
  await ctx.db.transaction(async (tx) => {
    await instructedClass(tx, actor, classId);
    const [inv] = await tx
      .select()
      .from(classInvitations)
      .where(and(eq(classInvitations.id, invitationId), eq(classInvitations.classId, classId)))
      .for('update');
    if (!inv) throw notFound('No such invitation in this class.');
    const state = invitationState(inv);
    if (state !== 'open') throw conflict(`This invitation is ${state}: only an open one can be revoked.`, 'invitation-not-open', { state });
    await tx.update(classInvitations).set({ revokedAt: sql`now()` }).where(eq(classInvitations.id, invitationId));
  });
}

type InvitationWithClass = typeof classInvitations.$inferSelect & { className: string; term: string; instructorName: string; instructorId: number };

async function invitationByToken(tx: Tx, token: string, lock = false): Promise<InvitationWithClass> {
  const q = tx
    .select({ inv: classInvitations, className: classes.name, term: classes.term, instructorName: users.name, instructorId: classes.instructorId })
    .from(classInvitations)
    .innerJoin(classes, eq(classes.id, classInvitations.classId))
    .innerJoin(users, eq(users.id, classes.instructorId))
    .where(eq(classInvitations.tokenHash, hashToken(token)));
  const [row] = lock ? await q.for('update', { of: classInvitations }) : await q;
  if (!row) throw notFound('No such invitation: check the link in the e-mail.', 'invalid-token');
  return { ...row.inv, className: row.className, term: row.term, instructorName: row.instructorName, instructorId: row.instructorId };
}

const NOT_OPEN: Record<Exclude<InvitationState, 'open'>, string> = {
  accepted: 'This invitation has been used already. Sign in to see the class, or ask the instructor for a new link.',
  expired: 'This invitation has expired. Ask the instructor for a new link.',
  revoked: 'This invitation was withdrawn by the instructor. Ask them for a new link.',
};

function mustBeOpen(inv: InvitationWithClass): void {
  const state = invitationState(inv);
  if (state !== 'open') throw conflict(NOT_OPEN[state], 'invitation-not-open', { state });
}

/** GET /api/class-invitations/:token (public) */
export async function previewInvitation(ctx: Ctx, token: string): Promise<InvitationPreview> {
  const inv = await invitationByToken(ctx.db, token);
  return {
    className: inv.className,
    term: inv.term,
    instructorName: inv.instructorName,
    email: inv.email,
    state: invitationState(inv),
    accountExists: (await findUserByEmail(ctx.db, inv.email)) !== undefined,
  };
}

/** Puts a student in a class (again: a removed student's membership comes back) and marks the invitation used. */
async function joinClass(tx: Tx, inv: InvitationWithClass, userId: number): Promise<void> {
  await tx
    .insert(classMembers)
    .values({ classId: inv.classId, studentId: userId })
    .onConflictDoUpdate({ target: [classMembers.classId, classMembers.studentId], set: { removedAt: null, removedBy: null, joinedAt: sql`now()` } });
  await tx.update(classInvitations).set({ acceptedAt: sql`now()`, acceptedUserId: userId }).where(eq(classInvitations.id, inv.id));
}

/** POST /api/class-invitations/:token/accept (public) — a new student account joins; answers like sign-in. */
export async function acceptInvitation(ctx: Ctx, token: string, input: InvitationAccept): Promise<Session & { classId: number }> {
  const passwordHash = await hashPassword(ctx, input.password);
  const { user, classId } = await ctx.db.transaction(async (tx) => {
    const inv = await invitationByToken(tx, token, true);
    mustBeOpen(inv);
    if (await findUserByEmail(tx, inv.email))
      throw conflict(`An account with the e-mail ${inv.email} exists already: sign in with it, then open this link again to join.`, 'email-taken');
    const user = await createUserOrConflict(ctx, { email: inv.email, name: input.name.trim(), passwordHash, roles: ['student'] }, tx);
    await joinClass(tx, inv, user.id);
    return { user, classId: inv.classId };
  });
  return { ...(await issueSession(ctx, user)), classId };
}

/**
 * POST /api/class-invitations/:token/join (signed in) — the account whose e-mail the invitation
 * names joins; the student role is added when missing (the session stays valid: roles are read
 * from the account on every request).
 */
export async function joinWithInvitation(ctx: Ctx, actor: Actor & { email: string }, token: string): Promise<{ classId: number; user: PublicUser }> {
  return ctx.db.transaction(async (tx) => {
    const inv = await invitationByToken(tx, token, true);
    mustBeOpen(inv);
    if (normal(inv.email) !== normal(actor.email))
      throw forbidden(
        `This invitation was sent to ${inv.email}, and you are signed in as ${actor.email}. Sign in with ${inv.email} to join, or ask the instructor to invite ${actor.email}.`,
        'invitation-email-mismatch',
      );
    if (inv.instructorId === actor.id) throw conflict('You teach this class: an instructor does not join their own class as a student.', 'own-class');
    const roles: Role[] = actor.roles.includes('student') ? [...actor.roles] : [...actor.roles, 'student'];
    const [u] = await tx.update(users).set({ roles, updatedAt: sql`now()` }).where(eq(users.id, actor.id)).returning();
    await joinClass(tx, inv, actor.id);
    return { classId: inv.classId, user: publicUser(u) };
  });
}
