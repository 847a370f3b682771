import { randomUUID } from 'node:crypto';
import bcrypt from 'bcrypt';
import type { Role } from '../../schema/index';
import type { Ctx } from '../context';
import { badRequest, conflict, forbidden, notFound, tooManyRequests, unauthorized } from '../http/errors';
import { getSettings } from '../settings/settings.use-cases';
import * as repo from './auth.repository';
import { hashToken, newOpaqueToken, signAccessToken, successorOf } from './tokens';

export interface PublicUser {
  id: number;
  email: string;
  name: string;
  roles: Role[];
}

export interface Session {
  accessToken: string;
  refreshToken: string;
  user: PublicUser;
}

export const publicUser = (u: repo.UserRow): PublicUser => ({ id: u.id, email: u.email, name: u.name, roles: u.roles });

const WRONG_CREDENTIALS = 'Wrong e-mail or password.';
/** Compared against when the e-mail is unknown, so both paths cost one bcrypt compare. */
const DUMMY_HASH = '$2b$11$idxIJgdxlSOSB0UOcDw9ZOOWIePZ8W9U/B2Yacccb.ahLqh6LsuMi';
const RESET_HOURS = 2;
const INVITATION_DAYS = 14;

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

export async function issueSession(ctx: Ctx, user: repo.UserRow, familyId = randomUUID(), refreshToken = newOpaqueToken()): Promise<Session> {
  const expiresAt = new Date(Date.now() + ctx.config.auth.refreshTokenDays * 86400_000);
  await repo.insertRefreshToken(ctx.db, { userId: user.id, familyId, tokenHash: hashToken(refreshToken), expiresAt });
  return {
    accessToken: signAccessToken(ctx.config.jwtSecret, ctx.config.auth.accessTokenSeconds, user),
    refreshToken,
    user: publicUser(user),
  };
}

export const hashPassword = (ctx: Ctx, password: string) => bcrypt.hash(password, ctx.config.auth.bcryptCost);

export async function signIn(ctx: Ctx, email: string, password: string, ip: string): Promise<Session> {
  const t = ctx.config.throttle;
  const accountKey = `account:${email.toLowerCase()}`;
  const ipKey = `ip:${ip}`;
  const counts = await repo.throttleFailures(ctx.db, [accountKey, ipKey], t.windowSeconds);
  const acc = counts.get(accountKey);
  const byIp = counts.get(ipKey);
  if (acc && acc.failures >= t.accountLimit) {
    throw tooManyRequests(`Too many failed sign-ins for this account. Wait ${Math.ceil(acc.secondsLeft / 60)} min, or reset the password.`, acc.secondsLeft);
  }
  if (byIp && byIp.failures >= t.ipLimit) {
    throw tooManyRequests(`Too many failed sign-ins from this address. Wait ${Math.ceil(byIp.secondsLeft / 60)} min.`, byIp.secondsLeft);
  }
  const user = await repo.findUserByEmail(ctx.db, email);
  const ok = await bcrypt.compare(password, user?.passwordHash ?? DUMMY_HASH);
  if (!user || !ok) {
    const failures = await repo.recordFailure(ctx.db, accountKey, t.windowSeconds);
    await repo.recordFailure(ctx.db, ipKey, t.windowSeconds);
    // Slow repeated failures down before refusing them outright.
    const over = failures - t.accountSlowAfter;
    if (over > 0) await sleep(Math.min(3000, over * t.slowStepMs));
    throw unauthorized(WRONG_CREDENTIALS, 'wrong-credentials');
  }
  if (!user.active) throw unauthorized('This account has been deactivated. Ask an administrator.', 'account-deactivated');
  await repo.clearFailures(ctx.db, accountKey);
  return issueSession(ctx, user);
}

/**
 * Rotates a refresh token. A token used twice revokes its family — except within the grace window,
 * where the same successor is returned (two tabs refreshing at once).
 */
export async function refresh(ctx: Ctx, token: string): Promise<Session> {
  const hash = hashToken(token);
  const outcome = await ctx.db.transaction(async (tx) => {
    const row = await repo.findRefreshToken(tx, hash);
    if (!row) return { kind: 'refused' as const };
    const user = await repo.findUserById(tx, row.userId);
    // A deactivated account is told so (its tokens were revoked when it was deactivated).
    if (user && !user.active) {
      await repo.revokeFamily(tx, row.familyId);
      return { kind: 'deactivated' as const };
    }
    if (!user || row.revokedAt || row.expiresAt.getTime() <= Date.now()) return { kind: 'refused' as const };
    const successor = successorOf(ctx.config.jwtSecret, token);
    if (row.usedAt) {
      const age = (Date.now() - row.usedAt.getTime()) / 1000;
      if (age <= ctx.config.auth.refreshGraceSeconds) {
        const next = await repo.findRefreshToken(tx, hashToken(successor));
        if (next && !next.revokedAt) return { kind: 'same-successor' as const, user, successor };
      }
      await repo.revokeFamily(tx, row.familyId);
      return { kind: 'reused' as const };
    }
    await repo.markRefreshTokenUsed(tx, row.id);
    const expiresAt = new Date(Date.now() + ctx.config.auth.refreshTokenDays * 86400_000);
    await repo.insertRefreshToken(tx, { userId: user.id, familyId: row.familyId, tokenHash: hashToken(successor), expiresAt });
    return { kind: 'rotated' as const, user, successor };
  });
  if (outcome.kind === 'refused') throw unauthorized('Your session has ended. Sign in again.', 'session-ended');
  if (outcome.kind === 'deactivated') throw unauthorized('This account has been deactivated. Ask an administrator.', 'account-deactivated');
  if (outcome.kind === 'reused') throw unauthorized('This session was ended because its refresh token was used twice. Sign in again.', 'token-reused');
  return {
    accessToken: signAccessToken(ctx.config.jwtSecret, ctx.config.auth.accessTokenSeconds, outcome.user),
    refreshToken: outcome.successor,
    user: publicUser(outcome.user),
  };
}

export async function signOut(ctx: Ctx, token: string): Promise<void> {
  const row = await repo.findRefreshToken(ctx.db, hashToken(token));
  if (row) await repo.revokeFamily(ctx.db, row.familyId);
}

export async function signUp(ctx: Ctx, input: { email: string; name: string; password: string }): Promise<Session> {
  const settings = await getSettings(ctx.db);
  if (!settings.openSignUp) throw forbidden('Self sign-up is closed on this instance. Ask an administrator for an invitation.', 'sign-up-closed');
  const passwordHash = await hashPassword(ctx, input.password);
  const user = await createUserOrConflict(ctx, { email: input.email, name: input.name.trim(), passwordHash, roles: ['technician'] });
  return issueSession(ctx, user);
}

export async function createUserOrConflict(ctx: Ctx, u: { email: string; name: string; passwordHash: string; roles: Role[] }, tx = ctx.db) {
  if (await repo.findUserByEmail(tx, u.email)) throw conflict('An account with this e-mail already exists.', 'email-taken');
  try {
    return await repo.insertUser(tx, u);
  } catch (e) {
    if ((e as { code?: string }).code === '23505' || (e as { cause?: { code?: string } }).cause?.code === '23505')
      throw conflict('An account with this e-mail already exists.', 'email-taken');
    throw e;
  }
}

export async function requestPasswordReset(ctx: Ctx, email: string): Promise<void> {
  const user = await repo.findUserByEmail(ctx.db, email);
  if (!user || !user.active) return; // same answer either way: nothing revealed
  const token = newOpaqueToken();
  await repo.insertPasswordReset(ctx.db, { userId: user.id, tokenHash: hashToken(token), expiresAt: new Date(Date.now() + RESET_HOURS * 3600_000) });
  await ctx.outbox.send({
    to: user.email,
    subject: 'Driftmark: reset your password',
    text:
      `Hello ${user.name},\n\nSomeone (we hope you) asked to reset the password of your Driftmark account.\n` +
      `Open this link within ${RESET_HOURS} hours to choose a new one:\n\n${ctx.linkBase}/reset-password/${token}\n\n` +
      `If you did not ask for this, ignore this mail: your password stays as it is.\n`,
  });
}

export async function confirmPasswordReset(ctx: Ctx, token: string, password: string): Promise<void> {
  const passwordHash = await hashPassword(ctx, password);
  const done = await ctx.db.transaction(async (tx) => {
    const reset = await repo.findLiveReset(tx, hashToken(token));
    if (!reset) return false;
    await repo.setPassword(tx, reset.userId, passwordHash);
    await repo.revokeAllForUser(tx, reset.userId);
    await repo.markResetUsed(tx, reset.id);
    await repo.clearFailures(tx, `account:${(await repo.findUserById(tx, reset.userId))!.email.toLowerCase()}`);
    return true;
  });
  if (!done) throw badRequest('This reset link is not valid any more (used or expired). Ask for a new one.', 'token', 'invalid-token');
}

export async function createInvitation(ctx: Ctx, invitedBy: repo.UserRow | PublicUser, input: { email: string; name?: string; roles: Role[] }) {
  if (await repo.findUserByEmail(ctx.db, input.email)) throw conflict('An account with this e-mail already exists.', 'email-taken');
  const token = newOpaqueToken();
  const row = await repo.insertInvitation(ctx.db, {
    email: input.email,
    name: input.name?.trim() || null,
    roles: input.roles,
    tokenHash: hashToken(token),
    invitedBy: invitedBy.id,
    expiresAt: new Date(Date.now() + INVITATION_DAYS * 86400_000),
  });
  await ctx.outbox.send({
    to: input.email,
    subject: 'Driftmark: you are invited',
    text:
      `Hello${input.name ? ' ' + input.name : ''},\n\n${invitedBy.name} invites you to Driftmark as ${input.roles.join(', ')}.\n` +
      `Open this link within ${INVITATION_DAYS} days to choose your password:\n\n${ctx.linkBase}/invitation/${token}\n\n` +
      `The link works once.\n`,
  });
  return { id: row.id, email: row.email, name: row.name, roles: row.roles, expiresAt: row.expiresAt.toISOString() };
}

export async function getInvitation(ctx: Ctx, token: string) {
  const inv = await repo.findLiveInvitation(ctx.db, hashToken(token));
  if (!inv) throw notFound('This invitation is not valid any more (used or expired).', 'invalid-token');
  return { email: inv.email, name: inv.name, roles: inv.roles };
}

export async function acceptInvitation(ctx: Ctx, input: { token: string; name: string; password: string }): Promise<Session> {
  const passwordHash = await hashPassword(ctx, input.password);
  const user = await ctx.db.transaction(async (tx) => {
    const inv = await repo.findLiveInvitation(tx, hashToken(input.token), true);
    if (!inv) throw notFound('This invitation is not valid any more (used or expired).', 'invalid-token');
    const u = await createUserOrConflict(ctx, { email: inv.email, name: input.name.trim(), passwordHash, roles: inv.roles }, tx);
    await repo.markInvitationAccepted(tx, inv.id, u.id);
    return u;
  });
  return issueSession(ctx, user);
}
