import { z } from 'zod';

export const emailSchema = z
  .string({ message: 'Enter an e-mail address.' })
  .trim()
  .toLowerCase()
  .pipe(z.email({ message: 'Enter a valid e-mail address, like name@example.com.' }));

export const signInInputSchema = z.object({
  email: emailSchema,
  password: z.string({ message: 'Enter your password.' }).min(1, 'Enter your password.').max(200),
});
export type SignInInput = z.infer<typeof signInInputSchema>;

export const passwordResetRequestSchema = z.object({ email: emailSchema });
export type PasswordResetRequest = z.infer<typeof passwordResetRequestSchema>;

