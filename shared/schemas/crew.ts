import { z } from 'zod';
import { emailSchema } from './auth';

export const crewInputSchema = z.object({
  name: z.string().trim().min(1, 'Name the crew, like "Crew A".').max(80),
  members: z
    .array(z.object({ name: z.string().trim().min(1, 'Enter the crew member’s name.').max(120), email: emailSchema }))
    .max(60)
    .refine((m) => new Set(m.map((x) => x.email)).size === m.length, 'The same e-mail address is in the crew twice.'),
});
export type CrewInput = z.infer<typeof crewInputSchema>;
