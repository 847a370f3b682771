import { createHash, createHmac, createSecretKey, randomBytes, type KeyObject } from 'node:crypto';
import jwt from 'jsonwebtoken';
import type { Role } from '../../schema/index';

export interface AccessClaims {
  sub: string;
  roles: Role[];
  /** The user's token version when issued: a bump (deactivation, password change) ends the token. */
  tv: number;
}

/**
 * The HMAC key of a secret, made once per secret: jsonwebtoken given a string tries to read it as
 * a public key first (node's createPublicKey, which throws) on every sign and verify — under load
 * that was the largest cost of a signed-in request (a CPU profile of the reading save).
 */
const keys = new Map<string, KeyObject>();
export function jwtKey(secret: string): KeyObject {
  let k = keys.get(secret);
  if (k === undefined) {
    k = createSecretKey(Buffer.from(secret, 'utf8'));
    keys.set(secret, k);
  }
  return k;
}

export function signAccessToken(secret: string, seconds: number, user: { id: number; roles: Role[]; tokenVersion: number }): string {
  return jwt.sign({ roles: user.roles, tv: user.tokenVersion }, jwtKey(secret), {
    algorithm: 'HS256',
    subject: String(user.id),
    expiresIn: seconds,
    issuer: 'driftmark',
    audience: 'driftmark-api',
  });
}

export const JWT_VERIFY_OPTIONS = { algorithms: ['HS256' as const], issuer: 'driftmark', audience: 'driftmark-api' };

/** An opaque random token (refresh, reset, invitation), base64url. */
export const newOpaqueToken = (): string => randomBytes(32).toString('base64url');

/** Only hashes are stored. */
export const hashToken = (token: string): string => createHash('sha256').update(token).digest('hex');

/**
 * The successor of a refresh token is derived from it (HMAC with the server secret), so a token
 * presented twice within the grace window yields the same successor without storing plaintext.
 */
export const successorOf = (secret: string, token: string): string =>
  createHmac('sha256', secret).update('refresh-successor:' + token).digest('base64url');
