import { inject } from '@angular/core';
import { CanActivateFn, Router } from '@angular/router';
import { catchError, map, of } from 'rxjs';
import { AccountApi } from './account-api';
import { Auth } from '../core/auth/auth';

/** `/sign-up` only while the instance has open sign-up on; otherwise to /sign-in with a notice. */
export const openSignUp: CanActivateFn = () => {
  const router = inject(Router);
  const auth = inject(Auth);
  return inject(AccountApi)
    .publicSettings()
    .pipe(
      map((settings) => {
        if (settings.openSignUp) return true;
        auth.notice.set('This Driftmark instance does not take sign-ups. Ask an admin for an invitation.');
        return router.createUrlTree(['/sign-in']);
      }),
      // Server unreachable: show the page; the server refuses the sign-up itself if it is closed.
      catchError(() => of(true)),
    );
};
