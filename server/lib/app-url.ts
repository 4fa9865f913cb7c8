import type { Request } from 'express';
import { env } from '../env';

/** The address people open the app at, for links in e-mail: APP_URL, else what the request came to. */
export function appUrl(req: Request): string {
  return (env().APP_URL ?? `${req.protocol}://${req.get('host')}`).replace(/\/$/, '');
}

/** APP_URL without a trailing slash, for links in mail sent by jobs (no request to fall back on); null when unset. */
export function configuredAppUrl(): string | null {
  return env().APP_URL?.replace(/\/$/, '') ?? null;
}
