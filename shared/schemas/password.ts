/**
 * New-password rules, apart from the sign-in schemas so the sign-in screen does not load the
 * common-password list (only the screens that set a password do).
 */
import { z } from 'zod';
import { isCommonPassword } from '../common-passwords';

/**
 * A new password: at least 12 characters and not one of the 10,000 most common passwords (OWASP
 * ASVS 5.0 §6.2). The same rule in the client's forms and on the server.
 */
export const newPasswordSchema = z
  .string({ message: 'Enter a password.' })
  .min(12, 'Use at least 12 characters for the password.')
  .max(200, 'Use at most 200 characters for the password.')
  .refine(
    (p) => !isCommonPassword(p),
    'That password is one of the most commonly used ones, which are tried first by anyone guessing. Choose another.',
  );

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
