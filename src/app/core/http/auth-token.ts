import { HttpErrorResponse, HttpInterceptorFn, HttpRequest } from '@angular/common/http';
import { inject } from '@angular/core';
import { catchError, switchMap, throwError } from 'rxjs';
import { Auth, DEACTIVATED_NOTICE, errorCodeOf, SessionEnded } from '../auth/auth';

/** Requests that get the bearer token: our own `/api/` paths, except the token-less auth ones. */
export function needsBearer(url: string): boolean {
  const base = typeof location !== 'undefined' ? location.origin : 'http://localhost';
  const target = new URL(url, base);
  if (target.origin !== base || !target.pathname.startsWith('/api/')) return false;
  return !target.pathname.startsWith('/api/auth/') && target.pathname !== '/api/settings/public';
}

/**
 * Adds `Authorization: Bearer …` to `/api/` requests. With no access token in memory (after a
 * reload) it refreshes first; on a 401 it refreshes once and retries. A refused refresh signs out
 * (Auth.refresh does that); the 401 is not retried twice.
 */
export const authToken: HttpInterceptorFn = (req, next) => {
  if (!needsBearer(req.url)) return next(req);
  const auth = inject(Auth);
  const withToken = (token: string): HttpRequest<unknown> =>
    req.clone({ setHeaders: { Authorization: `Bearer ${token}` } });

  const token = auth.accessToken();
  if (!token) {
    if (!auth.hasRefreshToken()) return next(req);
    return auth.refresh().pipe(switchMap((fresh) => next(withToken(fresh))));
  }
  return next(withToken(token)).pipe(
    catchError((err: unknown) => {
      if (!(err instanceof HttpErrorResponse) || err.status !== 401 || !auth.hasRefreshToken()) {
        return throwError(() => err);
      }
      // A deactivated account cannot refresh: end the session with the reason, no retry.
      if (errorCodeOf(err) === 'account-deactivated') {
        auth.endSession(DEACTIVATED_NOTICE);
        return throwError(() => new SessionEnded());
      }
      return auth.refresh().pipe(switchMap((fresh) => next(withToken(fresh))));
    }),
  );
};
