/**
 * Every API route, with who may use it. The route × role × project matrix test runs each row for
 * every kind of caller; later features add their rows here (DEVELOPERS.md, "Adding a feature").
 */
import { randomUUID } from 'node:crypto';
import type { ProjectRole } from '../../shared/roles';
import { uniq } from '../support/fixtures';
import { ensureStopSection, stopIn } from '../support/stops-fixtures';

export interface RouteContext {
  projectId: string;
  /** A user who is not a member of the project (for admin routes that name a user). */
  otherUserId: string;
  positionId: string;
  cutterId: string;
  roundId: string;
  photoId: string;
  /** A proposed stop, and a crew with a member (tests/support/stops-fixtures.ts). */
  stopId: string;
  crewId: string;
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
/** Each proposed stop of the matrix at its own chainage (an open stop at the same chainage is refused). */
let matrixStops = 0;

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
  // No message is uncertain here: a permitted caller gets past the guard to the 404.
  { method: 'post', path: '/api/admin/outbox/999999999/release', admin: true, okStatus: 404 },
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
  { method: 'get', path: '/api/projects/:projectId/geology/mapping', roles: everyone },
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
  // Intervention stops: everyone reads; the planner plans, schedules, publishes and cancels; fitters and planners run them.
  { method: 'get', path: '/api/projects/:projectId/stops/plan', roles: everyone },
  { method: 'get', path: '/api/projects/:projectId/stops', roles: everyone },
  { method: 'post', path: '/api/projects/:projectId/stops', roles: ['planner'], body: (c) => ({ chainageM: 1000 + (matrixStops++) * 1.5, positions: [{ positionId: c.positionId, expectedWearMm: 20 }] }), okStatus: 201,
    prepare: async ({ projectId }) => {
      await ensureStopSection(projectId);
      return {};
    } },
  { method: 'get', path: '/api/projects/:projectId/stops/:stopId', roles: everyone },
  { method: 'post', path: '/api/projects/:projectId/stops/:stopId/schedule', roles: ['planner'], body: (c) => ({ plannedStart: '2026-12-20T06:00:00+01:00', expectedHours: 12, crewId: c.crewId, compressedAir: false }),
    prepare: async ({ projectId, crewId }) => ({ stopId: await stopIn(projectId, crewId, 'proposed') }) },
  { method: 'post', path: '/api/projects/:projectId/stops/:stopId/publish', roles: ['planner'], prepare: async ({ projectId, crewId }) => ({ stopId: await stopIn(projectId, crewId, 'scheduled') }) },
  { method: 'post', path: '/api/projects/:projectId/stops/:stopId/start', roles: ['fitter', 'planner'], prepare: async ({ projectId, crewId }) => ({ stopId: await stopIn(projectId, crewId, 'scheduled') }) },
  { method: 'post', path: '/api/projects/:projectId/stops/:stopId/complete', roles: ['fitter', 'planner'], prepare: async ({ projectId, crewId }) => ({ stopId: await stopIn(projectId, crewId, 'in_progress') }) },
  { method: 'post', path: '/api/projects/:projectId/stops/:stopId/cancel', roles: ['planner'], body: () => ({ reason: 'Matrix: plan changed' }),
    prepare: async ({ projectId, crewId }) => ({ stopId: await stopIn(projectId, crewId, 'proposed') }) },
  // Downtime: planners, buyers and site managers read; site managers and planners keep events, causes and settings.
  // Routes naming one cause or event get a well-formed id that names none: permitted callers pass the guard and get 404.
  { method: 'get', path: '/api/projects/:projectId/downtime/causes', roles: ['planner', 'buyer', 'site_manager'] },
  { method: 'post', path: '/api/projects/:projectId/downtime/causes', roles: ['site_manager', 'planner'], body: () => ({ name: uniq('Cause'), cutterWork: false }), okStatus: 201 },
  { method: 'patch', path: '/api/projects/:projectId/downtime/causes/00000000-0000-4000-8000-000000000000', roles: ['site_manager', 'planner'], body: () => ({ active: false }), okStatus: 404 },
  { method: 'get', path: '/api/projects/:projectId/downtime/settings', roles: ['planner', 'buyer', 'site_manager'] },
  { method: 'put', path: '/api/projects/:projectId/downtime/settings', roles: ['site_manager', 'planner'], body: () => ({ shifts: [{ name: 'Day', start: '06:00' }, { name: 'Night', start: '18:00' }], labourRatePerHour: 90, gapMinutes: 90 }) },
  { method: 'get', path: '/api/projects/:projectId/downtime/events', roles: ['planner', 'buyer', 'site_manager'] },
  { method: 'get', path: '/api/projects/:projectId/downtime/events?format=csv', roles: ['planner', 'buyer', 'site_manager'] },
  { method: 'post', path: '/api/projects/:projectId/downtime/events', roles: ['site_manager', 'planner'], okStatus: 201, body: () => {
    const startMs = Date.UTC(2027, 0, 1) + (matrixEvents++) * 3_600_000;
    return { startAt: new Date(startMs).toISOString(), endAt: new Date(startMs + 1_800_000).toISOString() };
  } },
  { method: 'put', path: '/api/projects/:projectId/downtime/events/00000000-0000-4000-8000-000000000000', roles: ['site_manager', 'planner'], body: () => ({ startAt: '2027-02-01T08:00:00Z', endAt: '2027-02-01T09:00:00Z' }), okStatus: 404 },
  { method: 'delete', path: '/api/projects/:projectId/downtime/events/00000000-0000-4000-8000-000000000000', roles: ['site_manager', 'planner'], okStatus: 404 },
  { method: 'post', path: '/api/projects/:projectId/downtime/propose-from-gaps', roles: ['site_manager', 'planner'] },
  { method: 'get', path: '/api/projects/:projectId/downtime/report', roles: ['planner', 'buyer', 'site_manager'] },
  { method: 'get', path: '/api/projects/:projectId/downtime/report?format=csv&table=shift', roles: ['planner', 'buyer', 'site_manager'] },
  { method: 'get', path: '/api/projects/:projectId/downtime/cost', roles: ['planner', 'buyer', 'site_manager'] },
  { method: 'get', path: '/api/projects/:projectId/downtime/cost?format=csv&table=ground', roles: ['planner', 'buyer', 'site_manager'] },
  // Parts: planners, buyers and site managers read; the buyer keeps the catalogue, stock, orders and workshop loop.
  // Rows naming a part, order or line read the ids their `prepare` made (partsIds, below) when the path is filled.
  { method: 'get', path: '/api/projects/:projectId/parts', roles: ['planner', 'buyer', 'site_manager'] },
  { method: 'post', path: '/api/projects/:projectId/parts', roles: ['buyer'], okStatus: 201, body: () => ({ code: uniq('P'), name: 'Matrix seal kit', kind: 'seal-kit', unitCost: 95, leadTimeMeanDays: 21 }) },
  { method: 'put', get path() { return `/api/projects/:projectId/parts/${partsIds.partId}`; }, roles: ['buyer'], prepare: partsRecords,
    body: () => ({ code: uniq('P'), name: 'Matrix ring', kind: 'ring', discSizeIn: 17, unitCost: 400, leadTimeMeanDays: 28 }) },
  { method: 'delete', get path() { return `/api/projects/:projectId/parts/${partsIds.partId}`; }, roles: ['buyer'], okStatus: 204, prepare: partsRecords },
  { method: 'post', get path() { return `/api/projects/:projectId/parts/${partsIds.partId}/count`; }, roles: ['buyer'], prepare: partsRecords, body: () => ({ countedQty: 5 }) },
  { method: 'get', get path() { return `/api/projects/:projectId/parts/${partsIds.partId}/movements`; }, roles: ['planner', 'buyer', 'site_manager'], prepare: partsRecords },
  { method: 'get', path: '/api/projects/:projectId/parts/workshop', roles: ['planner', 'buyer', 'site_manager'] },
  { method: 'put', path: '/api/projects/:projectId/parts/workshop', roles: ['buyer'], body: () => ({ turnaroundDays: 14, maxRebuilds: 3, serviceLevel: 0.95, boms: {} }) },
  { method: 'get', path: '/api/projects/:projectId/parts/demand?weeks=4', roles: ['planner', 'buyer', 'site_manager'] },
  { method: 'get', path: '/api/projects/:projectId/parts/demand/suggestions.csv', roles: ['planner', 'buyer', 'site_manager'] },
  { method: 'get', path: '/api/projects/:projectId/parts/orders', roles: ['planner', 'buyer', 'site_manager'] },
  { method: 'post', path: '/api/projects/:projectId/parts/orders', roles: ['buyer'], okStatus: 201, prepare: partsRecords,
    body: () => ({ number: uniq('PO'), lines: [{ partId: partsIds.partId, qtyOrdered: 5, dueDate: '2027-03-01' }] }) },
  { method: 'get', get path() { return `/api/projects/:projectId/parts/orders/${partsIds.orderId}`; }, roles: ['planner', 'buyer', 'site_manager'], prepare: partsRecords },
  { method: 'post', get path() { return `/api/projects/:projectId/parts/orders/${partsIds.orderId}/lines/${partsIds.lineId}/receive`; }, roles: ['buyer'], prepare: partsRecords, body: () => ({ qty: 1 }) },
];

/** Each downtime event of the matrix in its own hour (events may not overlap); read only when a row's body is made. */
let matrixEvents = 0;

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

/** The part, order and line the parts rows name; the matrix fills only the context's keys, so these are read by `path`. */
const partsIds = { partId: ':partId', orderId: ':orderId', lineId: ':lineId' };

/** A fresh part with an order line of 10 for one call (fresh, so a delete or receipt never finds it used up). */
async function partsRecords({ projectId }: RouteContext): Promise<Partial<RouteContext>> {
  const { db } = await import('../../server/db/client');
  const { parts, purchaseOrderLines, purchaseOrders } = await import('../../server/db/schema');
  const [part] = await db.insert(parts).values({ projectId, code: uniq('M'), name: 'Matrix part', kind: 'small-part', unitCost: '1.00', leadTimeMeanDays: 7 }).returning();
  const [order] = await db.insert(purchaseOrders).values({ projectId, number: uniq('PO') }).returning();
  const [line] = await db.insert(purchaseOrderLines).values({ purchaseOrderId: order.id, partId: part.id, qtyOrdered: 10, dueDate: '2027-03-01' }).returning();
  // The delete row needs a part without an order line: the order is on a second part.
  const [spare] = await db.insert(parts).values({ projectId, code: uniq('M'), name: 'Matrix part, unordered', kind: 'small-part', unitCost: '1.00', leadTimeMeanDays: 7 }).returning();
  Object.assign(partsIds, { partId: spare.id, orderId: order.id, lineId: line.id });
  return {};
}
