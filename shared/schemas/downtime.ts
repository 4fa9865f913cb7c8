import { z } from 'zod';
import { calendarDate, freeText, instant, requiredLine, wholeNumber } from './fields';
import type { CutterCostRow } from '../domain/cutter-cost';

/** Label of downtime whose cause is still to give (events proposed from gaps in the advance log). */
export const NO_CAUSE_LABEL = 'No cause given';

const causeName = requiredLine('The cause name', 80, 'Name the cause.');

export const downtimeCauseInputSchema = z.object({
  name: causeName,
  /** Time spent inspecting or changing disc cutters (counts in the cutter-work share and the labour cost). */
  cutterWork: z.boolean().default(false),
});
export type DowntimeCauseInput = z.infer<typeof downtimeCauseInputSchema>;

/** Rename, (un)flag as cutter work, reorder, deactivate or reactivate a cause; causes are never deleted. */
export const downtimeCauseUpdateSchema = z
  .object({
    name: causeName.optional(),
    cutterWork: z.boolean().optional(),
    active: z.boolean().optional(),
    sortOrder: wholeNumber('The sort order', 1000).optional(),
  })
  .refine((u) => Object.keys(u).length > 0, 'Say what to change.');
export type DowntimeCauseUpdate = z.infer<typeof downtimeCauseUpdateSchema>;

export const downtimeEventInputSchema = z
  .object({
    startAt: instant('The start'),
    endAt: instant('The end'),
    causeId: z.uuid({ message: 'Choose a cause from the list.' }).nullable().default(null),
    note: freeText('The note', 2000).default(''),
    stopId: z.uuid({ message: 'Choose the stop from the list.' }).nullable().default(null),
  })
  .refine((e) => Date.parse(e.endAt) > Date.parse(e.startAt), { path: ['endAt'], message: 'The end must be after the start.' });
export type DowntimeEventInput = z.infer<typeof downtimeEventInputSchema>;

const hhmm = /^([01]\d|2[0-3]):[0-5]\d$/;

export const siteSettingsInputSchema = z.object({
  /** Shift starts in site-local time; each shift runs until the next one starts. */
  shifts: z
    .array(
      z.object({
        name: requiredLine('The shift name', 40, 'Name the shift.'),
        start: z.string().regex(hhmm, 'A shift start is a time like 06:00.'),
      }),
    )
    .min(1, 'Give at least one shift.')
    .max(6, 'At most 6 shifts a day.')
    .refine((s) => new Set(s.map((x) => x.name)).size === s.length, 'Two shifts have the same name.')
    .refine((s) => new Set(s.map((x) => x.start)).size === s.length, 'Two shifts start at the same time.'),
  /** Cost of one hour of cutter work by the crew, in the drive's currency. */
  labourRatePerHour: z.number({ message: 'The labour rate must be a number.' }).min(0, 'The labour rate cannot be negative.').max(100_000),
  /** Standstills between strokes longer than this are proposed as downtime. */
  gapMinutes: z
    .number({ message: 'The gap must be a number of minutes.' })
    .int('Whole minutes only.')
    .min(5, 'At least 5 minutes.')
    .max(1440, 'At most 1440 minutes (a day).'),
});
export type SiteSettingsInput = z.infer<typeof siteSettingsInputSchema>;

const day = (label: string) => calendarDate(label);

/** A period of the site's calendar days, both included; the server picks the last 8 ISO weeks of data when left out. */
export const downtimePeriodQuerySchema = z
  .object({ from: day('from').optional(), to: day('to').optional() })
  .refine((q) => !q.from || !q.to || q.from <= q.to, { path: ['to'], message: 'to must not be before from.' });
/** A period as the client asks for it (query text of /report and /cost). */
export type PeriodQuery = z.input<typeof downtimePeriodQuerySchema>;

export const reportQuerySchema = downtimePeriodQuerySchema.and(
  z.object({
    format: z.enum(['json', 'csv']).default('json'),
    /** Which table the CSV holds. */
    table: z.enum(['week', 'shift', 'pareto']).default('week'),
  }),
);

export const costQuerySchema = downtimePeriodQuerySchema.and(
  z.object({
    format: z.enum(['json', 'csv']).default('json'),
    table: z.enum(['week', 'ground']).default('week'),
  }),
);

export const eventListQuerySchema = downtimePeriodQuerySchema.and(
  z.object({
    causeId: z.uuid({ message: 'Unknown cause.' }).optional(),
    /** Only events whose cause is still to give. */
    unexplained: z
      .enum(['true', 'false'])
      .optional()
      .transform((v) => v === 'true'),
    format: z.enum(['json', 'csv']).default('json'),
  }),
);
export type EventListQuery = z.input<typeof eventListQuerySchema>;

// The API's answers (the server builds them, the client reads them).

export interface DowntimeCause {
  id: string;
  name: string;
  cutterWork: boolean;
  sortOrder: number;
  active: boolean;
}

export interface SiteSettings extends SiteSettingsInput {
  /** false while the drive still runs on the defaults. */
  saved: boolean;
}

export interface DowntimeEventRow {
  id: string;
  startAt: string;
  endAt: string;
  hours: number;
  causeId: string | null;
  causeName: string | null;
  cutterWork: boolean;
  note: string;
  stopId: string | null;
  /** Chainage of the linked stop, m. */
  stopChainageM: number | null;
  /** 'manual' or 'gap' (proposed from the advance log). */
  source: string;
}

/** Events of a period (the last eight ISO weeks with data unless asked otherwise), in start order. */
export interface DowntimeEventList {
  from: string;
  to: string;
  timeZone: string;
  events: DowntimeEventRow[];
}

export interface ProposeFromGapsResult {
  created: number;
  hours: number;
  gapMinutes: number;
}

/** The period a report covers: site calendar days (both included) and the instants they span. */
export interface ReportPeriod {
  from: string;
  to: string;
  timeZone: string;
  startAt: string;
  endAt: string;
  /** Real elapsed hours (a day with a daylight-saving change has 23 or 25). */
  hours: number;
}

export interface CauseHoursRow {
  cause: string;
  cutterWork: boolean;
  hours: number;
}

export interface DowntimeReport extends ReportPeriod {
  /** Every ISO week touching the period, in order, and the shift names of the pattern. */
  weeks: string[];
  shifts: string[];
  byWeek: (CauseHoursRow & { isoWeek: string })[];
  byShift: (CauseHoursRow & { shift: string })[];
  /** Causes by hours, largest first, with their share and the running (cumulative) share, 0–1. */
  pareto: (CauseHoursRow & { share: number; cumulativeShare: number })[];
  downtimeHours: number;
  unexplainedHours: number;
  unexplainedEvents: number;
  boringHours: number;
  /** Boring time / calendar time, 0–1. */
  utilisation: number;
  /** Share of downtime hours that is cutter work, 0–1. */
  cutterWorkShare: number;
  advanceM: number;
  metresPerDay: number;
}

export interface CutterCostReport extends ReportPeriod {
  diameterM: number;
  faceAreaM2: number;
  labourRatePerHour: number;
  /** Currency of the parts catalogue; null when no part is priced. */
  currency: string | null;
  /** How parts are found for workshop outcomes (shown beside the table). */
  partsRule: string;
  /** Parts a rebuild or scrap needed for which the catalogue has no entry: not costed. */
  unpricedParts: number;
  byWeek: CutterCostRow[];
  byGround: CutterCostRow[];
  total: CutterCostRow;
}
