import { z } from 'zod';
import { chainageM, freeText, singleLine } from './fields';
import type { ProjectRole } from '../roles';

const isTimeZone = (tz: string) => {
  try {
    new Intl.DateTimeFormat('en', { timeZone: tz });
    return true;
  } catch {
    return false;
  }
};

export const driveDirections = ['increasing', 'decreasing'] as const;

export const projectInputSchema = z.object({
  name: singleLine('The drive name', 120, 'Give the drive a name of at least 2 characters.').refine(
    (s) => s.length >= 2,
    'Give the drive a name of at least 2 characters.',
  ),
  machineDescription: freeText('The machine description', 500).default(''),
  excavatedDiameterM: z.coerce
    .number({ message: 'Enter the excavated diameter in metres.' })
    .min(1, 'The excavated diameter must be at least 1 m.')
    .max(20, 'The excavated diameter must be at most 20 m.'),
  startChainageM: z.coerce
    .number({ message: 'Enter the start chainage in metres.' })
    .pipe(chainageM('The start chainage', 'Enter the start chainage in metres.')),
  driveDirection: z.enum(driveDirections, { message: 'Choose whether chainage increases or decreases as the machine advances.' }),
  siteTimeZone: z
    .string({ message: 'Choose a time zone from the list, like Europe/Zurich.' })
    .max(64, 'Choose a time zone from the list, like Europe/Zurich.')
    .refine(isTimeZone, 'Choose a time zone from the list, like Europe/Zurich.'),
  ringLengthM: z.coerce
    .number({ message: 'Enter the ring length in metres.' })
    .min(0.3, 'The ring length must be at least 0.3 m.')
    .max(5, 'The ring length must be at most 5 m.')
    .default(1.5),
  compressedAirAboveHeadM: z.coerce
    .number({ message: 'Enter the water head above which stops need compressed air, in metres.' })
    .min(0, 'The head cannot be negative.')
    .max(300)
    .default(30),
  units: z.literal('metric', { message: 'Only metric units are supported.' }).default('metric'),
});
export type ProjectInput = z.infer<typeof projectInputSchema>;

export const projectPatchSchema = projectInputSchema.partial();
export type ProjectPatch = z.infer<typeof projectPatchSchema>;

export interface Project {
  id: string;
  name: string;
  machineDescription: string;
  excavatedDiameterM: number;
  startChainageM: number;
  driveDirection: 'increasing' | 'decreasing';
  siteTimeZone: string;
  units: string;
  role: ProjectRole;
}
