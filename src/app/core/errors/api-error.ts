import { HttpContext, HttpContextToken, HttpErrorResponse } from '@angular/common/http';

/** The API's error body: `{"error":{"code","message","details"?:{field?}}}`. */
export interface ApiError {
  readonly status: number;
  readonly code: string;
  readonly message: string;
  /** The request field the server blames, when it names one (`details.field`). */
  readonly field?: string;
}

/**
 * Which error statuses the caller handles itself (`true`: all of them). The `httpErrors`
 * interceptor shows a snackbar only for the others.
 */
export const CALLER_HANDLES = new HttpContextToken<boolean | readonly number[]>(() => false);

/** Request context saying the caller shows these errors itself (all when none are named). */
export function callerHandles(...statuses: number[]): HttpContext {
  return new HttpContext().set(CALLER_HANDLES, statuses.length === 0 ? true : statuses);
}

export function isHandledByCaller(handled: boolean | readonly number[], status: number): boolean {
  return handled === true || (Array.isArray(handled) && handled.includes(status));
}

const FALLBACK_MESSAGES: Readonly<Record<number, string>> = {
  0: 'Cannot reach the Driftmark server. Check the connection and try again.',
  401: 'Sign in to continue.',
  403: 'Your roles do not allow this.',
  404: 'Not found.',
  409: 'Someone changed this in the meantime. Reload and try again.',
  429: 'Too many attempts. Wait a while and try again.',
};

/** Reads the API error body out of whatever HttpClient threw; never throws itself. */
export function apiErrorOf(err: unknown): ApiError {
  if (!(err instanceof HttpErrorResponse)) {
    return { status: 0, code: 'client-error', message: 'Something went wrong in the browser. Reload and try again.' };
  }
  const body: unknown = err.error;
  const inner = isRecord(body) && isRecord(body['error']) ? body['error'] : null;
  const fallback =
    FALLBACK_MESSAGES[err.status] ??
    (err.status >= 500 ? 'The server ran into a problem. Try again in a moment.' : 'The request was refused.');
  const message = inner && typeof inner['message'] === 'string' && inner['message'] ? inner['message'] : fallback;
  const code = inner && typeof inner['code'] === 'string' ? inner['code'] : err.status === 0 ? 'network' : `http-${err.status}`;
  const details = inner && isRecord(inner['details']) ? inner['details'] : null;
  const field = details && typeof details['field'] === 'string' ? details['field'] : undefined;
  return field === undefined ? { status: err.status, code, message } : { status: err.status, code, message, field };
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}
