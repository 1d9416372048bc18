/** Request bodies of the password reset by e-mail. */
import { z } from 'zod';
import { emailSchema, passwordProblem } from './auth';

export const passwordResetRequestSchema = z.object({ email: emailSchema }).strict();
export type PasswordResetRequestBody = z.infer<typeof passwordResetRequestSchema>;

export const passwordResetSchema = z
  .object({ password: z.string({ error: 'Choose a new password.' }) })
  .strict()
  .superRefine((body, ctx) => {
    const problem = passwordProblem(body.password);
    if (problem) ctx.addIssue({ code: 'custom', path: ['password'], message: problem });
  });
export type PasswordResetBody = z.infer<typeof passwordResetSchema>;

/** The same answer whether or not the address has an account. */
export const PASSWORD_RESET_REQUESTED =
  'If an account uses this address, an e-mail with a link to choose a new password is on its way. The link works once, for one hour. Check the spam folder if it does not arrive within a few minutes.';
