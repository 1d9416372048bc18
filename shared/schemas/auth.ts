/**
 * Request bodies of the sign-in endpoints, shared by the client's forms and the server's `validate()`.
 * The password policy lives here once so both sides refuse the same passwords with the same words.
 */
import { z } from 'zod';
import { sportFocusSchema } from './club';

export const PASSWORD_MIN_LENGTH = 10;
export const PASSWORD_MAX_LENGTH = 200;

/**
 * Why a password is too weak, or `null` when it is acceptable.
 * Rules: at least PASSWORD_MIN_LENGTH characters, at least two kinds of character
 * (lower case, upper case, digits, other), and not the e-mail address itself.
 */
export function passwordProblem(password: string, email?: string): string | null {
  if (password.length < PASSWORD_MIN_LENGTH) {
    return `Use at least ${PASSWORD_MIN_LENGTH} characters; a short phrase of a few words works well.`;
  }
  if (password.length > PASSWORD_MAX_LENGTH) return `Use at most ${PASSWORD_MAX_LENGTH} characters.`;
  const kinds = [/[a-z]/, /[A-Z]/, /[0-9]/, /[^a-zA-Z0-9]/].filter((re) => re.test(password)).length;
  if (kinds < 2) {
    return 'Mix at least two kinds of character (letters and digits, or add a space or a symbol).';
  }
  if (email && password.trim().toLowerCase() === email.trim().toLowerCase()) {
    return 'Do not use your e-mail address as the password; choose something others cannot guess.';
  }
  return null;
}

export const emailSchema = z
  .string({ error: 'Enter your e-mail address.' })
  .trim()
  .toLowerCase()
  .max(254, { error: 'An e-mail address has at most 254 characters.' })
  .pipe(z.email({ error: 'Enter an e-mail address such as name@club.example.' }));

export const displayNameSchema = z
  .string({ error: 'Enter your name as teammates know it.' })
  .trim()
  .min(1, { error: 'Enter your name as teammates know it.' })
  .max(80, { error: 'Keep the name to 80 characters or fewer.' });

export const clubNameSchema = z
  .string({ error: 'Enter the name of your club or team.' })
  .trim()
  .min(2, { error: 'Enter the name of your club or team (at least 2 characters).' })
  .max(120, { error: 'Keep the club name to 120 characters or fewer.' });

export const signUpSchema = z
  .object({
    email: emailSchema,
    password: z.string({ error: 'Choose a password.' }),
    displayName: displayNameSchema,
    clubName: clubNameSchema,
    sportFocus: sportFocusSchema.optional(),
  })
  .superRefine((body, ctx) => {
    const problem = passwordProblem(body.password, body.email);
    if (problem) ctx.addIssue({ code: 'custom', path: ['password'], message: problem });
  });
export type SignUpBody = z.infer<typeof signUpSchema>;

export const signInSchema = z.object({
  email: emailSchema,
  password: z
    .string({ error: 'Enter your password.' })
    .min(1, { error: 'Enter your password.' })
    .max(PASSWORD_MAX_LENGTH, { error: `A password has at most ${PASSWORD_MAX_LENGTH} characters.` }),
});
export type SignInBody = z.infer<typeof signInSchema>;
