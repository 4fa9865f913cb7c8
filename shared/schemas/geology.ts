import { z } from 'zod';
import { calendarDate, chainageM, freeText, requiredLine, wholeNumberText } from './fields';
import type { CercharClassification } from '../domain/cerchar';
import type { GeologyGapWarning } from '../domain/geology';

const optionalNumber = (label: string, min: number, max: number) =>
  z
    .number({ message: `${label} must be a number.` })
    .min(min, `${label} must be at least ${min}.`)
    .max(max, `${label} must be at most ${max}.`)
    .nullable()
    .default(null);

export const groundTypeInputSchema = z.object({
  name: requiredLine('The ground type name', 80, 'Name the ground type.'),
  description: freeText('The description', 500).default(''),
  ucsMpa: optionalNumber('UCS (MPa)', 0, 500),
  cai: optionalNumber('CAI', 0, 7),
  quartzPct: optionalNumber('Quartz content (%)', 0, 100),
  notes: freeText('The notes', 2000).default(''),
});
export type GroundTypeInput = z.infer<typeof groundTypeInputSchema>;

export const sectionInputSchema = z
  .object({
    chainageFromM: chainageM('Chainage from'),
    chainageToM: chainageM('Chainage to'),
    groundTypeId: z.uuid({ message: 'Choose the ground type.' }),
    waterHeadM: z.number().min(0, 'The water head above the axis cannot be negative.').max(500).default(0),
    stopAllowed: z.boolean().default(true),
    stopReason: freeText('The stop reason', 300).default(''),
  })
  .refine((s) => s.chainageToM > s.chainageFromM, { path: ['chainageToM'], message: 'Chainage to must be greater than chainage from.' })
  .refine((s) => s.stopAllowed || s.stopReason !== '', {
    path: ['stopReason'],
    message: 'Say why no stop is allowed here (e.g. fault zone).',
  });
export type SectionInput = z.infer<typeof sectionInputSchema>;

export const longSectionInputSchema = z.object({ sections: z.array(sectionInputSchema).max(2000) });

export const strokeListQuerySchema = z.object({
  page: wholeNumberText('The page').pipe(z.number().min(1, 'The page must be at least 1.')).default(1),
  pageSize: z.coerce.number().int().min(10).max(500).default(50),
  sort: z
    .enum(['ringNumber', 'startTime', 'chainageStartM', 'penetrationMmPerRev', 'revolutions', 'thrustKn', 'torqueKnm', 'rpm'])
    .default('ringNumber'),
  dir: z.enum(['asc', 'desc']).default('desc'),
  ringFrom: wholeNumberText('ringFrom').optional(),
  ringTo: wholeNumberText('ringTo').optional(),
  from: calendarDate('from', 'from must be a date like 2026-11-01.').optional(),
  to: calendarDate('to').optional(),
});
export type StrokeListQuery = z.infer<typeof strokeListQuerySchema>;

export interface GroundType {
  id: string;
  name: string;
  description: string;
  ucsMpa: number | null;
  cai: number | null;
  caiClass: CercharClassification | null;
  quartzPct: number | null;
  notes: string;
}

export interface GeologySection extends SectionInput {
  id: string;
}

export interface Geology {
  sections: GeologySection[];
  warnings: GeologyGapWarning[];
  currentChainageM: number | null;
}

/** PUT /geology: how many sections were saved, and the gaps and overlaps left to look at. */
export interface LongSectionSaved {
  saved: number;
  warnings: GeologyGapWarning[];
}
