/** An error the error middleware turns into an HTTP answer with a message a person can act on. */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    message: string,
    readonly issues: { path: string; message: string }[] = [],
  ) {
    super(message);
  }
}

export const notFound = (what = 'That record') => new HttpError(404, `${what} was not found, or you do not have access to it.`);
export const forbidden = (message = 'Your role on this project does not allow that.') => new HttpError(403, message);
export const conflict = (message: string) => new HttpError(409, message);
export const badRequest = (message: string, issues: { path: string; message: string }[] = []) => new HttpError(400, message, issues);
