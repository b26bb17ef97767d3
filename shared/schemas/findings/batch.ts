/**
 * One defect on many units (POST /findings/batch): the finding just logged, "also on other units".
 */
import { z } from 'zod';
import { PHOTO_LIMITS } from '../../rules/photos';
import { SEVERITIES } from '../../words';
import { dateOnly, id, measuredText, note } from './fields';
import type { FindingDetail } from './finding';
import { defectTitle, refineSomethingElse, somethingElseTrade } from './somethingElse';

/** Units in one request: a corridor of identical cassettes, well under what one transaction holds easily. */
export const BATCH_UNITS_MAX = 60;

export const batchUnitSchema = z
  .object({
    unitId: id('unit'),
    /** This unit's own measured value (else the batch's `measuredText`, if any). */
    measuredText: measuredText.nullable().optional(),
    /** The index of this unit's photo among the request's `photos` files (multipart only). */
    photo: z
      .number({ error: 'photo: the position of this unit’s photo among the photos sent.' })
      .int('photo: a whole number.')
      .min(0, 'photo: from 0.')
      .max(PHOTO_LIMITS.files - 1, `photo: at most ${PHOTO_LIMITS.files} photos in one request.`)
      .optional(),
  })
  .strict();

/**
 * POST /api/jobs/:jobId/findings/batch (inspector, GC manager; Idempotency-Key) → 201 { items }.
 * One defect type (or "Something else": title, trade, severity), severity, company, due date and
 * note, logged on each unit listed, all on `levelId`, each finding checked exactly as POST
 * /findings checks one (the type applies to the unit's kind, its measured value against that
 * unit's limits). JSON, or multipart with this JSON in `data` and up to 10 `photos`, each unit
 * naming its own photo by position. All or nothing, in one transaction: any refusal → 400 naming
 * `units.<i>.<field>` (or the shared field), nothing written.
 */
export const createFindingBatchSchema = z
  .object({
    catalogueItemId: id('defect type').optional(),
    title: defectTitle.optional(),
    trade: somethingElseTrade.optional(),
    levelId: id('level'),
    severity: z.enum(SEVERITIES, { error: 'Choose the severity: critical, major or minor.' }).optional(),
    companyId: id('responsible company').optional(),
    dueOn: dateOnly.optional(),
    backdated: z.boolean({ error: 'Say yes or no to back-dating.' }).optional(),
    note: note.optional(),
    /** The value for every unit that does not send its own. */
    measuredText: measuredText.nullable().optional(),
    walkId: id('walk').nullable().optional(),
    units: z
      .array(batchUnitSchema, { error: 'Choose the units.' })
      .min(1, 'Choose at least one unit.')
      .max(BATCH_UNITS_MAX, `At most ${BATCH_UNITS_MAX} units at once.`),
  })
  .strict()
  .superRefine(refineSomethingElse)
  .superRefine((b, ctx) => {
    const seen = new Set<string>();
    const photos = new Set<number>();
    b.units.forEach((u, i) => {
      if (seen.has(u.unitId)) ctx.addIssue({ code: 'custom', path: ['units', i, 'unitId'], message: 'This unit is chosen twice.' });
      seen.add(u.unitId);
      if (u.photo !== undefined) {
        if (photos.has(u.photo)) ctx.addIssue({ code: 'custom', path: ['units', i, 'photo'], message: 'Each unit takes its own photo: this one is already another unit’s.' });
        photos.add(u.photo);
      }
      if (u.measuredText && !b.catalogueItemId) ctx.addIssue({ code: 'custom', path: ['units', i, 'measuredText'], message: 'Something else takes no measured value.' });
    });
  });
export type CreateFindingBatchInput = z.input<typeof createFindingBatchSchema>;
export type CreateFindingBatchParsed = z.output<typeof createFindingBatchSchema>;

export interface FindingBatchResponse {
  /** The findings logged, in the order of `units`. */
  items: FindingDetail[];
}
