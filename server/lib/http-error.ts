/** An error the error middleware turns into an HTTP answer with a message a person can act on. */
/** One problem with the input; file imports add the row and column it is in. */
export interface Issue {
  path: string;
  message: string;
  row?: number;
  column?: string;
}

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

export const notFound = (what = 'That record') => new HttpError(404, `${what} was not found, or you do not have access to it.`);
export const forbidden = (message = 'Your role on this project does not allow that.') => new HttpError(403, message);
export const conflict = (message: string) => new HttpError(409, message);
export const badRequest = (message: string, issues: Issue[] = []) => new HttpError(400, message, issues);
