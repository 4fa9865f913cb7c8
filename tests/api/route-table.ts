/**
 * Every API route, with who may use it. The route × role × project matrix test runs each row for
 * every kind of caller; later features add their rows here (DEVELOPERS.md, "Adding a feature").
 */
import type { ProjectRole } from '../../shared/roles';
import { uniq } from '../support/fixtures';

export interface RouteContext {
  projectId: string;
  /** A user who is not a member of the project (for admin routes that name a user). */
  otherUserId: string;
}

export interface RouteCase {
  method: 'get' | 'post' | 'put' | 'patch' | 'delete';
  path: string;
  /** Project routes: the roles that may call it. Omitted for admin-only and signed-in routes. */
  roles?: readonly ProjectRole[];
  /** Only administrators. */
  admin?: boolean;
  /** Any signed-in user (no project in the path). */
  signedIn?: boolean;
  /** A valid body, made fresh for each call. */
  body?: (ctx: RouteContext) => unknown;
  /** The status a permitted caller gets (default 200). */
  okStatus?: number;
}

const everyone = ['fitter', 'planner', 'buyer', 'site_manager'] as const;

export const routeTable: RouteCase[] = [
  { method: 'get', path: '/api/auth/me', signedIn: true },
  { method: 'get', path: '/api/projects', signedIn: true },
  { method: 'post', path: '/api/auth/change-password', signedIn: true, body: () => ({ currentPassword: 'wrong on purpose', newPassword: 'long enough new one' }), okStatus: 400 },
  { method: 'get', path: '/api/projects/:projectId', roles: everyone },
  { method: 'get', path: '/api/admin/users', admin: true },
  { method: 'post', path: '/api/admin/users', admin: true, body: () => ({ email: `${uniq('matrix')}@kerfwise.test`, name: 'Matrix Invitee' }), okStatus: 201 },
  { method: 'patch', path: '/api/admin/users/:otherUserId', admin: true, body: () => ({ name: uniq('Renamed') }) },
  { method: 'get', path: '/api/admin/projects', admin: true },
  { method: 'post', path: '/api/admin/projects', admin: true, body: () => ({ name: uniq('Matrix drive'), excavatedDiameterM: 7.1, startChainageM: 0, driveDirection: 'decreasing', siteTimeZone: 'Europe/Zurich' }), okStatus: 201 },
  { method: 'patch', path: '/api/admin/projects/:projectId', admin: true, body: () => ({ machineDescription: uniq('machine') }) },
  { method: 'get', path: '/api/admin/projects/:projectId/members', admin: true },
  { method: 'put', path: '/api/admin/projects/:projectId/members/:otherUserId', admin: true, body: () => ({ role: 'buyer' }) },
  { method: 'get', path: '/api/admin/mail', admin: true },
];
