import { z } from 'zod';

const factor = (label: string) => z.number({ message: `${label} must be a number.` }).gt(0, `${label} must be more than 0.`).max(5, `${label} must be at most 5.`);

export const forecastSettingsInputSchema = z.object({
  classFactors: z.object({ centre: factor('The centre factor'), face: z.literal(1, { message: 'Face discs are the reference: their factor is 1.' }), gauge: factor('The gauge factor') }),
  gehringSiteFactor: z.number().gt(0, 'The site factor must be more than 0. To leave the prior out, set the prior weight to 0.').max(10, 'The site factor must be at most 10.'),
  priorStrength: z.number().min(0, 'The prior weight cannot be negative; 0 leaves the prior out.').max(1000, 'The prior weight must be at most 1000 inspections.'),
  tipWidthMm: z.number().min(5, 'Tip width must be at least 5 mm.').max(40, 'Tip width must be at most 40 mm.'),
  overcutMarginMm: z.number().min(0).max(200),
  windowStrokes: z.number().int().min(5, 'Use at least 5 strokes.').max(2000),
  overrides: z.record(
    z.uuid(),
    z.object({
      penetrationMmPerRev: z.number().gt(0, 'Penetration must be more than 0 mm/rev.').max(50).optional(),
      advanceMPerDay: z.number().gt(0, 'Advance per day must be more than 0 m.').max(200).optional(),
    }),
  ),
});
export type ForecastSettingsInput = z.infer<typeof forecastSettingsInputSchema>;

export const forecastQuerySchema = z.object({ positionId: z.uuid().optional() });
