import { z } from 'zod';
import { requiredLine } from './fields';
import { projectRoles } from '../roles';
import { emailSchema } from './auth';

export const projectRoleSchema = z.enum(projectRoles, { message: 'Choose a role: fitter, planner, buyer or site manager.' });

export const inviteUserInputSchema = z.object({
  email: emailSchema,
  name: requiredLine('The name', 120, 'Enter the person’s name.'),
  isAdmin: z.boolean().default(false),
  memberships: z.array(z.object({ projectId: z.uuid({ message: 'Choose a project.' }), role: projectRoleSchema })).default([]),
});
export type InviteUserInput = z.infer<typeof inviteUserInputSchema>;

export const updateUserInputSchema = z
  .object({
    name: requiredLine('The name', 120, 'Enter the person’s name.'),
    isAdmin: z.boolean(),
    active: z.boolean(),
  })
  .partial()
  .refine((v) => Object.keys(v).length > 0, 'Nothing to change: send name, isAdmin or active.');
export type UpdateUserInput = z.infer<typeof updateUserInputSchema>;

export const membershipInputSchema = z.object({ role: projectRoleSchema });
export type MembershipInput = z.infer<typeof membershipInputSchema>;
