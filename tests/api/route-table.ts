/**
 * Every API route, with who may use it. The route × role × project matrix test runs each row for
 * every kind of caller; later features add their rows here (DEVELOPERS.md, "Adding a feature").
 */
import { randomUUID } from 'node:crypto';
import type { ProjectRole } from '../../shared/roles';
import { PASSWORD, uniq } from '../support/fixtures';
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
  /** The client key of a recorded position entry (a photo names its entry by it). */
  entryClientKey: string;
  /** Ids a row's `prepare` makes fresh for one call; the matrix's defaults name nothing. */
  memberUserId: string;
  groundTypeId: string;
  causeId: string;
  eventId: string;
  partId: string;
  orderId: string;
  lineId: string;
  outboxId: string;
  /** A scheduled job's name (jobs/index.ts). */
  jobName: string;
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
  /** A CSV file sent as the raw body (Content-Type text/csv), for the import routes. */
  csv?: (ctx: RouteContext) => string;
  /** A photo upload (multipart): a 1×1 PNG for the entry named by `entryClientKey`. */
  photo?: boolean;
  /** The status a permitted caller gets (default 200); always a 2xx — a permitted call must succeed. */
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
  // The fixture password again as the new one: the change runs (sessions renewed) and later sign-ins still work.
  {
    method: 'post',
    path: '/api/auth/change-password',
    signedIn: true,
    body: () => ({ currentPassword: PASSWORD, newPassword: PASSWORD }),
    okStatus: 204,
  },
  { method: 'get', path: '/api/projects/:projectId', roles: everyone },
  // Each role's Overview (start of the day): every member, each answered with its own role's sections.
  { method: 'get', path: '/api/projects/:projectId/overview', roles: everyone },
  { method: 'get', path: '/api/admin/users', admin: true },
  {
    method: 'post',
    path: '/api/admin/users',
    admin: true,
    body: () => ({ email: `${uniq('matrix')}@kerfwise.test`, name: 'Matrix Invitee' }),
    okStatus: 201,
  },
  { method: 'patch', path: '/api/admin/users/:otherUserId', admin: true, body: () => ({ name: uniq('Renamed') }) },
  { method: 'get', path: '/api/admin/projects', admin: true },
  {
    method: 'post',
    path: '/api/admin/projects',
    admin: true,
    body: () => ({
      name: uniq('Matrix drive'),
      excavatedDiameterM: 7.1,
      startChainageM: 0,
      driveDirection: 'decreasing',
      siteTimeZone: 'Europe/Zurich',
    }),
    okStatus: 201,
  },
  { method: 'patch', path: '/api/admin/projects/:projectId', admin: true, body: () => ({ machineDescription: uniq('machine') }) },
  { method: 'get', path: '/api/admin/projects/:projectId/members', admin: true },
  { method: 'put', path: '/api/admin/projects/:projectId/members/:otherUserId', admin: true, body: () => ({ role: 'buyer' }) },
  { method: 'delete', path: '/api/admin/projects/:projectId/members/:memberUserId', admin: true, okStatus: 204, prepare: freshMember },
  { method: 'get', path: '/api/admin/mail', admin: true },
  { method: 'get', path: '/api/admin/jobs', admin: true },
  { method: 'post', path: '/api/admin/outbox/:outboxId/release', admin: true, okStatus: 202, prepare: uncertainMail },
  { method: 'post', path: '/api/admin/jobs/:jobName/run', admin: true },
  { method: 'get', path: '/api/admin/backups/status', admin: true },
  { method: 'get', path: '/api/auth/notifications', signedIn: true },
  { method: 'put', path: '/api/auth/notifications', signedIn: true, body: () => ({ kind: 'stop_reminder', enabled: true }) },

  // Cutterhead layout
  { method: 'get', path: '/api/projects/:projectId/positions', roles: everyone },
  // Every position's recent history in one read (kept on the tablet for offline use, decision 42).
  { method: 'get', path: '/api/projects/:projectId/positions/history?last=5', roles: everyone },
  { method: 'get', path: '/api/projects/:projectId/positions/:positionId', roles: everyone },
  {
    method: 'put',
    path: '/api/projects/:projectId/positions',
    roles: ['planner'],
    body: () => ({ positions: [{ number: 90, trackRadiusMm: 1000, positionClass: 'face', discSizeIn: 17, wearLimitMm: 25 }] }),
  },
  {
    method: 'post',
    path: '/api/projects/:projectId/positions/import',
    roles: ['planner'],
    body: () => ({ csv: 'number,track_radius_mm,class,disc_size_in,wear_limit_mm\n91,1100,face,17,25\n' }),
  },
  // Cutters by serial
  { method: 'get', path: '/api/projects/:projectId/cutters', roles: everyone },
  {
    method: 'post',
    path: '/api/projects/:projectId/cutters',
    roles: ['fitter', 'planner'],
    body: () => ({ serial: uniq('M'), discSizeIn: 17 }),
    okStatus: 201,
  },
  { method: 'get', path: '/api/projects/:projectId/cutters/:cutterId', roles: everyone },
  {
    method: 'post',
    path: '/api/projects/:projectId/cutters/:cutterId/workshop',
    roles: ['fitter', 'planner'],
    body: () => ({ outcome: 'rebuilt', newRing: true }),
    prepare: async ({ projectId }) => ({ cutterId: await workshopCutter(projectId) }),
  },
  // Inspection rounds and photos
  { method: 'get', path: '/api/projects/:projectId/rounds', roles: everyone },
  {
    method: 'post',
    path: '/api/projects/:projectId/rounds',
    roles: ['fitter', 'planner'],
    body: () => ({ startedAt: '2026-11-20T06:00:00Z', chainageM: 700 }),
    okStatus: 201,
  },
  { method: 'get', path: '/api/projects/:projectId/rounds/overtaken', roles: everyone },
  { method: 'get', path: '/api/projects/:projectId/rounds/:roundId', roles: everyone },
  { method: 'get', path: '/api/projects/:projectId/rounds/:roundId/history', roles: everyone },
  {
    method: 'post',
    path: '/api/projects/:projectId/rounds/:roundId/entries',
    roles: ['fitter', 'planner'],
    body: (c) => ({ clientKey: randomUUID(), positionId: c.positionId, wearMm: 5.0 }),
    okStatus: 201,
  },
  {
    method: 'post',
    path: '/api/projects/:projectId/rounds/:roundId/close',
    roles: ['fitter', 'planner'],
    prepare: async ({ projectId }) => ({ roundId: await openRound(projectId) }),
  },
  { method: 'post', path: '/api/projects/:projectId/photos', roles: ['fitter', 'planner'], photo: true, okStatus: 201 },
  { method: 'get', path: '/api/projects/:projectId/photos/:photoId', roles: everyone },
  // Drive data
  { method: 'get', path: '/api/projects/:projectId/ground-types', roles: everyone },
  {
    method: 'post',
    path: '/api/projects/:projectId/ground-types',
    roles: ['planner'],
    body: () => ({ name: uniq('Granite'), cai: 3.9 }),
    okStatus: 201,
  },
  {
    method: 'patch',
    path: '/api/projects/:projectId/ground-types/:groundTypeId',
    roles: ['planner'],
    body: () => ({ cai: 2.5 }),
    prepare: freshGroundType,
  },
  {
    method: 'delete',
    path: '/api/projects/:projectId/ground-types/:groundTypeId',
    roles: ['planner'],
    okStatus: 204,
    prepare: freshGroundType,
  },
  { method: 'get', path: '/api/projects/:projectId/geology', roles: everyone },
  { method: 'put', path: '/api/projects/:projectId/geology', roles: ['planner'], body: () => ({ sections: [] }) },
  { method: 'get', path: '/api/projects/:projectId/geology/mapping', roles: everyone },
  { method: 'get', path: '/api/projects/:projectId/strokes', roles: everyone },
  { method: 'get', path: '/api/projects/:projectId/strokes/daily', roles: everyone },
  { method: 'get', path: '/api/projects/:projectId/strokes/export.csv', roles: everyone },
  { method: 'get', path: '/api/projects/:projectId/strokes/mapping', roles: everyone },
  // Wear fits and forecasts
  { method: 'get', path: '/api/projects/:projectId/wear-fit', roles: everyone },
  { method: 'get', path: '/api/projects/:projectId/forecast', roles: everyone },
  { method: 'get', path: '/api/projects/:projectId/forecast/settings', roles: everyone },
  {
    method: 'put',
    path: '/api/projects/:projectId/forecast/settings',
    roles: ['planner'],
    body: () => ({
      classFactors: { centre: 0.8, face: 1, gauge: 1.5 },
      gehringSiteFactor: 1,
      priorStrength: 5,
      tipWidthMm: 19,
      overcutMarginMm: 20,
      windowStrokes: 30,
      overrides: {},
    }),
  },
  // Crews: every member reads them; only the administrator keeps them (and may without being a member).
  { method: 'get', path: '/api/projects/:projectId/crews', roles: everyone },
  {
    method: 'post',
    path: '/api/projects/:projectId/crews',
    admin: true,
    body: () => ({ name: uniq('Crew'), members: [{ name: 'Ola Berg', email: `${uniq('crew')}@kerfwise.test` }] }),
    okStatus: 201,
  },
  {
    method: 'put',
    path: '/api/projects/:projectId/crews/:crewId',
    admin: true,
    body: () => ({ name: uniq('Crew'), members: [{ name: 'Ola Berg', email: `${uniq('crew')}@kerfwise.test` }] }),
  },
  // Intervention stops: everyone reads; the planner plans, schedules, publishes and cancels; fitters and planners run them.
  { method: 'get', path: '/api/projects/:projectId/stops/plan', roles: everyone },
  { method: 'get', path: '/api/projects/:projectId/stops', roles: everyone },
  {
    method: 'post',
    path: '/api/projects/:projectId/stops',
    roles: ['planner'],
    body: (c) => ({ chainageM: 1000 + matrixStops++ * 1.5, positions: [{ positionId: c.positionId, expectedWearMm: 20 }] }),
    okStatus: 201,
    prepare: async ({ projectId }) => {
      await ensureStopSection(projectId);
      return {};
    },
  },
  { method: 'get', path: '/api/projects/:projectId/stops/:stopId', roles: everyone },
  {
    method: 'post',
    path: '/api/projects/:projectId/stops/:stopId/schedule',
    roles: ['planner'],
    body: (c) => ({ plannedStart: '2026-12-20T06:00:00+01:00', expectedHours: 12, crewId: c.crewId, compressedAir: false }),
    prepare: async ({ projectId, crewId }) => ({ stopId: await stopIn(projectId, crewId, 'proposed') }),
  },
  {
    method: 'post',
    path: '/api/projects/:projectId/stops/:stopId/publish',
    roles: ['planner'],
    prepare: async ({ projectId, crewId }) => ({ stopId: await stopIn(projectId, crewId, 'scheduled') }),
  },
  {
    method: 'post',
    path: '/api/projects/:projectId/stops/:stopId/start',
    roles: ['fitter', 'planner'],
    prepare: async ({ projectId, crewId }) => ({ stopId: await stopIn(projectId, crewId, 'scheduled') }),
  },
  {
    method: 'post',
    path: '/api/projects/:projectId/stops/:stopId/complete',
    roles: ['fitter', 'planner'],
    prepare: async ({ projectId, crewId }) => ({ stopId: await stopIn(projectId, crewId, 'in_progress') }),
  },
  {
    method: 'post',
    path: '/api/projects/:projectId/stops/:stopId/cancel',
    roles: ['planner'],
    body: () => ({ reason: 'Matrix: plan changed' }),
    prepare: async ({ projectId, crewId }) => ({ stopId: await stopIn(projectId, crewId, 'proposed') }),
  },
  // Downtime: planners, buyers and site managers read; site managers and planners keep events, causes and settings.
  { method: 'get', path: '/api/projects/:projectId/downtime/causes', roles: ['planner', 'buyer', 'site_manager'] },
  {
    method: 'post',
    path: '/api/projects/:projectId/downtime/causes',
    roles: ['site_manager', 'planner'],
    body: () => ({ name: uniq('Cause'), cutterWork: false }),
    okStatus: 201,
  },
  {
    method: 'patch',
    path: '/api/projects/:projectId/downtime/causes/:causeId',
    roles: ['site_manager', 'planner'],
    body: () => ({ active: false }),
    prepare: freshCause,
  },
  { method: 'get', path: '/api/projects/:projectId/downtime/settings', roles: ['planner', 'buyer', 'site_manager'] },
  {
    method: 'put',
    path: '/api/projects/:projectId/downtime/settings',
    roles: ['site_manager', 'planner'],
    body: () => ({
      shifts: [
        { name: 'Day', start: '06:00' },
        { name: 'Night', start: '18:00' },
      ],
      labourRatePerHour: 90,
      gapMinutes: 90,
    }),
  },
  { method: 'get', path: '/api/projects/:projectId/downtime/events', roles: ['planner', 'buyer', 'site_manager'] },
  { method: 'get', path: '/api/projects/:projectId/downtime/events?format=csv', roles: ['planner', 'buyer', 'site_manager'] },
  {
    method: 'post',
    path: '/api/projects/:projectId/downtime/events',
    roles: ['site_manager', 'planner'],
    okStatus: 201,
    body: () => {
      const startMs = Date.UTC(2025, 0, 1) + matrixEvents++ * 3_600_000; // in the past: future events need a planned stop
      return { startAt: new Date(startMs).toISOString(), endAt: new Date(startMs + 1_800_000).toISOString() };
    },
  },
  // The edit moves the event 15 minutes within its own hour, so it never meets another matrix event.
  {
    method: 'put',
    path: '/api/projects/:projectId/downtime/events/:eventId',
    roles: ['site_manager', 'planner'],
    prepare: freshEvent,
    body: () => {
      const startMs = Date.UTC(2025, 0, 1) + (matrixEvents - 1) * 3_600_000 + 900_000;
      return { startAt: new Date(startMs).toISOString(), endAt: new Date(startMs + 1_800_000).toISOString() };
    },
  },
  {
    method: 'delete',
    path: '/api/projects/:projectId/downtime/events/:eventId',
    roles: ['site_manager', 'planner'],
    okStatus: 204,
    prepare: freshEvent,
  },
  { method: 'post', path: '/api/projects/:projectId/downtime/propose-from-gaps', roles: ['site_manager', 'planner'] },
  { method: 'get', path: '/api/projects/:projectId/downtime/report', roles: ['planner', 'buyer', 'site_manager'] },
  { method: 'get', path: '/api/projects/:projectId/downtime/report?format=csv&table=shift', roles: ['planner', 'buyer', 'site_manager'] },
  { method: 'get', path: '/api/projects/:projectId/downtime/cost', roles: ['planner', 'buyer', 'site_manager'] },
  { method: 'get', path: '/api/projects/:projectId/downtime/cost?format=csv&table=ground', roles: ['planner', 'buyer', 'site_manager'] },
  // Parts: planners, buyers and site managers read; the buyer keeps the catalogue, stock, orders and workshop loop.
  // Rows naming a part, order or line use the ids their `prepare` made for that call.
  { method: 'get', path: '/api/projects/:projectId/parts', roles: ['planner', 'buyer', 'site_manager'] },
  {
    method: 'post',
    path: '/api/projects/:projectId/parts',
    roles: ['buyer'],
    okStatus: 201,
    body: () => ({ code: uniq('P'), name: 'Matrix seal kit', kind: 'seal-kit', unitCost: 95, leadTimeMeanDays: 21 }),
  },
  {
    method: 'put',
    path: '/api/projects/:projectId/parts/:partId',
    roles: ['buyer'],
    prepare: partsRecords,
    body: () => ({ code: uniq('P'), name: 'Matrix ring', kind: 'ring', discSizeIn: 17, unitCost: 400, leadTimeMeanDays: 28 }),
  },
  { method: 'delete', path: '/api/projects/:projectId/parts/:partId', roles: ['buyer'], okStatus: 204, prepare: partsRecords },
  {
    method: 'post',
    path: '/api/projects/:projectId/parts/:partId/count',
    roles: ['buyer'],
    prepare: partsRecords,
    body: () => ({ countedQty: 5 }),
  },
  {
    method: 'get',
    path: '/api/projects/:projectId/parts/:partId/movements',
    roles: ['planner', 'buyer', 'site_manager'],
    prepare: partsRecords,
  },
  { method: 'get', path: '/api/projects/:projectId/parts/workshop', roles: ['planner', 'buyer', 'site_manager'] },
  {
    method: 'put',
    path: '/api/projects/:projectId/parts/workshop',
    roles: ['buyer'],
    body: () => ({ turnaroundDays: 14, maxRebuilds: 3, serviceLevel: 0.95, boms: {} }),
  },
  { method: 'get', path: '/api/projects/:projectId/parts/demand?weeks=4', roles: ['planner', 'buyer', 'site_manager'] },
  { method: 'get', path: '/api/projects/:projectId/parts/demand/suggestions.csv', roles: ['planner', 'buyer', 'site_manager'] },
  { method: 'get', path: '/api/projects/:projectId/parts/orders', roles: ['planner', 'buyer', 'site_manager'] },
  {
    method: 'post',
    path: '/api/projects/:projectId/parts/orders',
    roles: ['buyer'],
    okStatus: 201,
    prepare: partsRecords,
    body: (c) => ({ number: uniq('PO'), lines: [{ partId: c.partId, qtyOrdered: 5, dueDate: '2027-03-01' }] }),
  },
  {
    method: 'post',
    path: '/api/projects/:projectId/parts/orders/batch',
    roles: ['buyer'],
    okStatus: 201,
    prepare: partsRecords,
    body: (c) => ({
      orders: [
        { number: uniq('PO'), supplier: 'Matrix A', lines: [{ partId: c.partId, qtyOrdered: 5, dueDate: '2027-03-01' }] },
        { number: uniq('PO'), supplier: 'Matrix B', lines: [{ partId: c.partId, qtyOrdered: 2, dueDate: '2027-03-08' }] },
      ],
    }),
  },
  {
    method: 'get',
    path: '/api/projects/:projectId/parts/orders/:orderId',
    roles: ['planner', 'buyer', 'site_manager'],
    prepare: partsRecords,
  },
  {
    method: 'post',
    path: '/api/projects/:projectId/parts/orders/:orderId/lines/:lineId/receive',
    roles: ['buyer'],
    prepare: partsRecords,
    body: () => ({ qty: 1 }),
  },
  // Imports last: they replace the long section and add strokes, which the rows above do not expect.
  // Invented files in the layout of tests/fixtures/good-csv; only the planner may import, so each runs once.
  {
    method: 'post',
    path: '/api/projects/:projectId/geology/import',
    roles: ['planner'],
    okStatus: 201,
    csv: () =>
      'Chainage from (m),Chainage to (m),Ground type,Water head above axis (m),Stop allowed,Stop reason\n0,600,Matrix marl,12,yes,\n600,3000,Matrix sandstone,20,yes,\n',
  },
  {
    method: 'post',
    path: '/api/projects/:projectId/strokes/import',
    roles: ['planner'],
    okStatus: 201,
    csv: () =>
      'Ring,Start time,End time,Chainage start (m),Chainage end (m),Cutterhead revolutions,Penetration (mm/rev)\n' +
      '1,2026-03-14T06:00:00+01:00,2026-03-14T06:37:00+01:00,0.0,1.5,190,7.9\n2,2026-03-14T07:00:00+01:00,2026-03-14T07:34:00+01:00,1.5,3.0,179,8.4\n',
  },
];

/** Each downtime event of the matrix in its own hour (events may not overlap); read only when a row's body is made. */
let matrixEvents = 0;

async function workshopCutter(projectId: string) {
  const { db } = await import('../../server/db/client');
  const { cutters } = await import('../../server/db/schema');
  const [c] = await db
    .insert(cutters)
    .values({ projectId, serial: uniq('W'), discSizeIn: 17, status: 'workshop' })
    .returning();
  return c.id;
}

async function openRound(projectId: string) {
  const { db } = await import('../../server/db/client');
  const { inspectionRounds } = await import('../../server/db/schema');
  const [r] = await db
    .insert(inspectionRounds)
    .values({ projectId, startedAt: new Date('2026-11-21T06:00:00Z'), chainageM: 710 })
    .returning();
  return r.id;
}

/** A fresh part with an order line of 10 for one call (fresh, so a delete or receipt never finds it used up). */
async function partsRecords({ projectId }: RouteContext): Promise<Partial<RouteContext>> {
  const { db } = await import('../../server/db/client');
  const { parts, purchaseOrderLines, purchaseOrders } = await import('../../server/db/schema');
  const [part] = await db
    .insert(parts)
    .values({ projectId, code: uniq('M'), name: 'Matrix part', kind: 'small-part', unitCost: '1.00', leadTimeMeanDays: 7 })
    .returning();
  const [order] = await db
    .insert(purchaseOrders)
    .values({ projectId, number: uniq('PO') })
    .returning();
  const [line] = await db
    .insert(purchaseOrderLines)
    .values({ purchaseOrderId: order.id, partId: part.id, qtyOrdered: 10, dueDate: '2027-03-01' })
    .returning();
  // The delete row needs a part without an order line: the order is on a second part.
  const [spare] = await db
    .insert(parts)
    .values({ projectId, code: uniq('M'), name: 'Matrix part, unordered', kind: 'small-part', unitCost: '1.00', leadTimeMeanDays: 7 })
    .returning();
  return { partId: spare.id, orderId: order.id, lineId: line.id };
}

/** A user who is a member (fitter) of the project, for the row that removes a membership. */
async function freshMember({ projectId }: RouteContext): Promise<Partial<RouteContext>> {
  const { addMember, makeUser } = await import('../support/fixtures');
  const user = await makeUser();
  await addMember(projectId, user.id, 'fitter');
  return { memberUserId: user.id };
}

/** A ground type no section uses (a used one may not be deleted). */
async function freshGroundType({ projectId }: RouteContext): Promise<Partial<RouteContext>> {
  const { db } = await import('../../server/db/client');
  const { groundTypes } = await import('../../server/db/schema');
  const [g] = await db
    .insert(groundTypes)
    .values({ projectId, name: uniq('Matrix ground'), cai: 3 })
    .returning();
  return { groundTypeId: g.id };
}

async function freshCause({ projectId }: RouteContext): Promise<Partial<RouteContext>> {
  const { db } = await import('../../server/db/client');
  const { downtimeCauses } = await import('../../server/db/schema');
  const [c] = await db
    .insert(downtimeCauses)
    .values({ projectId, name: uniq('Matrix cause') })
    .returning();
  return { causeId: c.id };
}

/** A half-hour event in an hour of its own (events may not overlap). */
async function freshEvent({ projectId }: RouteContext): Promise<Partial<RouteContext>> {
  const { db } = await import('../../server/db/client');
  const { downtimeEvents } = await import('../../server/db/schema');
  const startMs = Date.UTC(2025, 0, 1) + matrixEvents++ * 3_600_000; // in the past: future events need a planned stop
  const [e] = await db
    .insert(downtimeEvents)
    .values({ projectId, startAt: new Date(startMs), endAt: new Date(startMs + 1_800_000) })
    .returning();
  return { eventId: e.id };
}

/** A message claimed 20 minutes ago and never marked sent: delivery uncertain (decision 8). */
async function uncertainMail(): Promise<Partial<RouteContext>> {
  const { db } = await import('../../server/db/client');
  const { outbox } = await import('../../server/db/schema');
  const [m] = await db
    .insert(outbox)
    .values({
      kind: 'matrix',
      toAddresses: [`${uniq('matrix')}@kerfwise.test`],
      subject: 'Matrix: uncertain delivery',
      textBody: 'Matrix.',
      claimedAt: new Date(Date.now() - 20 * 60_000),
    })
    .returning();
  return { outboxId: String(m.id) };
}
