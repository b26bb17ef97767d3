/**
 * THE one place that makes CSV cells safe to open in a spreadsheet program, and the headers and
 * limits every CSV export shares (units.csv, findings.csv, scorecards.csv).
 *
 * CSV injection (OWASP "CSV Injection"; ASVS 5.0 V1.2.10; CWE-1236): a spreadsheet reads a cell
 * that begins with `=`, `+`, `-` or `@` as a formula, and tab, carriage return and line feed in
 * front of one are skipped by some programs; ASVS adds NUL. OWASP's rules, all applied here:
 *   1. a text cell starting with one of those characters gets a leading single quote (`'`);
 *   2. every text cell is wrapped in double quotes;
 *   3. embedded double quotes are doubled (RFC 4180 2.7), so a `"` cannot end the cell early
 *      and start a new cell with `=` after a separator.
 * csv-stringify's own `escape_formulas` misses LF and NUL and also prefixes negative NUMBERS,
 * so it is not used: a cast for strings neutralises, numbers are written as numbers (a `-3`
 * margin stays a number a spreadsheet can add up). Beyond OWASP's list we also neutralise the
 * full-width forms of = + - @ (U+FF1D, U+FF0B, U+FF0D, U+FF20), which some East Asian
 * spreadsheet locales read as formula starts (defence in depth; cheap).
 */
import type { RequestHandler, Response } from 'express';
import { rateLimit } from 'express-rate-limit';
import { stringify, type Stringifier } from 'csv-stringify';
import { tooManyRequests } from '../errors';

/** Characters a cell must not begin with (see above). */
export const FORMULA_START = /^[=+\-@\t\r\n\0\uFF1D\uFF0B\uFF0D\uFF20]/;

/** OWASP CSV Injection: prefix a ' to any text cell that a spreadsheet could read as a formula. */
export function neutraliseCell(value: string): string {
  return FORMULA_START.test(value) ? `'${value}` : value;
}

/** A cell value: text is neutralised and quoted; numbers stay numbers; null/undefined is an empty cell. */
export type CsvCell = string | number | boolean | null | undefined;

/**
 * A csv-stringify transform with the house rules: UTF-8 byte-order mark (so spreadsheet
 * programs read accents), every text cell quoted, CRLF line ends (RFC 4180), text neutralised.
 * Booleans are written as "yes" / "no" (a spreadsheet user reads them; TRUE/FALSE localise oddly).
 */
export function csvStringifier(): Stringifier {
  return stringify({
    bom: true,
    quoted_string: true,
    record_delimiter: 'windows',
    cast: {
      string: (value: string) => neutraliseCell(value),
      boolean: (value: boolean) => ({ value: value ? 'yes' : 'no', quoted: true }),
      // Non-finite numbers are not numbers a spreadsheet can use: write an empty cell.
      number: (value: number) => (Number.isFinite(value) ? String(value) : ''),
      date: (value: Date) => ({ value: value.toISOString(), quoted: true }),
    },
  });
}

/**
 * A file name safe for Content-Disposition: letters, digits and `-` from the given parts (a job
 * name, say), everything else becomes `_`, runs collapsed, at most 60 characters, plus a date
 * stamp. Never the raw name: a quote or CR/LF could split the header.
 */
export function csvFileName(prefix: string, name: string | null | undefined, day = new Date().toISOString().slice(0, 10)): string {
  const safe = (name ?? '')
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '') // accents dropped: ü → u
    .replace(/[^A-Za-z0-9-]+/g, '_')
    .replace(/^_+|_+$/g, '')
    .slice(0, 60);
  return `${prefix}-${safe || 'job'}-${day}.csv`;
}

/** Status line and headers for a CSV download (before the first byte is written). */
export function setCsvHeaders(res: Response, fileName: string): void {
  res.status(200);
  res.set('Content-Type', 'text/csv; charset=utf-8');
  res.set('Content-Disposition', `attachment; filename="${fileName}"`);
  res.set('X-Content-Type-Options', 'nosniff');
  res.set('Cache-Control', 'no-store');
}

/** Exports per user per minute (every CSV route has its own counter of this size). */
export const EXPORTS_PER_MINUTE = 30;

/** Rate limit for a CSV export route: 30 a minute per signed-in user (in memory, per server node). */
export function exportLimiter(): RequestHandler {
  return rateLimit({
    windowMs: 60_000,
    limit: EXPORTS_PER_MINUTE,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => `export:${req.user?.id ?? 'anonymous'}`,
    handler: (_req, _res, next, options) =>
      next(tooManyRequests('Too many exports in a minute. Wait a moment and try again.', Math.ceil(options.windowMs / 1000))),
  });
}
