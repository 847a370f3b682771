import { HttpErrorResponse, HttpInterceptorFn } from '@angular/common/http';
import { inject } from '@angular/core';
import { MatSnackBar } from '@angular/material/snack-bar';
import { catchError, throwError } from 'rxjs';
import { CALLER_HANDLES, apiErrorOf, isHandledByCaller } from '../errors/api-error';

/**
 * Shows the API's error message in a snackbar unless the caller said it handles that status
 * (`callerHandles(...)` in the request context). 401s belong to `authToken` and the sign-in flow.
 * The error still reaches the caller.
 */
export const httpErrors: HttpInterceptorFn = (req, next) => {
  const snackBar = inject(MatSnackBar);
  return next(req).pipe(
    catchError((err: unknown) => {
      if (
        err instanceof HttpErrorResponse &&
        err.status !== 401 &&
        !isHandledByCaller(req.context.get(CALLER_HANDLES), err.status)
      ) {
        snackBar.open(apiErrorOf(err).message, 'Dismiss', { duration: 8000, politeness: 'assertive' });
      }
      return throwError(() => err);
    }),
  );
};
