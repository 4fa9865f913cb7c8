import { z } from 'zod';
import { notFound } from './http-error';

/** Made once: building a schema per request is work repeated on every call (decision 45). */
const idText = z.string();
const uuid = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** Reads a UUID route parameter; anything else cannot name a record, so it is a 404. */
export function idParam(params: Record<string, unknown>, name: string, what: string): string {
  const value = idText.safeParse(params[name]);
  if (!value.success || !uuid.test(value.data)) throw notFound(what);
  return value.data;
}
