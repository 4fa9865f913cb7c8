/**
 * Every API route, with who may use it. The route × role × project matrix test runs each row for
 * every kind of caller; later features add their rows here (DEVELOPERS.md, "Adding a feature").
 */
import { randomUUID } from 'node:crypto';
import type { ProjectRole } from '../../shared/roles';
import { uniq } from '../support/fixtures';

export interface RouteContext {
  projectId: string;
  /** A user who is not a member of the project (for admin routes that name a user). */
  otherUserId: string;
  positionId: string;
  cutterId: string;
  roundId: string;
  photoId: string;
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
  /** Makes what one call needs (e.g. a fresh round to close) and overrides path parameters. */
  prepare?: (ctx: RouteContext) => Promise<Partial<RouteContext>>;
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
  { method: 'get', path: '/api/admin/jobs', admin: true },
  { method: 'post', path: '/api/admin/jobs/deliver-mail/run', admin: true },
  { method: 'get', path: '/api/auth/notifications', signedIn: true },
  { method: 'put', path: '/api/auth/notifications', signedIn: true, body: () => ({ kind: 'stop_reminder', enabled: true }) },

  // Cutterhead layout
  { method: 'get', path: '/api/projects/:projectId/positions', roles: everyone },
  { method: 'get', path: '/api/projects/:projectId/positions/:positionId', roles: everyone },
  { method: 'put', path: '/api/projects/:projectId/positions', roles: ['planner'], body: () => ({ positions: [{ number: 90, trackRadiusMm: 1000, positionClass: 'face', discSizeIn: 17, wearLimitMm: 25 }] }) },
  { method: 'post', path: '/api/projects/:projectId/positions/import', roles: ['planner'], body: () => ({ csv: 'number,track_radius_mm,class,disc_size_in,wear_limit_mm\n91,1100,face,17,25\n' }) },
  // Cutters by serial
  { method: 'get', path: '/api/projects/:projectId/cutters', roles: everyone },
  { method: 'post', path: '/api/projects/:projectId/cutters', roles: ['fitter', 'planner'], body: () => ({ serial: uniq('M'), discSizeIn: 17 }), okStatus: 201 },
  { method: 'get', path: '/api/projects/:projectId/cutters/:cutterId', roles: everyone },
  { method: 'post', path: '/api/projects/:projectId/cutters/:cutterId/workshop', roles: ['fitter', 'planner'], body: () => ({ outcome: 'rebuilt', newRing: true }),
    prepare: async ({ projectId }) => ({ cutterId: await workshopCutter(projectId) }) },
  // Inspection rounds and photos
  { method: 'get', path: '/api/projects/:projectId/rounds', roles: everyone },
  { method: 'post', path: '/api/projects/:projectId/rounds', roles: ['fitter', 'planner'], body: () => ({ startedAt: '2026-11-20T06:00:00Z', chainageM: 700 }), okStatus: 201 },
  { method: 'get', path: '/api/projects/:projectId/rounds/:roundId', roles: everyone },
  { method: 'get', path: '/api/projects/:projectId/rounds/:roundId/history', roles: everyone },
  { method: 'post', path: '/api/projects/:projectId/rounds/:roundId/entries', roles: ['fitter', 'planner'], body: (c) => ({ clientKey: randomUUID(), positionId: c.positionId, wearMm: 5.0 }), okStatus: 201 },
  { method: 'post', path: '/api/projects/:projectId/rounds/:roundId/close', roles: ['fitter', 'planner'],
    prepare: async ({ projectId }) => ({ roundId: await openRound(projectId) }) },
  // Permitted callers get past the guard to the upload check (no file sent → 400).
  { method: 'post', path: '/api/projects/:projectId/photos', roles: ['fitter', 'planner'], okStatus: 400 },
  { method: 'get', path: '/api/projects/:projectId/photos/:photoId', roles: everyone },
  // Drive data
  { method: 'get', path: '/api/projects/:projectId/ground-types', roles: everyone },
  { method: 'post', path: '/api/projects/:projectId/ground-types', roles: ['planner'], body: () => ({ name: uniq('Granite'), cai: 3.9 }), okStatus: 201 },
  { method: 'get', path: '/api/projects/:projectId/geology', roles: everyone },
  { method: 'put', path: '/api/projects/:projectId/geology', roles: ['planner'], body: () => ({ sections: [] }) },
  { method: 'get', path: '/api/projects/:projectId/strokes', roles: everyone },
  { method: 'get', path: '/api/projects/:projectId/strokes/daily', roles: everyone },
  { method: 'get', path: '/api/projects/:projectId/strokes/export.csv', roles: everyone },
  // Wear fits and forecasts
  { method: 'get', path: '/api/projects/:projectId/wear-fit', roles: everyone },
  { method: 'get', path: '/api/projects/:projectId/forecast', roles: everyone },
  { method: 'get', path: '/api/projects/:projectId/forecast/settings', roles: everyone },
  { method: 'put', path: '/api/projects/:projectId/forecast/settings', roles: ['planner'], body: () => ({
    classFactors: { centre: 0.8, face: 1, gauge: 1.5 }, gehringSiteFactor: 1, priorStrength: 5, tipWidthMm: 19, overcutMarginMm: 20, windowStrokes: 30, overrides: {},
  }) },
  // Crews: every member reads them; only the administrator keeps them (and may without being a member).
  { method: 'get', path: '/api/projects/:projectId/crews', roles: everyone },
  { method: 'post', path: '/api/projects/:projectId/crews', admin: true, body: () => ({ name: uniq('Crew'), members: [{ name: 'Ola Berg', email: `${uniq('crew')}@kerfwise.test` }] }), okStatus: 201 },
];

async function workshopCutter(projectId: string) {
  const { db } = await import('../../server/db/client');
  const { cutters } = await import('../../server/db/schema');
  const [c] = await db.insert(cutters).values({ projectId, serial: uniq('W'), discSizeIn: 17, status: 'workshop' }).returning();
  return c.id;
}

async function openRound(projectId: string) {
  const { db } = await import('../../server/db/client');
  const { inspectionRounds } = await import('../../server/db/schema');
  const [r] = await db.insert(inspectionRounds).values({ projectId, startedAt: new Date('2026-11-21T06:00:00Z'), chainageM: 710 }).returning();
  return r.id;
}
