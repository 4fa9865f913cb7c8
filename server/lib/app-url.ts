import type { Request } from 'express';
import { env } from '../env';

/** The address people open the app at, for links in e-mail: APP_URL, else what the request came to. */
export function appUrl(req: Request): string {
  return (env().APP_URL ?? `${req.protocol}://${req.get('host')}`).replace(/\/$/, '');
}
