/**
 * Zod building blocks of the set-up schemas. Not re-exported by shared/schemas/setup.ts: only the
 * schemas built from them are.
 */
import { z } from 'zod';
import { limited, type TextLimit } from '../fields';

export { booleanQuery, dateOnly, id, pageQuery, planFraction } from '../fields';

/** `max` as a TextLimit when a text box counts down to it (a long description), else a number. */
export const text = (label: string, max: number | TextLimit) => {
  const base = z
    .string({ error: `Enter ${label}.` })
    .trim()
    .min(1, `Enter ${label}.`);
  return typeof max === 'number' ? base.max(max, `${label[0]!.toUpperCase()}${label.slice(1)} is at most ${max} characters.`) : limited(base, max);
};

export const optionalText = (label: string, max: number | TextLimit) => {
  const base = z.string({ error: `Type ${label.toLowerCase()} as text.` }).trim();
  return (typeof max === 'number' ? base.max(max, `${label} is at most ${max} characters.`) : limited(base, max))
    .transform((s) => (s === '' ? null : s))
    .nullable()
    .optional();
};

