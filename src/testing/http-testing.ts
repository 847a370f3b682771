import { HttpRequest } from '@angular/common/http';
import { HttpTestingController, TestRequest } from '@angular/common/http/testing';
import { Role, Session } from '../app/core/auth/roles';

/** Spec helper: yields to the event loop (Web Locks, debounces, effects run between tasks). */
export function nextTask(ms = 0): Promise<void> {
  return new Promise((resolve) => setTimeout(resolve, ms));
}

/**
 * Spec helper: the one request matching `match` once it has been made. Requests sent after a Web
 * Lock is granted or a debounce has fired appear a few tasks later; this waits for them (up to
 * about two seconds) and then fails like `expectOne` when there is none, or when there are several.
 */
export async function nextRequest(
  http: HttpTestingController,
  match: string | ((req: HttpRequest<unknown>) => boolean),
): Promise<TestRequest> {
  for (let i = 0; i < 100; i++) {
    const found = typeof match === 'string' ? http.match(match) : http.match(match);
    if (found.length === 1) return found[0];
    if (found.length > 1) throw new Error(`Expected one request, found ${found.length}.`);
    await nextTask(20);
  }
  return typeof match === 'string' ? http.expectOne(match) : http.expectOne(match);
}

/** Spec helper: a session answer as the API shapes it (invented people, example.org addresses). */
export function sessionFor(roles: Role[], n = 1, id: number | string = 7): Session {
  return {
    accessToken: `access-${n}`,
    refreshToken: `refresh-${n}`,
    user: { id, email: 'ada.voss@example.org', name: 'Ada Voss', roles },
  };
}

/** Spec helper: the localStorage keys Auth uses, cleared before and after each spec. */
export function clearAuthStorage(): void {
  localStorage.removeItem('driftmark.refreshToken');
  localStorage.removeItem('driftmark.user');
}
