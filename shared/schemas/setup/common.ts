/**
 * What every set-up resource shares: list and import limits, quantities as typed, the time zone,
 * the list and error envelopes.
 */
import { z } from 'zod';
import type { QuantityKind } from '../../catalogue/types';
import { parseQuantity } from '../../calc/quantity';

export { LIST_LIMIT_MAX } from '../fields';
export const LIST_LIMIT_DEFAULT = 100;
/** CSV import: at most this many data rows per file. */
export const IMPORT_MAX_ROWS = 5000;
/** CSV import: at most this many bytes per file (JSON or text/csv body). */
export const IMPORT_MAX_BYTES = 2 * 1024 * 1024;

/**
 * A quantity as typed ("10' 6\"", "3.2 m", "38 lb"). The schema checks that it parses as the
 * expected kind; the server converts it to base units with parseQuantity. null clears the value.
 */
export function quantityText(kind: QuantityKind, label: string) {
  return z
    .string({ error: `${label}: type a value with its unit.` })
    .trim()
    .max(60, `${label} is at most 60 characters.`)
    .superRefine((value, ctx) => {
      const parsed = parseQuantity(value, kind);
      if (!parsed.ok) ctx.addIssue({ code: 'custom', message: parsed.error });
      else if (!(parsed.value > 0)) ctx.addIssue({ code: 'custom', message: `${label} must be more than zero.` });
    });
}

/** An IANA time zone the runtime knows ("America/Chicago"). */
export const timeZoneSchema = z
  .string({ error: 'Choose a time zone.' })
  .min(1, 'Choose a time zone.')
  .max(64, 'Not a known time zone.')
  .refine((tz) => {
    try {
      new Intl.DateTimeFormat('en-US', { timeZone: tz });
      return true;
    } catch {
      return false;
    }
  }, 'Not a known time zone (use an IANA name such as America/Chicago).');

/** Every list answers { items, nextCursor }; pass nextCursor back as `cursor` for the next page. */
export interface ListResponse<T> {
  items: T[];
  nextCursor: string | null;
}

/** Error body of every non-2xx answer (server/errors.ts). 412 also carries `current`. */
export interface ApiErrorBody {
  error: { id: string; message: string; fields?: Record<string, string> };
  current?: unknown;
}
