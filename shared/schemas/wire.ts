/** A server type as it arrives over JSON: every Date becomes ISO 8601 text. */
export type Wire<T> = T extends Date ? string : T extends object ? { [K in keyof T]: Wire<T[K]> } : T;

/**
 * What the server may hand to JSON for an answer declared as `W` (the client's type, dates as ISO
 * text): `W` itself, with a Date allowed wherever `W` has plain text — `JSON.stringify` writes a
 * Date as ISO 8601 text, so the client receives exactly `W`. Literal unions (a status) take no Date.
 */
export type Sendable<W> = string extends W
  ? W | Date
  : W extends readonly (infer E)[]
    ? readonly Sendable<E>[]
    : W extends object
      ? { [K in keyof W]: Sendable<W[K]> }
      : W;
