/**
 * Sign-in and role guards on passport-jwt. Every request re-reads the user (one indexed query),
 * so a deactivated user, or a token older than a password change, is refused at the next request.
 */
import type { RequestHandler } from 'express';
import { Passport } from 'passport';
import { ExtractJwt, Strategy as JwtStrategy } from 'passport-jwt';
import type { Role } from '../../schema/index';
import type { Db } from '../db';
import { forbidden, unauthorized } from '../http/errors';
import { findUserById, type UserRow } from './auth.repository';
import { JWT_VERIFY_OPTIONS, type AccessClaims } from './tokens';

export type SignedInUser = Omit<UserRow, 'passwordHash'>;

declare module 'express-serve-static-core' {
  interface Request {
    signedIn?: SignedInUser;
  }
}

export interface AuthGuards {
  requireSignIn: RequestHandler;
  requireRoles(roles: readonly Role[]): RequestHandler;
}

export function createAuthGuards(db: Db, secret: string): AuthGuards {
  const passport = new Passport();
  passport.use(
    new JwtStrategy(
      { jwtFromRequest: ExtractJwt.fromAuthHeaderAsBearerToken(), secretOrKey: secret, ...JWT_VERIFY_OPTIONS },
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
        const why = info?.message === 'deactivated' ? 'This account has been deactivated.' : 'Sign in to continue: the access token is missing, expired or no longer valid.';
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

  return { requireSignIn, requireRoles };
}
