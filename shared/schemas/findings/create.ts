/**
 * Logging a finding (POST /findings).
 */
import { z } from 'zod';
import { SEVERITIES } from '../../words';
import { id, dateOnly, measuredText, note, pin } from './fields';
import { DEFECT_TYPE_CHOICE, defectTitle, somethingElseTrade, refineSomethingElse } from './somethingElse';

export { DEFECT_TITLE_LIMIT, DEFECT_TYPE_CHOICE } from './somethingElse';

/**
 * POST /findings → 201 FindingDetail. Idempotency-Key honoured (a retry returns the first answer).
 * Either JSON (no photos) or multipart/form-data with a `data` field holding this JSON and
 * up to 10 files in `photos` (each ≤ 15 MB; JPEG, PNG, WebP or HEIC, decided from the bytes).
 * Attach to a unit, or a space, or a level: the finding's level is derived from the unit or
 * space; a levelId sent beside a unit or space must match it.
 * Omitted severity → the catalogue item's default; omitted companyId → the suggested company
 * (400 when none fits); omitted dueOn → today (job time zone) + the job's days for the severity.
 * A dueOn before today (job time zone) → 400 on `dueOn`, unless `backdated: true` from a GC
 * manager (the flag from anyone else → 403 `backdate_forbidden`): shared/rules/pastDue.ts.
 * `id`: optional, made on the phone (UUID) so later writes queued offline can name the finding before
 * it reaches the server. It is the idempotency of creation: the same id again from the same person on
 * the same job answers 200 with that finding (nothing new); an id already used otherwise → 409.
 */
export const createFindingSchema = z
  .object({
    id: id('finding id').optional(),
    /** The defect type; leave it out for "Something else" (title and trade instead). */
    catalogueItemId: id('defect type', DEFECT_TYPE_CHOICE).optional(),
    /** "Something else": the defect in the inspector's words, and the trade that usually fixes it. */
    title: defectTitle.optional(),
    trade: somethingElseTrade.optional(),
    unitId: id('unit').nullable().optional(),
    spaceId: id('space').nullable().optional(),
    levelId: id('level').nullable().optional(),
    severity: z.enum(SEVERITIES, { error: 'Choose the severity: critical, major or minor.' }).optional(),
    companyId: id('responsible company').optional(),
    dueOn: dateOnly.optional(),
    /** A GC manager back-dates the due date on purpose (only they may send it). */
    backdated: z.boolean({ error: 'Say yes or no to back-dating.' }).optional(),
    note: note.optional(),
    /** For a defect type with a measured rule: the value as typed. */
    measuredText: measuredText.nullable().optional(),
    walkId: id('walk').nullable().optional(),
    unitCheckId: id('unit check').nullable().optional(),
    pinX: pin().nullable().optional(),
    pinY: pin().nullable().optional(),
  })
  .strict()
  .superRefine(refineSomethingElse)
  .refine((f) => Boolean(f.unitId || f.spaceId || f.levelId), {
    message: 'Attach the finding to a unit, a space or a level.',
    path: ['unitId'],
  })
  .refine((f) => (f.pinX == null) === (f.pinY == null), { message: 'Send both pinX and pinY, or neither.', path: ['pinX'] });
export type CreateFindingInput = z.input<typeof createFindingSchema>;
export type CreateFindingParsed = z.output<typeof createFindingSchema>;
