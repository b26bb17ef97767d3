import { z } from 'zod';
import './plainWords';
import { ROLES } from '../words';

/** OWASP ASVS 6.2: at least 8 characters (15 recommended), at least 64 allowed, no composition rules. */
export const PASSWORD_MIN = 8;
export const PASSWORD_MAX = 128;

/** An e-mail address; `whose` words the empty-field message ("your", "their"). */
export function emailFor(whose: 'your' | 'their') {
  return z
    .string({ error: `Enter ${whose} e-mail address.` })
    .trim()
    .min(1, `Enter ${whose} e-mail address.`)
    .max(254, 'That e-mail address is too long.')
    .email('Enter a valid e-mail address.');
}

export const emailSchema = emailFor('your');

export const signInSchema = z
  .object({
    email: emailSchema,
    password: z
      .string({ error: 'Enter your password.' })
      .min(1, 'Enter your password.')
      .max(PASSWORD_MAX, `Passwords are at most ${PASSWORD_MAX} characters.`),
  })
  .strict();
export type SignInInput = z.infer<typeof signInSchema>;

export const newPasswordSchema = z
  .string({ error: 'Choose a password.' })
  .min(PASSWORD_MIN, `Use at least ${PASSWORD_MIN} characters (15 or more is better).`)
  .max(PASSWORD_MAX, `Passwords are at most ${PASSWORD_MAX} characters.`);

export const roleSchema = z.enum(ROLES);

export interface SessionJob {
  id: string;
  name: string;
  number: string | null;
  address: string | null;
  role: z.infer<typeof roleSchema>;
}

export interface SessionUser {
  id: string;
  email: string;
  name: string;
  company: { id: string; name: string };
}

/** GET /api/session */
export interface SessionResponse {
  user: SessionUser | null;
  jobs: SessionJob[];
  /** Send back as the X-CSRF-Token header on every state-changing request. */
  csrfToken: string;
}
