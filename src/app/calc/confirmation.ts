import { InjectionToken, Signal } from '@angular/core';
import { toObservable, toSignal } from '@angular/core/rxjs-interop';
import { Observable, catchError, concat, map, of, switchMap, timer } from 'rxjs';
import { apiErrorOf } from '../core/errors/api-error';

/** How long the quick check waits after the last change before asking the server to confirm. */
export const CALC_CONFIRM_DELAY_MS = new InjectionToken<number>('CALC_CONFIRM_DELAY_MS', { factory: () => 400 });

/** Where the server's confirmation of a locally computed answer stands. */
export type Confirmation =
  | { readonly state: 'idle' }
  | { readonly state: 'pending' }
  | { readonly state: 'confirmed' }
  | { readonly state: 'differs'; readonly differences: readonly string[] }
  | { readonly state: 'refused'; readonly message: string }
  | { readonly state: 'unavailable'; readonly message: string };

/**
 * The server's confirmation of the answer this page computed itself: after `delayMs` of quiet the
 * request goes to the API and its answer is compared with the local one for the same request.
 * A newer request cancels the older one. The answer only ever lands here: it never touches the
 * form, so it cannot move the focus or reset what is being typed. Call in an injection context.
 */
export function confirmWithServer<Req, Res>(
  request: Signal<Req | null>,
  call: (req: Req) => Observable<Res>,
  localOf: (req: Req) => Res | null,
  compare: (local: Res, server: Res) => string[],
  delayMs: number,
): Signal<Confirmation> {
  return toSignal(
    toObservable(request).pipe(
      switchMap((req) => {
        if (req === null) return of<Confirmation>({ state: 'idle' });
        return concat(
          of<Confirmation>({ state: 'pending' }),
          timer(delayMs).pipe(
            switchMap(() => call(req)),
            map((server): Confirmation => {
              const local = localOf(req);
              if (local === null) return { state: 'differs', differences: ['the server answered where this page found a problem'] };
              const differences = compare(local, server);
              return differences.length === 0 ? { state: 'confirmed' } : { state: 'differs', differences };
            }),
            catchError((err: unknown) => {
              const e = apiErrorOf(err);
              if (e.status === 400) return of<Confirmation>({ state: 'refused', message: e.message });
              if (e.status === 429) return of<Confirmation>({ state: 'unavailable', message: 'The server is busy (too many checks in a short time): this page’s own answer stands.' });
              return of<Confirmation>({ state: 'unavailable', message: `${e.message} This page’s own answer stands.` });
            }),
          ),
        );
      }),
    ),
    { initialValue: { state: 'idle' } as Confirmation },
  );
}

/** Two numbers agree when both are null, or both finite and equal to 1 part in 10⁹. */
export function sameNumber(a: number | null | undefined, b: number | null | undefined): boolean {
  if (a === null || a === undefined || b === null || b === undefined) return (a ?? null) === (b ?? null);
  if (a === b) return true;
  return Math.abs(a - b) <= 1e-9 * Math.max(Math.abs(a), Math.abs(b));
}
