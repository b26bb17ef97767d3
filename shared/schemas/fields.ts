/**
 * Zod building blocks every resource's schemas use: ids, calendar dates, true/false query values
 * and a list page's limit and cursor. One definition, so every route words the same mistake the
 * same way. Not re-exported by the barrels: only the schemas built from them are.
 */
import { z } from 'zod';
import './plainWords';

/** The most rows one list page holds, on every list. */
export const LIST_LIMIT_MAX = 200;

const article = (word: string) => (/^[aeio]/i.test(word) ? `an ${word}` : `a ${word}`);

/**
 * A record's id. In a body it comes from a list the form offers ("Choose a unit from the list.");
 * a label ending in " id" is a path or filter value, which comes from a link. `invalid` words a
 * mistake the person can act on better (a defect type may also be "Something else").
 */
export const id = (label = 'id', invalid?: string) => {
  const what = label === 'id' ? 'record' : label.replace(/ id$/, '');
  const fromLink = label.endsWith(' id');
  return z
    .string({ error: `Choose ${article(what)}.` })
    .uuid(invalid ?? (fromLink ? `This link does not name ${article(what)}: open the ${what} from its list.` : `Choose ${article(what)} from the list.`));
};

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

/**
 * The length limit of a text a person types (a note, a reason, a comment): the one number the
 * schema checks and the text box counts down to (components/ui TextField `limit`), and the words
 * said when the text is longer, in both places. `tooLong` takes the length typed (trimmed, as sent).
 */
export interface TextLimit {
  max: number;
  tooLong: (length: number) => string;
}

export function textLimit(max: number, subject: string): TextLimit {
  const n = (x: number) => x.toLocaleString('en-US');
  return { max, tooLong: (length) => `${subject} is at most ${n(max)} characters: shorten it by ${n(Math.max(length - max, 1))}.` };
}

/** The schema's check of a TextLimit, worded by the limit itself. */
export function limited<S extends z.ZodString>(schema: S, limit: TextLimit): S {
  return schema.max(limit.max, { error: (issue) => limit.tooLong(typeof issue.input === 'string' ? issue.input.length : limit.max + 1) }) as S;
}
