import { inject } from '@angular/core';
import { CanActivateFn, CanMatchFn, Router } from '@angular/router';
import { MatSnackBar } from '@angular/material/snack-bar';
import { Auth } from './auth';
import { ROLE_LABELS, Role } from './roles';

/** Only for a signed-in user; others go to /sign-in with the way back. */
export const signedIn: CanActivateFn = (_route, state) => {
  const auth = inject(Auth);
  if (auth.signedIn()) return true;
  return inject(Router).createUrlTree(['/sign-in'], { queryParams: { returnUrl: state.url } });
};

/** Only for a signed-out visitor (sign-in, sign-up): a signed-in user goes home. */
export const signedOut: CanActivateFn = () => (inject(Auth).signedIn() ? inject(Router).createUrlTree(['/home']) : true);

/**
 * Only for users holding one of these roles (use after `signedIn`). Refused: to /home with a
 * message naming the roles that may use the page.
 */
export function hasRole(...roles: Role[]): CanMatchFn & CanActivateFn {
  return () => {
    const auth = inject(Auth);
    if (auth.hasRole(...roles)) return true;
    const router = inject(Router);
    if (!auth.signedIn()) return router.createUrlTree(['/sign-in']);
    inject(MatSnackBar).open(`That page is for: ${roles.map((r) => ROLE_LABELS[r]).join(', ')}.`, 'Dismiss', {
      duration: 6000,
    });
    return router.createUrlTree(['/home']);
  };
}
