import type { NextFunction, Request, Response } from 'express';
import { env } from '../env';
import { HttpError } from '../lib/http-error';

/**
 * Forged cross-site requests (CSRF) are refused before any handler runs (DEVELOPERS.md, decision
 * 25). A state-changing request (POST, PUT, PATCH, DELETE) must come from Kerfwise's own pages:
 * - a browser names where a request comes from in `Sec-Fetch-Site` (Fetch Metadata); only
 *   `same-origin` is accepted — `same-site` (another port or subdomain of the same site, which a
 *   SameSite=Lax cookie does not stop) and `cross-site` are refused;
 * - without Fetch Metadata, `Origin` must be the app's own origin (APP_URL, or the origin the
 *   request was addressed to);
 * - with neither (not a browser: scripts, curl, the test client), the request passes: a cross-site
 *   page cannot make a browser omit both.
 * This follows the OWASP Cross-Site Request Forgery Prevention Cheat Sheet ("Fetch Metadata
 * headers" and "Verifying origin with standard headers").
 */
const UNSAFE = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

export function ownOrigins(req: Request): Set<string> {
  const origins = new Set<string>();
  const appUrl = env().APP_URL;
  if (appUrl) origins.add(new URL(appUrl).origin);
  const host = req.get('host');
  if (host) origins.add(`${req.protocol}://${host}`);
  return origins;
}

export function requireSameOrigin(req: Request, _res: Response, next: NextFunction) {
  if (!UNSAFE.has(req.method)) return next();
  const site = req.get('sec-fetch-site');
  const origin = req.get('origin');
  const refused = () =>
    next(new HttpError(403, 'This request did not come from a Kerfwise page, so it was refused. Open Kerfwise itself and try again.'));
  if (site !== undefined) return site === 'same-origin' ? next() : refused();
  if (origin !== undefined) return ownOrigins(req).has(origin) ? next() : refused();
  next();
}

/** The body types each state-changing route takes: CSV imports, photo uploads, JSON elsewhere. */
export function bodyTypesFor(path: string): string[] {
  if (/\/photos\/?$/.test(path)) return ['multipart/form-data'];
  if (/\/import\/?$/.test(path)) return ['text/csv', 'application/json'];
  return ['application/json'];
}

/**
 * A state-changing request's body must be of the type its route takes (`bodyTypesFor`); a request
 * without a body passes (publish, cancel, run now). This stops a plain HTML form (urlencoded,
 * multipart or text/plain) from reaching a JSON route even when no browser header gives it away.
 */
export function requireBodyType(req: Request, _res: Response, next: NextFunction) {
  if (!UNSAFE.has(req.method)) return next();
  const types = bodyTypesFor(req.path);
  const hasBody = req.headers['transfer-encoding'] !== undefined || Number(req.headers['content-length'] ?? 0) > 0;
  const contentType = req.headers['content-type'];
  if (!contentType) {
    return hasBody ? next(new HttpError(415, `Send the request body with a Content-Type: ${types.join(' or ')}.`)) : next();
  }
  if (req.is(types)) return next();
  next(new HttpError(415, `This request takes ${types.join(' or ')}, not ${contentType.split(';')[0]}.`));
}
