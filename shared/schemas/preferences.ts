/**
 * A user's mail preferences (GET/PATCH /api/me/preferences), the "send me a digest now" answer
 * (POST /api/me/digest) and the unsubscribe link's answers (GET/POST /api/unsubscribe/:token).
 * Used by the preferences screen (zodResolver) and by the server (validate).
 */
import { z } from 'zod';
import { timeZoneSchema } from './setup';

export const DIGEST_FREQUENCIES = ['daily', 'weekly', 'off'] as const;
export type DigestFrequency = (typeof DIGEST_FREQUENCIES)[number];
export const DIGEST_FREQUENCY_LABELS: Record<DigestFrequency, string> = {
  daily: 'Every day',
  weekly: 'Once a week',
  off: 'Off',
};

/** ISO weekdays: 1 Monday … 7 Sunday. */
export const WEEKDAYS = [1, 2, 3, 4, 5, 6, 7] as const;
export const WEEKDAY_LABELS: Record<number, string> = {
  1: 'Monday',
  2: 'Tuesday',
  3: 'Wednesday',
  4: 'Thursday',
  5: 'Friday',
  6: 'Saturday',
  7: 'Sunday',
};

/** Defaults (see docs/api-digests.md): GC managers and subcontractors get a daily digest at 07:00; inspectors none. */
export const DEFAULT_DIGEST_HOUR = 7;
export const DEFAULT_DIGEST_WEEKDAY = 1;

export interface PreferencesDto {
  digestFrequency: DigestFrequency;
  /** 1 Monday … 7 Sunday; used when the digest is weekly. */
  digestWeekday: number;
  /** Local hour 0–23 in `timeZone`. */
  digestHour: number;
  /** The time zone the hour is read in: the one chosen, or the user's first job's. */
  timeZone: string;
  /** True when no time zone was chosen and `timeZone` is the first job's. */
  timeZoneIsDefault: boolean;
  /** Mail at once when a critical finding is assigned to the user's company (subcontractors). */
  criticalAssignmentMail: boolean;
  /** True while nothing was ever changed (the role's defaults apply). */
  isDefault: boolean;
  /** Where caught mails can be read in development (the local fake SMTP server); null in production. */
  mailboxPath: string | null;
  version: number;
}

const hourSchema = z.coerce
  .number({ error: 'Choose an hour from 0 to 23.' })
  .int('Choose a whole hour from 0 to 23.')
  .min(0, 'Choose an hour from 0 to 23.')
  .max(23, 'Choose an hour from 0 to 23.');

const weekdaySchema = z.coerce
  .number({ error: 'Choose a day of the week.' })
  .int('Choose a day of the week.')
  .min(1, 'Choose a day of the week.')
  .max(7, 'Choose a day of the week.');

/** PATCH /api/me/preferences (If-Match): any subset; timeZone null = back to the first job's. */
export const preferencesPatchSchema = z
  .object({
    digestFrequency: z.enum(DIGEST_FREQUENCIES, { error: 'Choose every day, once a week or off.' }).optional(),
    digestWeekday: weekdaySchema.optional(),
    digestHour: hourSchema.optional(),
    timeZone: timeZoneSchema.nullable().optional(),
    criticalAssignmentMail: z.boolean({ error: 'Choose on or off.' }).optional(),
  })
  .strict()
  .refine((v) => Object.keys(v).length > 0, { message: 'Send at least one preference to change.', path: ['body'] });
export type PreferencesPatch = z.infer<typeof preferencesPatchSchema>;

/** The preferences form (all fields; the screen sends them all). */
export const preferencesFormSchema = z
  .object({
    digestFrequency: z.enum(DIGEST_FREQUENCIES, { error: 'Choose every day, once a week or off.' }),
    digestWeekday: weekdaySchema,
    digestHour: hourSchema,
    timeZone: timeZoneSchema,
    criticalAssignmentMail: z.boolean(),
  })
  .strict();
export type PreferencesForm = z.infer<typeof preferencesFormSchema>;

/** POST /api/me/digest (Idempotency-Key): no body. */
export const digestNowSchema = z.object({}).strict();

export interface DigestNowResponse {
  /** The mail is handed to the outbox once the request commits (202). */
  queued: true;
  /** Recipient address (the signed-in user's own). */
  to: string;
  subject: string;
  /** How many unresolved findings the digest lists (subcontractor) or counts (GC manager). */
  findings: number;
  mailboxPath: string | null;
}

/** What an unsubscribe link turns off. */
export const UNSUBSCRIBE_LISTS = ['digest', 'critical'] as const;
export type UnsubscribeList = (typeof UNSUBSCRIBE_LISTS)[number];

/** A signed unsubscribe token: base64url payload "." base64url HMAC. */
export const unsubscribeParamsSchema = z
  .object({
    token: z
      .string()
      .max(400, 'This link is not complete. Copy the whole link from the mail.')
      .regex(/^[A-Za-z0-9_-]{10,300}\.[A-Za-z0-9_-]{43}$/, 'This link is not complete. Copy the whole link from the mail.'),
  })
  .strict();

/** POST /api/unsubscribe/:token: empty, JSON {}, or RFC 8058's form body List-Unsubscribe=One-Click. */
export const unsubscribeBodySchema = z.object({ 'List-Unsubscribe': z.literal('One-Click').optional() }).strict();

export interface UnsubscribePreview {
  list: UnsubscribeList;
  /** What the link turns off, in words. */
  description: string;
  /** The address, partly hidden (no session is needed to read this). */
  address: string;
  /** True when it is already off. */
  alreadyOff: boolean;
  /** The link's expiry (ISO date-time). */
  expiresAt: string;
}

export interface UnsubscribeResult extends UnsubscribePreview {
  /** True after the POST: it is off now. */
  done: true;
}
