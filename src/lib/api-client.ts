/** The error the server sends: `{ error: { message, issues } }`. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    message: string,
    readonly issues: { path: string; message: string }[] = [],
    /** Other fields of the error body (e.g. `confirmAgain`). */
    readonly details: Record<string, unknown> = {},
  ) {
    super(message);
  }
}

/** What the client says when the server answers 503: it is up, its database is not (decision 25). */
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
    const err = data?.error;
    if (res.status === 503) throw new ApiError(503, `${DATABASE_DOWN_MESSAGE} Try again in a minute.`);
    const { message, issues, ...details } = err ?? {};
    throw new ApiError(res.status, message ?? `The server answered ${res.status}.`, issues ?? [], details);
  }
  return data as T;
}

export const apiGet = <T>(url: string) => api<T>('GET', url);
