import { desc } from 'drizzle-orm';
import { invitations } from '../../schema/index';
import type { Tx } from '../db';

export async function listInvitations(tx: Tx) {
  const rows = await tx
    .select({
      id: invitations.id,
      email: invitations.email,
      name: invitations.name,
      roles: invitations.roles,
      createdAt: invitations.createdAt,
      expiresAt: invitations.expiresAt,
      acceptedAt: invitations.acceptedAt,
    })
    .from(invitations)
    .orderBy(desc(invitations.createdAt))
    .limit(200);
  return rows.map((r) => ({
    ...r,
    createdAt: r.createdAt.toISOString(),
    expiresAt: r.expiresAt.toISOString(),
    acceptedAt: r.acceptedAt?.toISOString() ?? null,
    status: r.acceptedAt ? 'accepted' : r.expiresAt.getTime() < Date.now() ? 'expired' : 'pending',
  }));
}
