/**
 * Each role's Overview: the start of the day, from data Kerfwise already has. The server answers
 * only the sections of the caller's role (GET /api/projects/:projectId/overview); every item
 * carries the ids the client needs to link to the screen where it is dealt with.
 */
import type { ProjectRole } from '../roles';
import type { StopStatus } from './stop';
import type { Wire } from './wire';

export interface OverviewRound {
  id: string;
  startedAt: Date;
  chainageM: number;
  ringNumber: number | null;
  /** Positions measured in the round so far, of the positions on the head. */
  entries: number;
  positionCount: number;
}

export interface OverviewStop {
  id: string;
  status: StopStatus;
  chainageM: number;
  ringNumber: number | null;
  plannedStart: Date | null;
  compressedAir: boolean;
  positionCount: number;
}

export interface OverviewDisc {
  positionId: string;
  positionNumber: number;
  serial: string | null;
  /** Wear at the last measurement of the cutter now fitted. */
  wearMm: number;
  wearLimitMm: number;
  band: 'over' | 'near';
  measuredAt: Date;
}

export interface FitterOverview {
  openRound: OverviewRound | null;
  /** The stop under way, else the next scheduled one along the drive. */
  nextStop: (OverviewStop & { positions: { positionId: string; number: number; fittedSerial: string | null }[] }) | null;
  discs: OverviewDisc[];
  nearLimitShare: number;
}

export interface OverviewChangeOut {
  positionId: string;
  positionNumber: number;
  serial: string | null;
  status: 'reaches_limit' | 'over_limit' | 'beyond_known_ground';
  remainingM: number;
  chainageM: number;
  ringNumber: number;
  date: Date;
}

export interface StaleCheck {
  lastAt: Date | null;
  stale: boolean;
}

export interface PlannerOverview {
  /** The positions due first by the cautious (P90) forecast. */
  changeOuts: OverviewChangeOut[];
  changeOutProblems: string[];
  /** Proposed, scheduled and under-way stops in drive order. */
  openStops: OverviewStop[];
  staleAfterDays: number;
  strokes: StaleCheck;
  inspections: StaleCheck;
}

export interface OverviewOrderSuggestion {
  partId: string;
  code: string;
  name: string;
  supplier: string;
  orderQty: number;
  orderValue: number;
  currency: string;
  firstShortageDate: string | null;
}

export interface OverviewOrderLine {
  orderId: string;
  lineId: string;
  orderNumber: string;
  supplier: string;
  partCode: string;
  partName: string;
  outstanding: number;
  dueDate: string;
  state: 'late' | 'due';
}

export interface BuyerOverview {
  orderNow: OverviewOrderSuggestion[];
  orderLines: OverviewOrderLine[];
  dueWithinDays: number;
  problems: string[];
}

export interface WeekFigures {
  /** Site calendar days covered, both included; this week runs Monday to today. */
  from: string;
  to: string;
  isoWeek: string;
  boringHours: number;
  advanceM: number;
  downtimeHours: number;
  cutterWorkHours: number;
}

export interface OverviewStandstill {
  eventId: string;
  startAt: Date;
  endAt: Date;
  hours: number;
  source: string;
}

export interface SiteManagerOverview {
  /** This week so far (Monday to today), last week over the same days (the fair comparison), and the whole of last week. */
  thisWeek: WeekFigures;
  lastWeekSameDays: WeekFigures;
  lastWeek: WeekFigures;
  /** Downtime events without a cause, newest first (at most the list limit), and how many there are in all. */
  unexplained: OverviewStandstill[];
  unexplainedCount: number;
  unexplainedHours: number;
}

export interface Overview {
  role: ProjectRole;
  timeZone: string;
  now: Date;
  /** How many items each list shows at most; the totals say how many more there are. */
  listLimit: number;
  fitter?: FitterOverview;
  planner?: PlannerOverview;
  buyer?: BuyerOverview;
  siteManager?: SiteManagerOverview;
}

export type OverviewWire = Wire<Overview>;
