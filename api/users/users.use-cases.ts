import type { Role } from '../../schema/index';
import { createUserOrConflict, hashPassword } from '../auth/auth.use-cases';
import { findUserById, revokeAllForUser } from '../auth/auth.repository';
import type { SignedInUser } from '../auth/guards';
import type { Ctx } from '../context';
import { conflict, notFound } from '../http/errors';
import * as repo from './users.repository';

const shape = (u: { id: number; email: string; name: string; roles: Role[]; active: boolean; createdAt: Date }) => ({
  ...u,
  createdAt: u.createdAt.toISOString(),
});

export async function listUsers(ctx: Ctx, q: { q?: string; page: number; pageSize: number }) {
  const r = await repo.listUsers(ctx.db, q.q?.trim() || undefined, q.page, q.pageSize);
  return { items: r.items.map(shape), total: r.total, page: q.page, pageSize: q.pageSize };
}

export async function createUser(ctx: Ctx, input: { email: string; name: string; roles: Role[]; password: string }) {
  const passwordHash = await hashPassword(ctx, input.password);
  const u = await createUserOrConflict(ctx, { email: input.email.trim(), name: input.name.trim(), roles: input.roles, passwordHash });
  return shape(u);
}

export async function updateUser(ctx: Ctx, by: SignedInUser, id: number, patch: { name?: string; roles?: Role[]; active?: boolean }) {
  return ctx.db.transaction(async (tx) => {
    const u = await findUserById(tx, id);
    if (!u) throw notFound('No such user.');
    if (id === by.id && patch.active === false) throw conflict('You cannot deactivate your own account.', 'self-deactivation');
    if (id === by.id && patch.roles && !patch.roles.includes('admin'))
      throw conflict('You cannot remove the admin role from your own account.', 'self-demotion');
    const deactivating = patch.active === false && u.active;
    const rolesChanged = patch.roles !== undefined && [...patch.roles].sort().join() !== [...u.roles].sort().join();
    const row = await repo.updateUser(tx, id, { ...patch, name: patch.name?.trim() }, deactivating || rolesChanged);
    if (deactivating) await revokeAllForUser(tx, id);
    return shape(row);
  });
}
