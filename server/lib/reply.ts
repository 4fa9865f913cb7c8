import type { Response } from 'express';
import type { Sendable } from '../../shared/schemas/wire';

/**
 * Sends a route's JSON answer, typed by its declaration in `shared/schemas` (the type the client
 * reads): `reply<WorkPack>(res, 200, pack)`. The type is required (left out, nothing fits), and
 * the body must be that type with Dates where it has ISO text (see `Sendable`). Errors do not go
 * through here: routes throw them and `server/lib/errors.ts` answers (decision 37).
 */
export function reply<W = never>(res: Response, status: number, body: NoInfer<Sendable<W>>): void {
  res.status(status).json(body);
}

/** JSON text of an answer declared as `W`, made once and sent many times (decision 45). */
export type JsonText<W> = string & { readonly __answer?: W };

export function jsonText<W = never>(body: NoInfer<Sendable<W>>): JsonText<W> {
  return JSON.stringify(body) as JsonText<W>;
}

/** Sends JSON text made by `jsonText<W>` — the same answer as `reply<W>`, without serialising again. */
export function replyText<W = never>(res: Response, status: number, text: NoInfer<JsonText<W>>): void {
  res.status(status).type('application/json').send(text);
}
