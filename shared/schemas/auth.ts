/**
 * Sign-up, e-mail confirmation, invitations and password reset: request schemas used by the
 * screens (zodResolver) and by the server (validate), and the response shapes.
 */
import { z } from 'zod';
import { ROLES, type Role } from '../words';
import { id } from './fields';
import { emailFor, emailSchema, newPasswordSchema } from './session';

export const personNameSchema = z
  .string({ error: 'Enter your name.' })
  .trim()
  .min(1, 'Enter your name.')
  .max(120, 'Names are at most 120 characters.');

export const companyNameSchema = z
  .string({ error: 'Enter your company name.' })
  .trim()
  .min(1, 'Enter your company name.')
  .max(120, 'Company names are at most 120 characters.');

/** POST /api/signup */
export const signUpSchema = z
  .object({ companyName: companyNameSchema, name: personNameSchema, email: emailSchema, password: newPasswordSchema })
  .strict();
export type SignUpInput = z.infer<typeof signUpSchema>;

/** A token from a mailed link: 32 random bytes, base64url. */
export const tokenParamsSchema = z
  .object({
    token: z.string().regex(/^[A-Za-z0-9_-]{43}$/, 'This link is not complete. Copy the whole link from the mail.'),
  })
  .strict();

/** POST /api/password-resets */
export const passwordResetRequestSchema = z.object({ email: emailSchema }).strict();
export type PasswordResetRequestInput = z.infer<typeof passwordResetRequestSchema>;

/** POST /api/password-resets/:token */
export const passwordResetSchema = z.object({ password: newPasswordSchema }).strict();
export type PasswordResetInput = z.infer<typeof passwordResetSchema>;

/** POST /api/jobs/:jobId/invitations */
export const invitationCreateSchema = z
  .object({
    email: emailFor('their'),
    name: z.string().trim().max(120, 'Names are at most 120 characters.').optional(),
    role: z.enum(ROLES, { error: 'Choose a role: GC manager, inspector or subcontractor.' }),
    companyId: z.string().uuid('Choose a company on this job.').optional(),
  })
  .strict()
  .refine((v) => v.role !== 'subcontractor' || v.companyId !== undefined, {
    path: ['companyId'],
    message: 'A subcontractor invitation needs the company they work for.',
  });
export type InvitationCreateInput = z.infer<typeof invitationCreateSchema>;

/** POST /jobs/:jobId/invitations/bulk: several people from a pasted list (e-mail, role, company); all or none. */
export const INVITATIONS_BULK_MAX = 50;
export const invitationBulkSchema = z
  .object({
    people: z
      .array(invitationCreateSchema, { error: 'Send the people as a list.' })
      .min(1, 'Paste at least one person.')
      .max(INVITATIONS_BULK_MAX, `At most ${INVITATIONS_BULK_MAX} people at once.`)
      .superRefine((people, ctx) => {
        for (const { index, message } of sameEmailTwice(people.map((p) => p.email))) ctx.addIssue({ code: 'custom', path: [index, 'email'], message });
      }),
  })
  .strict();

/**
 * An address on two lines (any case): the later line, with both line numbers. Also called by the
 * paste preview (shared/rules/pastedPeople.ts), which must say it while other lines are still wrong.
 */
export function sameEmailTwice(emails: readonly string[]): { index: number; message: string }[] {
  const seen = new Map<string, number>();
  const out: { index: number; message: string }[] = [];
  emails.forEach((email, i) => {
    const key = email.trim().toLowerCase();
    const first = seen.get(key);
    if (first !== undefined) out.push({ index: i, message: `${email} is on lines ${first + 1} and ${i + 1}.` });
    else if (key !== '') seen.set(key, i);
  });
  return out;
}
export type InvitationBulkInput = z.infer<typeof invitationBulkSchema>;

/** POST /invitations/:invitationId/resend takes no body: any key sent is refused. */
export const invitationResendSchema = z.object({}).strict();

export const invitationParamsSchema = z
  .object({ jobId: id('job id'), invitationId: id('invitation id') })
  .strict();

export const invitationListQuerySchema = z
  .object({
    limit: z.coerce.number().int('Use a whole number.').min(1, 'At least 1.').max(200, 'At most 200.').default(50),
    /** Opaque; the server checks it whole (length, signature, types) and answers 400 invalid_cursor. */
    cursor: z.string().optional(),
  })
  .strict();

/**
 * POST /api/invitations/:token. A new person chooses a name and password; someone who already
 * has an account signs in with their current password (an invitation never changes it).
 */
export const invitationAcceptSchema = z
  .object({
    name: z.string().trim().max(120, 'Names are at most 120 characters.').optional(),
    password: z.string({ error: 'Enter a password.' }).min(1, 'Enter a password.').max(128, 'Passwords are at most 128 characters.'),
  })
  .strict();
export type InvitationAcceptInput = z.infer<typeof invitationAcceptSchema>;

/** Client form for a new person accepting an invitation (the server applies the same rules). */
export const invitationNewAccountSchema = z.object({ name: personNameSchema, password: newPasswordSchema }).strict();
export type InvitationNewAccountInput = z.infer<typeof invitationNewAccountSchema>;

/** 202 answer of sign-up and password-reset requests: the same whatever the address. */
export interface AcceptedResponse {
  message: string;
}

export interface Invitation {
  id: string;
  email: string;
  name: string | null;
  role: Role;
  company: { id: string; name: string };
  invitedBy: { id: string; name: string } | null;
  createdAt: string;
  expiresAt: string;
}

export interface InvitationList {
  items: Invitation[];
  nextCursor: string | null;
}

/** GET /api/invitations/:token: what the invited person is shown before accepting. */
export interface InvitationPreview {
  email: string;
  name: string | null;
  role: Role;
  job: { id: string; name: string };
  company: { name: string };
  invitedBy: string | null;
  /** True when the address already has an account: then its current password is asked for. */
  existingAccount: boolean;
  expiresAt: string;
}

/** GET /api/password-resets/:token */
export interface PasswordResetPreview {
  valid: true;
  expiresAt: string;
}

/** GET /api/dev/mail (development only): one mail caught by the local fake SMTP server. */
export interface CaughtMailDto {
  id: number;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  links: string[];
}

/** The invite form on the members screen: companyId '' means "my own company" (not for subcontractors). */
export const invitationFormSchema = z
  .object({
    email: emailFor('their'),
    name: z.string().trim().max(120, 'Names are at most 120 characters.'),
    role: z.enum(ROLES, { error: 'Choose a role.' }),
    companyId: z.string(),
  })
  .strict()
  .refine((v) => v.role !== 'subcontractor' || v.companyId !== '', {
    path: ['companyId'],
    message: 'A subcontractor invitation needs the company they work for.',
  });
export type InvitationFormInput = z.infer<typeof invitationFormSchema>;
