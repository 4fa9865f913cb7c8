import { z } from 'zod';
import { chainageM, freeText, instant } from './fields';
import type { PositionClass } from '../cutters';
import type { StopPlanCost } from '../domain/stop-planner';

/** A stop's life: proposed → scheduled → in progress → done, or cancelled from any open state. */
export const stopStatuses = ['proposed', 'scheduled', 'in_progress', 'done', 'cancelled'] as const;
export type StopStatus = (typeof stopStatuses)[number];

export const stopStatusLabels: Record<StopStatus, string> = {
  proposed: 'Proposed',
  scheduled: 'Scheduled',
  in_progress: 'In progress',
  done: 'Done',
  cancelled: 'Cancelled',
};

/** The states each action may start from; the server refuses every other with a 409, the client hides it. */
export const stopActionFrom = {
  schedule: ['proposed', 'scheduled'],
  publish: ['scheduled'],
  start: ['scheduled'],
  complete: ['in_progress'],
  cancel: ['proposed', 'scheduled', 'in_progress'],
} as const satisfies Record<string, readonly StopStatus[]>;
export type StopAction = keyof typeof stopActionFrom;

export const canStop = (action: StopAction, status: StopStatus) => (stopActionFrom[action] as readonly StopStatus[]).includes(status);

const hours = (label: string, max: number) =>
  z.coerce
    .number({ message: `${label} must be a number of hours.` })
    .min(0, `${label} cannot be negative.`)
    .max(max, `${label} must be at most ${max} h.`);

/** Overrides of the plan's assumptions (query string of GET /stops/plan); anything left out takes the default. */
export const stopPlanQuerySchema = z.object({
  horizonM: z.coerce
    .number({ message: 'The horizon must be a number of metres.' })
    .gt(0, 'The horizon must be more than 0 m.')
    .max(20_000, 'Plan at most 20 km ahead.')
    .optional(),
  freeAirStopH: hours('Hours per free-air stop', 500).optional(),
  compressedAirStopH: hours('Hours per compressed-air stop', 500).optional(),
  changeHCentre: hours('Hours per centre cutter change', 50).optional(),
  changeHFace: hours('Hours per face cutter change', 50).optional(),
  changeHGauge: hours('Hours per gauge cutter change', 50).optional(),
  wastedRingLifeHPerMm: hours('Hours per mm of ring life thrown away', 50).optional(),
  compressedAirAboveHeadM: z.coerce
    .number({ message: 'The compressed-air head must be a number of metres.' })
    .min(0, 'The head cannot be negative.')
    .max(300)
    .optional(),
  /** Site-practice rule: at a stop, change every disc worn to at least this share of its limit (%). */
  practiceChangeSharePercent: z.coerce
    .number({ message: 'The change share must be a percentage of the limit.' })
    .min(50, 'Change discs at 50 % of their limit or more.')
    .max(100, 'The change share cannot pass 100 % of the limit.')
    .optional(),
  /** Fixed-interval rule: a stop every this many metres. */
  fixedIntervalM: z.coerce
    .number({ message: 'The interval must be a number of metres.' })
    .min(10, 'Stop at most every 10 m.')
    .max(5000, 'The interval must be at most 5,000 m.')
    .optional(),
});
export type StopPlanQuery = z.infer<typeof stopPlanQuerySchema>;

const expectedHoursSchema = z
  .number({ message: 'Expected hours must be a number.' })
  .gt(0, 'Expected hours must be more than 0.')
  .max(500, 'A stop of more than 500 h is not plausible; check the value.');

/** A proposed stop, taken from a stop of the plan. */
export const createStopInputSchema = z.object({
  chainageM: chainageM('The chainage of the stop', 'Give the chainage of the stop, in metres.'),
  compressedAir: z.boolean().default(false),
  expectedHours: expectedHoursSchema.nullable().default(null),
  positions: z
    .array(
      z.object({
        positionId: z.uuid({ message: 'Each position must be given by its id.' }),
        expectedWearMm: z
          .number()
          .min(0, 'Expected wear cannot be negative.')
          .max(100, 'Expected wear above 100 mm is not possible.')
          .nullable()
          .default(null),
      }),
    )
    .min(1, 'A stop needs at least one position to change.')
    .max(300)
    .refine((p) => new Set(p.map((x) => x.positionId)).size === p.length, 'The same position is listed twice.'),
  notes: freeText('The notes', 2000).default(''),
});
export type CreateStopInput = z.infer<typeof createStopInputSchema>;

export const scheduleStopInputSchema = z.object({
  plannedStart: instant('The planned start', 'Give the planned start as a date and time.'),
  expectedHours: expectedHoursSchema,
  crewId: z.uuid({ message: 'Choose a crew.' }),
  compressedAir: z.boolean({ message: 'Say whether the stop is worked in free air or compressed air.' }),
});
export type ScheduleStopInput = z.infer<typeof scheduleStopInputSchema>;

export const startStopInputSchema = z.object({
  /** When work began; now when left out. */
  actualStart: instant('The actual start', 'Give the actual start as a date and time.').optional(),
});
export type StartStopInput = z.infer<typeof startStopInputSchema>;

export const completeStopInputSchema = z.object({
  /** When work ended; now when left out. */
  actualEnd: instant('The actual end', 'Give the actual end as a date and time.').optional(),
  /** The inspection round done during the stop. */
  roundId: z.uuid({ message: 'Choose an inspection round of this drive.' }).nullable().default(null),
});
export type CompleteStopInput = z.infer<typeof completeStopInputSchema>;

export const cancelStopInputSchema = z.object({
  reason: freeText('The reason', 500, 'Give the reason for cancelling.').refine((s) => s.length >= 3, 'Give the reason for cancelling.'),
});
export type CancelStopInput = z.infer<typeof cancelStopInputSchema>;

export const stopListQuerySchema = z.object({ status: z.enum(stopStatuses, { message: 'Unknown stop status.' }).optional() });

// ----- what GET /stops/plan answers (server/services/stops.ts builds it; the client reads it) -----

/** The plan's assumptions as the server used them (defaults with any overrides). */
export interface StopPlanSettings {
  horizonM: number;
  freeAirStopH: number;
  compressedAirStopH: number;
  changeHByClass: Record<PositionClass, number>;
  wastedRingLifeHPerMm: number;
  /** A stop under more groundwater head than this (m above the axis) is worked in compressed air. */
  compressedAirAboveHeadM: number;
  /** Site-practice rule: change every disc worn to at least this share of its limit (%); common practice, no source. */
  practiceChangeSharePercent: number;
  /** Fixed-interval rule: a stop every this many metres. */
  fixedIntervalM: number;
}

/** How close the plan is to the cheapest possible one. */
export interface PlanCertificateView {
  /** Proven the cheapest possible plan. */
  proven: boolean;
  /** At most this many % above the cheapest possible plan (0 when proven). */
  gapPercent: number;
  /** No plan can cost less than this, in hours. */
  lowerBoundH: number;
  /** Seconds after which the planner's answer time stopped the search before its end (the plan and the bound hold, less was tried); null when it did not. */
  cutAfterS: number | null;
}

export interface PlanChange {
  positionId: string;
  positionNumber: number;
  positionClass: PositionClass;
  limitMm: number;
  wearAtChangeMm: number;
  unusedWearMm: number;
}

export interface PlanStop {
  chainageM: number;
  aheadM: number;
  ringNumber: number;
  compressedAir: boolean;
  waterHeadM: number | null;
  workingPressureBar: number | null;
  stopH: number;
  changeH: number;
  wastedRingLifeH: number;
  changes: PlanChange[];
  /** An open stop already at this chainage (proposed from the plan before, or by the nightly job). */
  existingStopId: string | null;
  /** When the machine is expected there (ISO), at the forecast's advance rates; null if not known. */
  expectedAt: string | null;
}

/** One section of the long section over the plan's stretch, for the plan's drawing. */
export interface PlanSection {
  chainageFromM: number;
  chainageToM: number;
  groundName: string | null;
  waterHeadM: number;
  stopAllowed: boolean;
  stopReason: string;
}

export interface PlanView {
  cost: StopPlanCost;
  stops: PlanStop[];
}

/** The plan; `TDate` is Date on the server and the ISO text the client receives. */
export interface StopPlanView<TDate = string> {
  now: TDate;
  currentChainageM: number | null;
  currentRingNumber: number | null;
  settings: StopPlanSettings;
  /** Where the plan ends: the horizon, or the end of the known ground if that comes first. */
  horizonEndChainageM: number | null;
  candidatePlaceCount: number;
  /** The long section between the machine and the plan's end. */
  longSection: PlanSection[];
  /** Compressed air above this water head (m), for the drawing's line. */
  compressedAirAboveHeadM: number;
  /** Why there is no plan, or what limits it. */
  problems: string[];
  /** Positions no plan can keep within their limit. */
  infeasible: { positionId: string; positionNumber: number; dueChainageM: number; reason: string }[];
  optimised: PlanView | null;
  certificate: PlanCertificateView | null;
  /** The site-practice rule's plan and a stop every N metres, priced the same way (null when the rule gets stuck). */
  practice: PlanView | null;
  fixedInterval: PlanView | null;
  /** Practice-rule hours less optimised hours, and fixed-interval hours less optimised hours (sums of the plans' own tables). */
  savingVsPracticeH: number | null;
  savingVsIntervalH: number | null;
  cautions: string[];
}

export interface Stop {
  id: string;
  projectId: string;
  status: StopStatus;
  source: string;
  chainageM: number;
  ringNumber: number | null;
  compressedAir: boolean;
  workingPressureBar: number | null;
  plannedStart: string | null;
  expectedHours: number | null;
  crewId: string | null;
  publishedAt: string | null;
  actualStart: string | null;
  actualEnd: string | null;
  actualHours: number | null;
  roundId: string | null;
  cancelReason: string | null;
  notes: string;
  createdAt: string;
}

/** A row of GET /stops. */
export interface StopListItem extends Stop {
  crewName: string | null;
  positionCount: number;
}

/** What a downtime event needs of a stop to link to it: a row of GET /stops, read in part. */
export type StopOption = Pick<StopListItem, 'id' | 'chainageM' | 'ringNumber' | 'status' | 'plannedStart' | 'actualStart'>;

/** GET /stops/:stopId and the answer of every change to a stop. */
export interface WorkPack {
  stop: Stop;
  positions: {
    positionId: string;
    number: number;
    positionClass: PositionClass;
    trackRadiusMm: number;
    discSizeIn: number;
    twinDisc: boolean;
    wearLimitMm: number;
    expectedWearMm: number | null;
    fittedSerial: string | null;
  }[];
  storeSerials: { cutterId: string; serial: string; discSizeIn: number; rebuildCount: number }[];
  shortages: { discSizeIn: number; needed: number; inStore: number }[];
  partsKit: { item: string; quantity: number; basis: string }[];
  crew: { id: string; name: string; members: { name: string; email: string }[] } | null;
  round: { id: string; startedAt: string; chainageM: number; ringNumber: number | null } | null;
  cautions: string[];
}

export type { Crew } from './crew';

export interface RoundOption {
  id: string;
  startedAt: string;
  chainageM: number;
  ringNumber: number | null;
  crew: string;
}
