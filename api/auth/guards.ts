/**
 * Sign-in and role guards on passport-jwt. Every request re-reads the user (one indexed query),
 * so a deactivated user, or a token older than a password change, is refused at the next request.
 */
import type { RequestHandler } from 'express';
import jwt from 'jsonwebtoken';
import { Passport } from 'passport';
import { ExtractJwt, Strategy as JwtStrategy } from 'passport-jwt';
import type { Role } from '../../schema/index';
import type { Db } from '../db';
import { forbidden, unauthorized } from '../http/errors';
import { findUserById, type UserRow } from './auth.repository';
import { JWT_VERIFY_OPTIONS, jwtKey, type AccessClaims } from './tokens';

export type SignedInUser = Omit<UserRow, 'passwordHash'>;

/** A verified access token's claims, before the account is checked (routes with `auth: 'folded'`). */
export interface VerifiedClaims {
  userId: number;
  tokenVersion: number;
}

declare module 'express-serve-static-core' {
  interface Request {
    signedIn?: SignedInUser;
    claims?: VerifiedClaims;
  }
}

const UNAUTHORIZED_MESSAGE = 'Sign in to continue: the access token is missing, expired or no longer valid.';

export interface AuthGuards {
  requireSignIn: RequestHandler;
  /**
   * Verifies the access token's signature, expiry, issuer and audience only, and leaves the
   * account check (active, token version) to the route's own query — one round trip for a hot
   * route (the reading save). The handler MUST refuse with 401 when its query finds no such
   * active account at that token version.
   */
  requireClaims: RequestHandler;
  requireRoles(roles: readonly Role[]): RequestHandler;
}

export function createAuthGuards(db: Db, secret: string): AuthGuards {
  const passport = new Passport();
  passport.use(
    new JwtStrategy(
      { jwtFromRequest: ExtractJwt.fromAuthHeaderAsBearerToken(), secretOrKey: jwtKey(secret) as unknown as string, ...JWT_VERIFY_OPTIONS },
      (claims: AccessClaims, done: (err: unknown, user?: SignedInUser | false, info?: unknown) => void) => {
        findUserById(db, Number(claims.sub)).then((u) => {
          if (!u) return done(null, false, { message: 'unknown user' });
          if (!u.active) return done(null, false, { message: 'deactivated' });
          if (u.tokenVersion !== claims.tv) return done(null, false, { message: 'stale' });
          const { passwordHash: _ignored, ...user } = u;
          done(null, user);
        }, done);
      },
    ),
  );
  const requireSignIn: RequestHandler = (req, res, next) => {
    passport.authenticate('jwt', { session: false }, (err: unknown, user: SignedInUser | false, info: { message?: string } | undefined) => {
      if (err) return next(err);
      if (!user) {
        const why = info?.message === 'deactivated' ? 'This account has been deactivated.' : UNAUTHORIZED_MESSAGE;
        return next(unauthorized(why, info?.message === 'deactivated' ? 'account-deactivated' : 'unauthorized'));
      }
      req.signedIn = user;
      next();
    })(req, res, next);
  };

  const requireRoles =
    (roles: readonly Role[]): RequestHandler =>
    (req, _res, next) => {
      if (!req.signedIn!.roles.some((r) => roles.includes(r))) throw forbidden(`This needs the ${roles.join(' or ')} role.`);
      next();
    };

  const requireClaims: RequestHandler = (req, _res, next) => {
    const token = ExtractJwt.fromAuthHeaderAsBearerToken()(req);
    if (!token) return next(unauthorized(UNAUTHORIZED_MESSAGE));
    try {
      const claims = jwt.verify(token, jwtKey(secret), JWT_VERIFY_OPTIONS) as AccessClaims;
      const userId = Number(claims.sub);
      if (!Number.isSafeInteger(userId) || typeof claims.tv !== 'number') return next(unauthorized(UNAUTHORIZED_MESSAGE));
      req.claims = { userId, tokenVersion: claims.tv };
      next();
    } catch {
      next(unauthorized(UNAUTHORIZED_MESSAGE));
    }
  };

  return { requireSignIn, requireRoles, requireClaims };
}
