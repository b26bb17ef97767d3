/**
 * Zod building blocks of the walk, check and finding schemas. Not re-exported by
 * shared/schemas/findings.ts: only the schemas built from them are.
 */
import { z } from 'zod';
import { limited, planFraction } from '../fields';
import { MEASURED_TEXT_MAX, NOTE_LIMIT, REASON_LIMIT } from './common';

export { booleanQuery, dateOnly, id, pageQuery } from '../fields';

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

export const measuredText = z
  .string({ error: 'Type the measured value with its unit (e.g. 34 in).' })
  .trim()
  .min(1, 'Type the measured value with its unit (e.g. 34 in).')
  .max(MEASURED_TEXT_MAX, `A measured value is at most ${MEASURED_TEXT_MAX} characters.`);

export const note = limited(z.string({ error: 'Type the note as text.' }).trim(), NOTE_LIMIT);

/** A plan pin: a fraction of the plan image's width / height, 0..1. */
export const pin = planFraction;

export const reason = (what = 'a reason') =>
  limited(z.string({ error: `Give ${what}.` }).trim().min(1, `Give ${what}.`), REASON_LIMIT);

export const optionalReason = limited(z.string({ error: 'Type the reason as text.' }).trim(), REASON_LIMIT).optional();
