import type { NextFunction, Request, Response } from 'express';
import { ZodError } from 'zod';
import { isDatabaseUnavailable } from '../db/client';
import { ConflictError, InvalidInputError, NotFoundError, ServiceError, type Issue } from '../lib/errors';
import { HttpError } from '../lib/http-error';
import { logger } from '../lib/logger';

interface ErrorBody {
  error: { message: string; issues: Issue[] } & Record<string, unknown>;
}

const body = (message: string, issues: Issue[] = [], details: Record<string, unknown> = {}): ErrorBody => ({
  error: { ...details, message, issues },
});

/** The status of each typed refusal thrown by services and routes (server/lib/errors.ts). */
function statusOf(err: ServiceError): number {
  if (err instanceof NotFoundError) return 404;
  if (err instanceof ConflictError) return 409;
  if (err instanceof InvalidInputError) return 400;
  return 400;
}

/** Seconds a client should wait before retrying while the database is unreachable. */
export const DATABASE_RETRY_AFTER_S = 5;

/** The one error middleware: a message a person can act on, never a stack trace. */
export function errorHandler(err: unknown, req: Request, res: Response, _next: NextFunction) {
  if (err instanceof ZodError) {
    const issues = err.issues.map((i) => ({ path: i.path.join('.'), message: i.message }));
    const first = issues[0];
    const message =
      issues.length === 1 && first
        ? first.message
        : `${issues.length} fields need attention: ${issues.map((i) => (i.path ? `${i.path}: ${i.message}` : i.message)).join('; ')}`;
    res.status(400).json(body(message, issues));
    return;
  }
  if (err instanceof ServiceError) {
    res.status(statusOf(err)).json(body(err.message, err.issues, err.details));
    return;
  }
  if (err instanceof HttpError) {
    res.status(err.status).json(body(err.message, err.issues, err.details));
    return;
  }
  // The database is restarting or unreachable (decision 33): say so and when to try again.
  if (isDatabaseUnavailable(err)) {
    logger.warn({ url: req.originalUrl, err: err instanceof Error ? err.message : String(err) }, 'database unavailable');
    res
      .status(503)
      .set('Retry-After', String(DATABASE_RETRY_AFTER_S))
      .json(
        body(
          'The server cannot reach its database right now, so nothing was saved by this request. Try again in a few seconds; if it lasts, tell your administrator.',
          [],
          { database: 'unreachable' },
        ),
      );
    return;
  }
  const e = err as { type?: string; status?: number; statusCode?: number; code?: string; cause?: { code?: string } };
  // A unique index refused a row saved at the same moment by someone else (e.g. a serial fitted twice).
  if (e?.code === '23503' || e?.cause?.code === '23503') {
    res.status(409).json(body('That refers to a record that does not exist (any more). Reload and try again.'));
    return;
  }
  if (e?.code === '23505' || e?.cause?.code === '23505') {
    res.status(409).json(body('That conflicts with a record saved at the same moment. Reload and try again.'));
    return;
  }
  if (e?.type === 'entity.parse.failed') {
    res.status(400).json(body('The request body is not valid JSON.'));
    return;
  }
  if (e?.type === 'entity.too.large') {
    res.status(413).json(body('The request is too large.'));
    return;
  }
  const status = e?.status ?? e?.statusCode;
  if (typeof status === 'number' && status >= 400 && status < 500) {
    res.status(status).json(body('The request could not be handled.'));
    return;
  }
  logger.error({ err, url: req.originalUrl }, 'unhandled error');
  res.status(500).json(body('Something went wrong on the server. Try again; if it keeps happening, tell your administrator.'));
}

export function apiNotFound(req: Request, res: Response) {
  res.status(404).json(body(`There is no API route ${req.method} ${req.path}.`));
}
