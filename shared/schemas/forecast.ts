import { z } from 'zod';
import type { DiscCondition, PositionClass } from '../cutters';
import type { CautiousRate } from '../domain/cautious-rates';
import type { CercharClassification } from '../domain/cerchar';
import type { ChangeOutForecast, DriveRateEstimate, WearRateSet } from '../domain/forecast';
import type { ClassFactors, GroundWearRate, SuddenFailureRate } from '../domain/wear-fit';
import type { Wire } from './wire';

const factor = (label: string) =>
  z
    .number({ message: `${label} must be a number.` })
    .gt(0, `${label} must be more than 0.`)
    .max(5, `${label} must be at most 5.`);

export const forecastSettingsInputSchema = z.object({
  classFactors: z.object({
    centre: factor('The centre factor'),
    face: z.literal(1, { message: 'Face discs are the reference: their factor is 1.' }),
    gauge: factor('The gauge factor'),
  }),
  gehringSiteFactor: z
    .number()
    .gt(0, 'The site factor must be more than 0. To leave the prior out, set the prior weight to 0.')
    .max(10, 'The site factor must be at most 10.'),
  priorStrength: z
    .number()
    .min(0, 'The prior weight cannot be negative; 0 leaves the prior out.')
    .max(1000, 'The prior weight must be at most 1000 inspections.'),
  tipWidthMm: z.number().min(5, 'Tip width must be at least 5 mm.').max(40, 'Tip width must be at most 40 mm.'),
  overcutMarginMm: z.number().min(0).max(200),
  windowStrokes: z.number().int().min(5, 'Use at least 5 strokes.').max(2000),
  overrides: z
    .record(
      z.string(),
      z.object({
        penetrationMmPerRev: z.number().gt(0, 'Penetration must be more than 0 mm/rev.').max(50).optional(),
        advanceMPerDay: z.number().gt(0, 'Advance per day must be more than 0 m.').max(200).optional(),
      }),
    )
    .superRefine((overrides, ctx) => {
      // Keys are cutter position ids; the server also checks that they are this drive's positions.
      for (const key of Object.keys(overrides)) {
        if (key.trim() === '')
          ctx.addIssue({ code: 'custom', path: [key], message: 'An override has no cutter position; choose the position it is for.' });
        else if (!z.uuid().safeParse(key).success)
          ctx.addIssue({
            code: 'custom',
            path: [key],
            message: `"${key}" is not a cutter position of this drive; choose one from the list.`,
          });
      }
    }),
});
export type ForecastSettingsInput = z.infer<typeof forecastSettingsInputSchema>;

/** GET /forecast/settings and the answer of PUT: the settings in force (the defaults until a change is saved). */
export type ForecastSettingsView = ForecastSettingsInput;

export const forecastQuerySchema = z.object({ positionId: z.uuid().optional() });

export type Explanation = Wire<ChangeOutForecast['explanation']>;

/** One position of GET /forecast; `explanation` only for the position asked for with ?positionId=. */
export type PositionForecast = Wire<Omit<ChangeOutForecast, 'explanation'>> & {
  serial: string | null;
  /** Postgres timestamp text (e.g. "2026-11-30 08:23:23.601+00"), null when never measured. */
  lastMeasuredAt: string | null;
  explanation?: Explanation;
};

export interface Forecast {
  now: string;
  currentChainageM: number | null;
  currentRingNumber: number | null;
  problems: string[];
  rates: WearRateSet & { byGround: Record<string, CautiousRate>; relativeScatter: number | null };
  driveRates: DriveRateEstimate;
  positions: PositionForecast[];
}

export interface WearFitGround {
  id: string;
  name: string;
  cai: number | null;
  caiClass: CercharClassification | null;
  priorMmPerKm: number | null;
  rate: GroundWearRate | null;
  /** P50 and cautious P90 rates with where the P90 comes from; null when the ground has no rate. */
  cautious: CautiousRate | null;
}

export interface WearFitReport {
  grounds: WearFitGround[];
  residualSdMm: number | null;
  residualDof: number;
  /** Relative scatter of discs about the fit (cv of the cautious rates); null with too few inspections. */
  relativeScatter: number | null;
  classFactors: ClassFactors;
  observationCount: number;
  failures: (SuddenFailureRate & { groundName: string })[];
  abnormalEvents: { entryId: string; at: string; positionNumber: number; conditions: DiscCondition[]; chainageM: number }[];
  /** Inspections whose disc rolled in one ground only: the chart's points. */
  points: { groundTypeId: string; rolledKm: number; wearMm: number; positionClass: PositionClass }[];
  ringDiameterMm: number;
}
