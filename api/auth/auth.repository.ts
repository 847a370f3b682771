import { and, eq, isNull, sql } from 'drizzle-orm';
import { invitations, passwordResets, refreshTokens, signInThrottle, users, type Role } from '../../schema/index';
import type { Tx } from '../db';

export interface UserRow {
  id: number;
  email: string;
  name: string;
  passwordHash: string;
  roles: Role[];
  active: boolean;
  tokenVersion: number;
  createdAt: Date;
}

export async function findUserByEmail(tx: Tx, email: string): Promise<UserRow | undefined> {
  const [u] = await tx.select().from(users).where(sql`lower(${users.email}) = lower(${email})`).limit(1);
  return u;
}

export async function findUserById(tx: Tx, id: number): Promise<UserRow | undefined> {
  const [u] = await tx.select().from(users).where(eq(users.id, id)).limit(1);
  return u;
}

export async function insertUser(tx: Tx, u: { email: string; name: string; passwordHash: string; roles: Role[] }): Promise<UserRow> {
  const [row] = await tx.insert(users).values(u).returning();
  return row;
}

export async function setPassword(tx: Tx, userId: number, passwordHash: string): Promise<void> {
  await tx
    .update(users)
    .set({ passwordHash, tokenVersion: sql`${users.tokenVersion} + 1`, updatedAt: sql`now()` })
    .where(eq(users.id, userId));
}

// ---- refresh tokens ----

export async function insertRefreshToken(tx: Tx, r: { userId: number; familyId: string; tokenHash: string; expiresAt: Date }): Promise<void> {
  await tx.insert(refreshTokens).values(r).onConflictDoNothing();
}

export async function findRefreshToken(tx: Tx, tokenHash: string) {
  const [r] = await tx.select().from(refreshTokens).where(eq(refreshTokens.tokenHash, tokenHash)).limit(1).for('update');
  return r;
}

/** Marks a token used; returns false when another request marked it first (a race). */
export async function markRefreshTokenUsed(tx: Tx, id: number): Promise<boolean> {
  const r = await tx
    .update(refreshTokens)
    .set({ usedAt: sql`now()` })
    .where(and(eq(refreshTokens.id, id), isNull(refreshTokens.usedAt)))
    .returning({ id: refreshTokens.id });
  return r.length === 1;
}

export async function revokeFamily(tx: Tx, familyId: string): Promise<void> {
  await tx.update(refreshTokens).set({ revokedAt: sql`now()` }).where(and(eq(refreshTokens.familyId, familyId), isNull(refreshTokens.revokedAt)));
}

export async function revokeAllForUser(tx: Tx, userId: number): Promise<void> {
  await tx.update(refreshTokens).set({ revokedAt: sql`now()` }).where(and(eq(refreshTokens.userId, userId), isNull(refreshTokens.revokedAt)));
}

// ---- sign-in throttle (shared by every API process through PostgreSQL) ----

export async function throttleFailures(tx: Tx, keys: string[], windowSeconds: number): Promise<Map<string, { failures: number; secondsLeft: number }>> {
  const rows = await tx
    .select({
      key: signInThrottle.key,
      failures: signInThrottle.failures,
      secondsLeft: sql<number>`greatest(0, ceil(extract(epoch from (${signInThrottle.windowStart} + make_interval(secs => ${windowSeconds}) - now()))))::int`,
    })
    .from(signInThrottle)
    .where(sql`${signInThrottle.key} in ${keys} and ${signInThrottle.windowStart} > now() - make_interval(secs => ${windowSeconds})`);
  return new Map(rows.map((r) => [r.key, { failures: r.failures, secondsLeft: r.secondsLeft }]));
}

/** Counts one failure for a key (a new window starts when the old one has passed); returns the count. */
export async function recordFailure(tx: Tx, key: string, windowSeconds: number): Promise<number> {
  const expired = sql`${signInThrottle.windowStart} <= now() - make_interval(secs => ${windowSeconds})`;
  const [r] = await tx
    .insert(signInThrottle)
    .values({ key, failures: 1 })
    .onConflictDoUpdate({
      target: signInThrottle.key,
      set: {
        failures: sql`case when ${expired} then 1 else ${signInThrottle.failures} + 1 end`,
        windowStart: sql`case when ${expired} then now() else ${signInThrottle.windowStart} end`,
      },
    })
    .returning({ failures: signInThrottle.failures });
  return r.failures;
}

export async function clearFailures(tx: Tx, key: string): Promise<void> {
  await tx.delete(signInThrottle).where(eq(signInThrottle.key, key));
}

// ---- password resets ----

export async function insertPasswordReset(tx: Tx, r: { userId: number; tokenHash: string; expiresAt: Date }): Promise<void> {
  await tx.insert(passwordResets).values(r);
}

/** The reset row for a live (unused, unexpired) token, locked for this transaction. */
export async function findLiveReset(tx: Tx, tokenHash: string) {
  const [r] = await tx
    .select()
    .from(passwordResets)
    .where(and(eq(passwordResets.tokenHash, tokenHash), isNull(passwordResets.usedAt), sql`${passwordResets.expiresAt} > now()`))
    .limit(1)
    .for('update');
  return r;
}

export async function markResetUsed(tx: Tx, id: number): Promise<void> {
  await tx.update(passwordResets).set({ usedAt: sql`now()` }).where(eq(passwordResets.id, id));
}

// ---- invitations ----

export async function insertInvitation(tx: Tx, r: { email: string; name: string | null; roles: Role[]; tokenHash: string; invitedBy: number; expiresAt: Date }) {
  const [row] = await tx.insert(invitations).values(r).returning();
  return row;
}

export async function findLiveInvitation(tx: Tx, tokenHash: string, lock = false) {
  const q = tx
    .select()
    .from(invitations)
    .where(and(eq(invitations.tokenHash, tokenHash), isNull(invitations.acceptedAt), sql`${invitations.expiresAt} > now()`))
    .limit(1);
  const [r] = lock ? await q.for('update') : await q;
  return r;
}

export async function markInvitationAccepted(tx: Tx, id: number, userId: number): Promise<void> {
  await tx.update(invitations).set({ acceptedAt: sql`now()`, acceptedUserId: userId }).where(eq(invitations.id, id));
}
