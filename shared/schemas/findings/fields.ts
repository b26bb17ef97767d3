/**
 * Zod building blocks of the walk, check and finding schemas. Not re-exported by
 * shared/schemas/findings.ts: only the schemas built from them are.
 */
import { z } from 'zod';
import { FINDINGS_LIST_LIMIT_MAX, NOTE_MAX, MEASURED_TEXT_MAX, REASON_MAX } from './common';

export const id = (label = 'id') => z.string({ error: `Choose a ${label}.` }).uuid(`Not a valid ${label}.`);

export const pageQuery = {
  limit: z.coerce
    .number({ error: `A whole number from 1 to ${FINDINGS_LIST_LIMIT_MAX}.` })
    .int(`A whole number from 1 to ${FINDINGS_LIST_LIMIT_MAX}.`)
    .min(1, `A whole number from 1 to ${FINDINGS_LIST_LIMIT_MAX}.`)
    .max(FINDINGS_LIST_LIMIT_MAX, `At most ${FINDINGS_LIST_LIMIT_MAX}.`)
    .optional(),
  /** Opaque; the server checks it whole (length, signature, types) and answers 400 invalid_cursor. */
  cursor: z.string().optional(),
};

export const booleanQuery = z.enum(['true', 'false'], { error: 'Use true or false.' }).transform((v) => v === 'true');

/** A comma-separated list of enum values in a query string: `status=open,fix_submitted`. */
export function enumList<T extends readonly [string, ...string[]]>(values: T) {
  return z
    .string()
    .max(200, 'Too long.')
    .transform((s, ctx) => {
      const parts = s
        .split(',')
        .map((p) => p.trim())
        .filter((p) => p !== '');
      const bad = parts.find((p) => !(values as readonly string[]).includes(p));
      if (bad !== undefined || parts.length === 0) {
        ctx.addIssue({ code: 'custom', message: `Use one or more of ${values.join(', ')}, separated by commas.` });
        return z.NEVER;
      }
      return [...new Set(parts)] as T[number][];
    });
}

export const dateOnly = z
  .string({ error: 'Enter a date (YYYY-MM-DD).' })
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Enter a date as YYYY-MM-DD.')
  .refine(
    (s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)) && new Date(`${s}T00:00:00Z`).toISOString().startsWith(s),
    'Not a real date.',
  );

export const measuredText = z
  .string({ error: 'Type the measured value with its unit (e.g. 34 in).' })
  .trim()
  .min(1, 'Type the measured value with its unit (e.g. 34 in).')
  .max(MEASURED_TEXT_MAX, `A measured value is at most ${MEASURED_TEXT_MAX} characters.`);

export const note = z
  .string({ error: 'The note must be text.' })
  .trim()
  .max(NOTE_MAX, `The note is at most ${NOTE_MAX} characters.`);

/** A plan pin: a fraction of the plan image's width / height, 0..1. */
export const pin = () =>
  z
    .number({ error: 'A number from 0 to 1.' })
    .min(0, 'From 0 to 1.')
    .max(1, 'From 0 to 1.');

export const reason = (what = 'a reason') =>
  z
    .string({ error: `Give ${what}.` })
    .trim()
    .min(1, `Give ${what}.`)
    .max(REASON_MAX, `The reason is at most ${REASON_MAX} characters.`);

export const optionalReason = z.string({ error: 'The reason must be text.' }).trim().max(REASON_MAX, `The reason is at most ${REASON_MAX} characters.`).optional();
