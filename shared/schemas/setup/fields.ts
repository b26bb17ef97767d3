/**
 * Zod building blocks of the set-up schemas. Not re-exported by shared/schemas/setup.ts: only the
 * schemas built from them are.
 */
import { z } from 'zod';
import { LIST_LIMIT_MAX } from './common';

export const id = (label = 'id') => z.string({ error: `Choose a ${label}.` }).uuid(`Not a valid ${label}.`);

export const text = (label: string, max: number) =>
  z
    .string({ error: `Enter ${label}.` })
    .trim()
    .min(1, `Enter ${label}.`)
    .max(max, `${label[0]!.toUpperCase()}${label.slice(1)} is at most ${max} characters.`);

export const optionalText = (label: string, max: number) =>
  z
    .string({ error: `${label} must be text.` })
    .trim()
    .max(max, `${label} is at most ${max} characters.`)
    .transform((s) => (s === '' ? null : s))
    .nullable()
    .optional();

export const dateOnly = z
  .string({ error: 'Enter a date (YYYY-MM-DD).' })
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Enter a date as YYYY-MM-DD.')
  .refine((s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)) && new Date(`${s}T00:00:00Z`).toISOString().startsWith(s), 'Not a real date.');

/** Query-string limit (1..200) and opaque cursor, shared by every list route. */
export const pageQuery = {
  limit: z.coerce
    .number({ error: 'limit: a whole number from 1 to 200.' })
    .int('limit: a whole number from 1 to 200.')
    .min(1, 'limit: a whole number from 1 to 200.')
    .max(LIST_LIMIT_MAX, `limit: at most ${LIST_LIMIT_MAX}.`)
    .optional(),
  /** Opaque; the server checks it whole (length, signature, types) and answers 400 invalid_cursor. */
  cursor: z.string().optional(),
};
export const booleanQuery = z.enum(['true', 'false'], { error: 'Use true or false.' }).transform((v) => v === 'true');
