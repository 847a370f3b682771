import { count, desc, eq, ilike, or, sql } from 'drizzle-orm';
import { users, type Role } from '../../schema/index';
import type { Tx } from '../db';

const listColumns = { id: users.id, email: users.email, name: users.name, roles: users.roles, active: users.active, createdAt: users.createdAt };

/** One page of users (pages count from 1), newest first. */
export async function listUsers(tx: Tx, q: string | undefined, page: number, pageSize: number) {
  const where = q ? or(ilike(users.email, `%${escapeLike(q)}%`), ilike(users.name, `%${escapeLike(q)}%`)) : undefined;
  const [items, [{ total }]] = await Promise.all([
    tx.select(listColumns).from(users).where(where).orderBy(desc(users.createdAt), desc(users.id)).limit(pageSize).offset((page - 1) * pageSize),
    tx.select({ total: count() }).from(users).where(where),
  ]);
  return { items, total };
}

function escapeLike(s: string): string {
  return s.replace(/[\\%_]/g, (c) => '\\' + c);
}

export async function updateUser(tx: Tx, id: number, patch: { name?: string; roles?: Role[]; active?: boolean }, endSessions: boolean) {
  const [row] = await tx
    .update(users)
    .set({ ...patch, updatedAt: sql`now()`, ...(endSessions ? { tokenVersion: sql`${users.tokenVersion} + 1` } : {}) })
    .where(eq(users.id, id))
    .returning(listColumns);
  return row;
}
