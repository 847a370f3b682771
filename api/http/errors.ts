import type { ErrorRequestHandler, RequestHandler } from 'express';

/** The one error type of the API. Its JSON body: {"error":{"code","message","details"?}}. */
export class AppError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: Record<string, unknown>,
    readonly headers?: Record<string, string>,
  ) {
    super(message);
  }
}

export const badRequest = (message: string, field?: string, code = 'invalid-request') =>
  new AppError(400, code, message, field !== undefined ? { field } : undefined);
export const unauthorized = (message = 'Sign in to continue.', code = 'unauthorized') => new AppError(401, code, message);
export const forbidden = (message = 'Your account may not do this.', code = 'forbidden') => new AppError(403, code, message);
export const notFound = (message = 'Not found.', code = 'not-found') => new AppError(404, code, message);
export const conflict = (message: string, code = 'conflict', details?: Record<string, unknown>) => new AppError(409, code, message, details);
export const tooManyRequests = (message: string, retryAfterSeconds: number) =>
  new AppError(429, 'too-many-requests', message, { retryAfterSeconds }, { 'Retry-After': String(retryAfterSeconds) });

/** An unknown /api route: JSON 404, never the app shell. */
export const apiNotFound: RequestHandler = (req) => {
  throw notFound(`No API route ${req.method} ${req.path}.`, 'no-such-route');
};

type BodyParserError = Error & { type?: string; status?: number; expose?: boolean };

const UNREACHABLE_CODES = new Set(['ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', 'EPIPE', '57P01', '57P02', '57P03', '08000', '08003', '08006']);

/** Is this (or its cause) PostgreSQL being unreachable, rather than a bug? */
function databaseUnreachable(err: unknown): boolean {
  for (let e = err as { code?: string; message?: string; cause?: unknown } | undefined, depth = 0; e && depth < 5; e = e.cause as typeof e, depth++) {
    if (e.code && UNREACHABLE_CODES.has(e.code)) return true;
    if (/Connection terminated|timeout exceeded when trying to connect|connect ECONNREFUSED/i.test(e.message ?? '')) return true;
  }
  return false;
}

/** The one error middleware, registered last. */
export function errorMiddleware(log: { error: (obj: object, msg: string) => void }): ErrorRequestHandler {
  return (err: unknown, req, res, _next) => {
    let e: AppError;
    if (err instanceof AppError) e = err;
    else {
      const bp = err as BodyParserError;
      if (bp?.type === 'entity.parse.failed') e = badRequest('The request body is not valid JSON.', '(body)', 'malformed-json');
      else if (bp?.type === 'entity.too.large') e = badRequest('The request body is too large.', '(body)', 'body-too-large');
      else if (bp?.type === 'encoding.unsupported' || bp?.type === 'charset.unsupported')
        e = badRequest('The request body encoding is not supported: send UTF-8 JSON.', '(body)', 'unsupported-encoding');
      else if (typeof bp?.status === 'number' && bp.status >= 400 && bp.status < 500 && bp.expose)
        e = new AppError(bp.status, 'invalid-request', bp.message);
      else if (databaseUnreachable(err)) {
        e = new AppError(503, 'database-unavailable', 'The database cannot be reached just now. Nothing was saved by this request; try again in a moment.', undefined, { 'Retry-After': '5' });
      } else {
        log.error({ err, method: req.method, url: req.originalUrl }, 'unhandled error');
        e = new AppError(500, 'internal', 'Something went wrong on the server. Nothing was changed by the failed step; try again.');
      }
    }
    if (e.headers) for (const [k, v] of Object.entries(e.headers)) res.setHeader(k, v);
    res.status(e.status).json({ error: { code: e.code, message: e.message, ...(e.details ? { details: e.details } : {}) } });
  };
}
