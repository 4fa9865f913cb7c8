import { env } from '../env';

/**
 * The address people open the app at, for links in e-mail: APP_URL, always. Never built from a
 * request's Host or X-Forwarded-Host header, which a caller controls (a password-reset link
 * pointing at an attacker's host would hand them the token). `npm start` and `npm run dev` set
 * APP_URL to the address they serve; the production entry refuses to start without it.
 */
export function appUrl(): string {
  const url = env().APP_URL;
  if (!url) throw new Error('APP_URL is not set: links in e-mail cannot be built.');
  return url.replace(/\/$/, '');
}

/** APP_URL without a trailing slash, for links in mail sent by jobs (no request to fall back on); null when unset. */
export function configuredAppUrl(): string | null {
  return env().APP_URL?.replace(/\/$/, '') ?? null;
}
