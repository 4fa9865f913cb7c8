/**
 * HTTP answers for routes and middleware that have no domain meaning (401, 403, 413, 415, 429).
 * Not found, conflict and bad input are the typed errors of ./errors.ts, which services throw too;
 * the helpers below make them, so a route reads the same either way.
 */
import { ConflictError, InvalidInputError, NotFoundError, type Issue } from './errors';

export type { Issue } from './errors';

/** An error the error middleware turns into an HTTP answer with a message a person can act on. */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    message: string,
    readonly issues: Issue[] = [],
    /** Extra fields for the error body (e.g. what an import detected). */
    readonly details: Record<string, unknown> = {},
  ) {
    super(message);
  }
}

export const notFound = (what = 'That record') => new NotFoundError(what);
export const forbidden = (message = 'Your role on this project does not allow that.') => new HttpError(403, message);
export const conflict = (message: string) => new ConflictError(message);
export const badRequest = (message: string, issues: Issue[] = []) => new InvalidInputError(message, issues);
