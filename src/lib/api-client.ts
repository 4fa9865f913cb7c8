import type { ApiErrorBody, ApiIssue } from '../../shared/schemas/api-error';

/**
 * The error the server sends (`ApiErrorBody`): the message, every issue with its path — and, for
 * file imports, its row and column — and the body's other details (e.g. `errorCount`).
 */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    message: string,
    readonly issues: ApiIssue[] = [],
    readonly details: Record<string, unknown> = {},
  ) {
    super(message);
  }

  /** The issues of one field (`path`), for a form's setError. */
  issuesAt(path: string): ApiIssue[] {
    return this.issues.filter((i) => i.path === path);
  }
}

/** The ApiError of an error body as it came over the wire (anything not in that shape becomes the status message). */
export function apiErrorFrom(status: number, data: unknown): ApiError {
  const err = (data as Partial<ApiErrorBody> | null)?.error;
  if (!err || typeof err.message !== 'string') return new ApiError(status, `The server answered ${status}.`);
  const { message, issues, ...details } = err;
  const kept = Array.isArray(issues)
    ? issues.map((i) => ({
        path: String(i.path ?? ''),
        message: String(i.message ?? ''),
        ...(typeof i.row === 'number' ? { row: i.row } : {}),
        ...(typeof i.column === 'string' ? { column: i.column } : {}),
      }))
    : [];
  return new ApiError(status, message, kept, details);
}

/** What the client says when the server answers 503: it is up, its database is not (decision 33). */
export const DATABASE_DOWN_MESSAGE = 'The server cannot reach its database; your entries are kept on this device.';

type Method = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';

export async function api<T>(method: Method, url: string, body?: unknown): Promise<T> {
  let res: Response;
  try {
    res = await fetch(url, {
      method,
      credentials: 'same-origin',
      headers: body === undefined ? {} : { 'Content-Type': 'application/json' },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
  } catch {
    throw new ApiError(0, 'No connection to the Kerfwise server. Check the network and try again.');
  }
  if (res.status === 204) return undefined as T;
  const data = await res.json().catch(() => null);
  if (!res.ok) {
    if (res.status === 503) throw new ApiError(503, `${DATABASE_DOWN_MESSAGE} Try again in a minute.`);
    throw apiErrorFrom(res.status, data);
  }
  return data as T;
}

export const apiGet = <T>(url: string) => api<T>('GET', url);
