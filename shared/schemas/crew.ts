import { z } from 'zod';
import { requiredLine } from './fields';
import { emailSchema } from './auth';

export const crewInputSchema = z.object({
  name: requiredLine('The crew name', 80, 'Name the crew, like "Crew A".'),
  members: z
    .array(z.object({ name: requiredLine('The crew member’s name', 120, 'Enter the crew member’s name.'), email: emailSchema }))
    .max(60)
    .refine((m) => new Set(m.map((x) => x.email)).size === m.length, 'The same e-mail address is in the crew twice.'),
});
export type CrewInput = z.infer<typeof crewInputSchema>;

/** GET /crews (a list) and PUT /crews/:crewId: a crew with its members. */
export interface Crew {
  id: string;
  name: string;
  members: { id: string; name: string; email: string }[];
}

/** POST /crews (201): the crew as saved; its members are read with GET /crews. */
export type CrewRow = Omit<Crew, 'members'>;
