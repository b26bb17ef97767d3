/**
 * Zod building blocks every resource's schemas use: ids, calendar dates, true/false query values
 * and a list page's limit and cursor. One definition, so every route words the same mistake the
 * same way. Not re-exported by the barrels: only the schemas built from them are.
 */
import { z } from 'zod';

/** The most rows one list page holds, on every list. */
export const LIST_LIMIT_MAX = 200;

export const id = (label = 'id') => z.string({ error: `Choose a ${label}.` }).uuid(`Not a valid ${label}.`);

export const dateOnly = z
  .string({ error: 'Enter a date (YYYY-MM-DD).' })
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Enter a date as YYYY-MM-DD.')
  .refine((s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)) && new Date(`${s}T00:00:00Z`).toISOString().startsWith(s), 'Not a real date.');

export const booleanQuery = z.enum(['true', 'false'], { error: 'Use true or false.' }).transform((v) => v === 'true');

/** Query-string limit (1..LIST_LIMIT_MAX) and opaque cursor, shared by every list route. */
export const pageQuery = {
  limit: z.coerce
    .number({ error: `A whole number from 1 to ${LIST_LIMIT_MAX}.` })
    .int(`A whole number from 1 to ${LIST_LIMIT_MAX}.`)
    .min(1, `A whole number from 1 to ${LIST_LIMIT_MAX}.`)
    .max(LIST_LIMIT_MAX, `At most ${LIST_LIMIT_MAX}.`)
    .optional(),
  /** Opaque; the server checks it whole (length, signature, types) and answers 400 invalid_cursor. */
  cursor: z.string().optional(),
};

/** A point on a level's plan: a fraction of the plan image's width or height, 0..1. */
export const planFraction = () => z.number({ error: 'A number from 0 to 1.' }).min(0, 'From 0 to 1.').max(1, 'From 0 to 1.');
