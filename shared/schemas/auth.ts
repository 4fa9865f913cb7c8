import { z } from 'zod';
import { emailAddress } from './fields';
import type { ProjectRole } from '../roles';

/** An e-mail address; its length is checked before any other work (shared/schemas/fields.ts). */
export const emailSchema = emailAddress();

export const signInInputSchema = z.object({
  email: emailSchema,
  password: z.string({ message: 'Enter your password.' }).min(1, 'Enter your password.').max(200, 'A password has at most 200 characters.'),
});
export type SignInInput = z.infer<typeof signInInputSchema>;

export const passwordResetRequestSchema = z.object({ email: emailSchema });
export type PasswordResetRequest = z.infer<typeof passwordResetRequestSchema>;

export interface Me {
  user: { id: string; email: string; name: string; isAdmin: boolean };
  memberships: { projectId: string; projectName: string; role: ProjectRole }[];
}

/** POST /api/auth/sign-in and /api/auth/set-password (which signs in): who is now signed in. */
export interface SignedIn {
  user: Me['user'];
}

/** POST /api/auth/password-reset (202): the same words whether or not the address has an account. */
export interface ResetRequested {
  message: string;
}

/** GET /api/auth/notifications: one e-mail this person can get, and whether it is on. */
export interface NotificationChoice {
  kind: string;
  label: string;
  enabled: boolean;
}

/** PUT /api/auth/notifications: the choice as saved (also its request body). */
export type NotificationChoiceChange = Pick<NotificationChoice, 'kind' | 'enabled'>;
