/**
 * The errors services and routes throw when a request cannot be done: typed by what went wrong,
 * not by HTTP status. The one error middleware (server/middleware/error.ts) answers them:
 * NotFoundError → 404, ConflictError → 409, InvalidInputError → 400. Each message says what to do.
 */

/** One problem with the input; file imports add the row and column it is in. */
export interface Issue {
  path: string;
  message: string;
  row?: number;
  column?: string;
}

/** A refusal a person can act on, with the fields at fault and extra fields for the error body. */
export abstract class ServiceError extends Error {
  constructor(
    message: string,
    readonly issues: Issue[] = [],
    /** Extra fields for the error body (e.g. the id of the record in the way). */
    readonly details: Record<string, unknown> = {},
  ) {
    super(message);
    this.name = new.target.name;
  }
}

/** The record does not exist, or the caller may not see it (the two are never told apart). */
export class NotFoundError extends ServiceError {
  /** `what` names the record, e.g. 'That stop'. */
  constructor(what = 'That record') {
    super(`${what} was not found, or you do not have access to it.`);
  }
}

/** The request fits the rules but not the present state of the data (a closed round, a serial in use). */
export class ConflictError extends ServiceError {}

/** The input breaks a rule that checking its shape could not see (an unknown crew, a time in the past). */
export class InvalidInputError extends ServiceError {}
