/** A server type as it arrives over JSON: every Date becomes ISO 8601 text. */
export type Wire<T> = T extends Date ? string : T extends object ? { [K in keyof T]: Wire<T[K]> } : T;
