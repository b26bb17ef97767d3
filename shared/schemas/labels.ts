/**
 * Unit labels: GET /api/jobs/:jobId/labels.pdf, a sheet of printed tags with a QR code of each
 * unit's address. Which units (exactly one of levelId, systemId, unitIds) and the sheet's geometry,
 * in millimetres, so one form fits plain A4 and US Letter label stock of any layout.
 */
import { z } from 'zod';
import { id } from './fields';

export const LABEL_PAGES = ['a4', 'letter'] as const;
export type LabelPage = (typeof LABEL_PAGES)[number];

/** Page sizes in millimetres (ISO 216 A4; US Letter 8.5 × 11 in at 25.4 mm per inch). */
export const LABEL_PAGE_MM: Record<LabelPage, { width: number; height: number }> = {
  a4: { width: 210, height: 297 },
  letter: { width: 215.9, height: 279.4 },
};

export interface LabelSheet {
  page: LabelPage;
  rows: number;
  columns: number;
  /** Top and left margin of the first label (mm). */
  top: number;
  left: number;
  /** One label (mm). */
  width: number;
  height: number;
  /** Space between labels across and down (mm). */
  gapX: number;
  gapY: number;
}

/**
 * Defaults per page: the common plain stocks, 3 × 7 labels of 63.5 × 38.1 mm on A4 and
 * 3 × 10 labels of 2-5/8 × 1 in on Letter (common practice, measured on blank stock).
 */
export const LABEL_SHEET_DEFAULTS: Record<LabelPage, Omit<LabelSheet, 'page'>> = {
  a4: { rows: 7, columns: 3, top: 15.15, left: 7.2, width: 63.5, height: 38.1, gapX: 2.5, gapY: 0 },
  letter: { rows: 10, columns: 3, top: 12.7, left: 4.8, width: 66.7, height: 25.4, gapX: 3.2, gapY: 0 },
};

export const LABEL_UNITS_MAX = 500;

const mm = (what: string, min: number, max: number) =>
  z.coerce
    .number({ error: `${what}: a number of millimetres.` })
    .min(min, `${what}: at least ${min} mm.`)
    .max(max, `${what}: at most ${max} mm.`);
const count = (what: string, max: number) =>
  z.coerce.number({ error: `${what}: a whole number from 1 to ${max}.` }).int(`${what}: a whole number from 1 to ${max}.`).min(1, `${what}: a whole number from 1 to ${max}.`).max(max, `${what}: at most ${max}.`);

export const labelsQuerySchema = z
  .object({
    levelId: id('level id').optional(),
    systemId: id('system id').optional(),
    /** Comma-separated unit ids. */
    unitIds: z
      .string({ error: 'unitIds: unit ids separated by commas.' })
      .transform((s) => s.split(',').map((x) => x.trim()).filter(Boolean))
      .pipe(
        z
          .array(id('unit id'))
          .min(1, 'Choose at least one unit.')
          .max(LABEL_UNITS_MAX, `At most ${LABEL_UNITS_MAX} units at once.`)
          .refine((ids) => new Set(ids).size === ids.length, 'A unit appears twice.'),
      )
      .optional(),
    page: z.enum(LABEL_PAGES, { error: 'Choose the page: a4 or letter.' }).optional(),
    rows: count('Rows', 30).optional(),
    columns: count('Columns', 10).optional(),
    top: mm('Top margin', 0, 100).optional(),
    left: mm('Left margin', 0, 100).optional(),
    width: mm('Label width', 20, 200).optional(),
    height: mm('Label height', 15, 280).optional(),
    gapX: mm('Gap across', 0, 50).optional(),
    gapY: mm('Gap down', 0, 50).optional(),
  })
  .strict()
  .refine((q) => [q.levelId, q.systemId, q.unitIds].filter((x) => x !== undefined).length === 1, {
    message: 'Choose which units to label: a level, a system or a list of units (one of them).',
    path: ['levelId'],
  });
export type LabelsQuery = z.input<typeof labelsQuerySchema>;
export type LabelsQueryParsed = z.output<typeof labelsQuerySchema>;

/** The sheet asked for: the page's defaults with what was given on top. */
export function labelSheetOf(q: Partial<LabelSheet>): LabelSheet {
  const page = q.page ?? 'a4';
  const d = LABEL_SHEET_DEFAULTS[page];
  const pick = <K extends keyof typeof d>(k: K) => (q[k] ?? d[k]) as (typeof d)[K];
  return {
    page,
    rows: pick('rows'),
    columns: pick('columns'),
    top: pick('top'),
    left: pick('left'),
    width: pick('width'),
    height: pick('height'),
    gapX: pick('gapX'),
    gapY: pick('gapY'),
  };
}

const round = (n: number) => Math.round(n * 10) / 10;

/** Each way the grid overflows the page, as field → message (empty when it fits). */
export function labelSheetProblems(s: LabelSheet): Record<string, string> {
  const page = LABEL_PAGE_MM[s.page];
  const problems: Record<string, string> = {};
  const across = s.left + s.columns * s.width + (s.columns - 1) * s.gapX;
  const down = s.top + s.rows * s.height + (s.rows - 1) * s.gapY;
  // 0.05 mm of slack: stock dimensions are rounded to the tenth.
  if (across > page.width + 0.05) {
    problems.width = `The labels are wider than the page: ${s.columns} × ${s.width} mm with gaps and margin come to ${round(across)} mm, the page is ${page.width} mm.`;
  }
  if (down > page.height + 0.05) {
    problems.height = `The labels are taller than the page: ${s.rows} × ${s.height} mm with gaps and margin come to ${round(down)} mm, the page is ${page.height} mm.`;
  }
  return problems;
}
