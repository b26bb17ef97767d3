/**
 * Zod building blocks of the set-up schemas. Not re-exported by shared/schemas/setup.ts: only the
 * schemas built from them are.
 */
import { z } from 'zod';

export { booleanQuery, dateOnly, id, pageQuery, planFraction } from '../fields';

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

