/**
 * Valid requests for every route, made fresh per call (unique e-mails, live tokens), shared by
 * the access-matrix and bad-input specs. They use the real use cases and repositories.
 */
import { addDays } from './time';
import { insertInvitation, insertPasswordReset } from '../../api/auth/auth.repository';
import { hashToken, newOpaqueToken } from '../../api/auth/tokens';
import { apiEnv, makeUser, signIn, SPEC_PASSWORD, uniqueEmail } from './api-env';

export async function liveInvitationToken(): Promise<string> {
  const env = await apiEnv();
  const admin = await makeUser(['admin']);
  const token = newOpaqueToken();
  await insertInvitation(env.database.db, { email: uniqueEmail('invited'), name: null, roles: ['student'], tokenHash: hashToken(token), invitedBy: admin.id, expiresAt: addDays(new Date(), 1) });
  return token;
}

export async function liveResetToken(): Promise<string> {
  const env = await apiEnv();
  const u = await makeUser(['technician']);
  const token = newOpaqueToken();
  await insertPasswordReset(env.database.db, { userId: u.id, tokenHash: hashToken(token), expiresAt: addDays(new Date(), 1) });
  return token;
}

export async function liveRefreshToken(): Promise<string> {
  const u = await makeUser(['technician']);
  return (await signIn(u.email)).refreshToken;
}

export async function freshCredentials() {
  const u = await makeUser(['technician']);
  return { email: u.email, password: SPEC_PASSWORD };
}
