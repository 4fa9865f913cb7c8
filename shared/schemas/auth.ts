import { z } from 'zod';
import type { ProjectRole } from '../roles';

export const emailSchema = z
  .string({ message: 'Enter an e-mail address.' })
  .trim()
  .toLowerCase()
  .pipe(z.email({ message: 'Enter a valid e-mail address, like name@example.com.' }));

export const newPasswordSchema = z
  .string({ message: 'Enter a password.' })
  .min(12, 'Use at least 12 characters for the password.')
  .max(200, 'Use at most 200 characters for the password.');

export const signInInputSchema = z.object({
  email: emailSchema,
  password: z.string({ message: 'Enter your password.' }).min(1, 'Enter your password.').max(200),
});
export type SignInInput = z.infer<typeof signInInputSchema>;

export const passwordResetRequestSchema = z.object({ email: emailSchema });
export type PasswordResetRequest = z.infer<typeof passwordResetRequestSchema>;

/** Used by both the password-reset link and the invitation link. */
export const setPasswordInputSchema = z.object({
  token: z.string().min(20, 'This link is not complete. Open the link from the e-mail again.').max(200),
  password: newPasswordSchema,
});
export type SetPasswordInput = z.infer<typeof setPasswordInputSchema>;

export const changePasswordInputSchema = z.object({
  currentPassword: z.string().min(1, 'Enter your current password.').max(200),
  newPassword: newPasswordSchema,
});
export type ChangePasswordInput = z.infer<typeof changePasswordInputSchema>;

export interface Me {
  user: { id: string; email: string; name: string; isAdmin: boolean };
  memberships: { projectId: string; projectName: string; role: ProjectRole }[];
}
